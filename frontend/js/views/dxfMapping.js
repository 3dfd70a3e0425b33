// The layer-mapping step of a DXF import: one row per drawing layer, saying whether it is a
// material (library id or λ), an environment (id, side, temperature, Rs) or ignored.

import { h, replace } from "../dom.js";
import {
  DEFAULT_RS, DEFAULT_TEMPERATURE, choiceProblems, guessMaterial, guessRole, guessSide,
  layerContent, ruleFor, slug,
} from "../lib/layers.js";
import { lambdaText } from "../palette.js";

function input(props, onInput) {
  const el = h("input", props);
  el.addEventListener("input", () => onInput(el.value));
  return el;
}

function labelled(text, control) {
  return h("label", { class: "mini" }, h("span", {}, text), control);
}

function initialChoice(layer, index, library) {
  const side = guessSide(layer.name, index);
  const lib = guessMaterial(layer.name, library);
  return {
    role: guessRole(layer), material: slug(layer.name), library: lib ?? "", conductivity: "",
    order: "", environment: slug(layer.name), side,
    temperature: String(DEFAULT_TEMPERATURE[side]), surface_resistance: String(DEFAULT_RS[side]),
  };
}

function materialDetails(choice, library, row) {
  const source = h("select", { "aria-label": `${row.name}: material source`, testid: "layer-library" },
    h("option", { value: "" }, "Own λ"),
    library.map((m) => h("option", { value: m.id }, `${m.name || m.id} (λ ${lambdaText(m.conductivity)} W/(m·K))`)));
  source.value = choice.library;
  const lam = input({ type: "number", step: "any", min: "0", value: choice.conductivity,
    testid: "layer-lambda", "aria-label": `${row.name}: λ in W/(m·K)` }, (v) => { choice.conductivity = v; });
  const lamWrap = labelled("λ W/(m·K)", lam);
  const sync = () => { lamWrap.hidden = Boolean(choice.library); };
  source.addEventListener("input", () => { choice.library = source.value; sync(); });
  sync();
  return [
    labelled("Material id", input({ value: choice.material, testid: "layer-material-id" }, (v) => { choice.material = v; })),
    labelled("From", source), lamWrap,
    labelled("Order", input({ type: "number", step: "1", value: choice.order, class: "narrow",
      title: "Higher order is drawn over lower" }, (v) => { choice.order = v; })),
  ];
}

function environmentDetails(choice, row) {
  const temp = input({ type: "number", step: "any", value: choice.temperature, class: "narrow",
    testid: "layer-temperature" }, (v) => { choice.temperature = v; });
  const rs = input({ type: "number", step: "any", min: "0", max: "10", value: choice.surface_resistance,
    class: "narrow", testid: "layer-rs" }, (v) => { choice.surface_resistance = v; });
  const side = h("select", { "aria-label": `${row.name}: side`, testid: "layer-side" },
    h("option", { value: "interior" }, "interior"), h("option", { value: "exterior" }, "exterior"));
  side.value = choice.side;
  side.addEventListener("input", () => {
    choice.side = side.value;
    temp.value = choice.temperature = String(DEFAULT_TEMPERATURE[side.value]);
    rs.value = choice.surface_resistance = String(DEFAULT_RS[side.value]);
  });
  return [
    labelled("Environment id", input({ value: choice.environment, testid: "layer-env-id" }, (v) => { choice.environment = v; })),
    labelled("Side", side), labelled("θ °C", temp), labelled("Rs m²·K/W", rs),
  ];
}

function layerRow(layer, index, library) {
  const choice = initialChoice(layer, index, library);
  const row = { name: layer.name, choice };
  const details = h("div", { class: "layer-details" });
  const error = h("p", { class: "field-error", hidden: true, role: "alert", testid: "field-error",
    "data-field": layer.name });
  const role = h("select", { "aria-label": `${layer.name}: what this layer is`, testid: "layer-role" },
    ["material", "environment", "ignore"].map((r) => h("option", { value: r }, r)));
  role.value = choice.role;
  const fill = () => replace(details, choice.role === "material" ? materialDetails(choice, library, row)
    : choice.role === "environment" ? environmentDetails(choice, row) : h("span", { class: "muted" }, "not used"));
  role.addEventListener("input", () => { choice.role = role.value; fill(); });
  fill();
  row.showError = (message) => { error.hidden = !message; replace(error, message || ""); };
  row.el = h("tr", { "data-layer": layer.name },
    h("th", { scope: "row" }, h("span", { class: "layer-name" }, layer.name),
      h("span", { class: "muted" }, layerContent(layer)),
      (layer.problems || []).map((p) => h("span", { class: "layer-problem", testid: "layer-problem" },
        typeof p === "string" ? p : p.message || JSON.stringify(p)))),
    h("td", {}, h("label", { class: "mini role" }, h("span", {}, "Stands for"), role), details, error));
  row.el.addEventListener("input", () => row.showError(""));
  return row;
}

/**
 * The mapping table for `layers`; `read()` gives {layerMap, problems} where problems is true
 * when some row is incomplete (each such row shows what is missing).
 */
export function mappingTable(layers, library) {
  const rows = layers.map((layer, i) => layerRow(layer, i, library));
  const table = h("table", { class: "layer-table", testid: "layer-mapping" },
    h("thead", {}, h("tr", {}, h("th", { scope: "col" }, "Layer"), h("th", { scope: "col" }, "What it is"))),
    h("tbody", {}, rows.map((r) => r.el)));
  const read = () => {
    const layerMap = {};
    let bad = false;
    for (const r of rows) {
      const problems = choiceProblems(r.choice);
      const messages = Object.values(problems);
      r.showError(messages.join(" "));
      bad ||= messages.length > 0;
      layerMap[r.name] = ruleFor(r.choice);
    }
    return { layerMap, bad };
  };
  return { el: h("div", { class: "table-scroll" }, table), read, fields: rows.map((r) => ({ name: r.name, showError: r.showError })) };
}
