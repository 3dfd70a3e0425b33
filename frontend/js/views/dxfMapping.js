// The layer-mapping step of a DXF import: one row per drawing layer, saying whether it is a
// material (library id or λ), an environment (id, side, temperature, Rs) or ignored.

import { h, replace } from "../dom.js";
import {
  choiceFromRule, choiceProblems, environmentFor, guessMaterial, guessRole, guessSide,
  layerContent, matchLayerMap, ruleFor, sideDefaults, slug,
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

function initialChoice(layer, index, library, defaults) {
  const side = guessSide(layer.name, index);
  const lib = guessMaterial(layer.name, library);
  return {
    role: guessRole(layer), material: slug(layer.name), library: lib ?? "", conductivity: "",
    order: "", environment: environmentFor(side), side,
    temperature: String(defaults.temperature[side]), surface_resistance: String(defaults.rs[side]),
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
    h("label", { class: "mini layer-from" }, h("span", {}, "From"), source), lamWrap,
    labelled("Order", input({ type: "number", step: "1", value: choice.order, class: "narrow",
      title: "Higher order is drawn over lower" }, (v) => { choice.order = v; })),
  ];
}

function environmentDetails(choice, row, defaults) {
  const temp = input({ type: "number", step: "any", value: choice.temperature, class: "narrow",
    testid: "layer-temperature" }, (v) => { choice.temperature = v; });
  const rs = input({ type: "number", step: "any", min: "0", max: "10", value: choice.surface_resistance,
    class: "narrow", testid: "layer-rs" }, (v) => { choice.surface_resistance = v; });
  const side = h("select", { "aria-label": `${row.name}: side`, testid: "layer-side" },
    h("option", { value: "interior" }, "interior"), h("option", { value: "exterior" }, "exterior"));
  side.value = choice.side;
  const envId = input({ value: choice.environment, testid: "layer-env-id",
    title: "Layers with the same environment id are one environment (one air temperature)" },
  (v) => { choice.environment = v; });
  side.addEventListener("input", () => {
    const was = environmentFor(choice.side);
    choice.side = side.value;
    temp.value = choice.temperature = String(defaults.temperature[side.value]);
    rs.value = choice.surface_resistance = String(defaults.rs[side.value]);
    if (choice.environment === was) envId.value = choice.environment = environmentFor(side.value);
  });
  return [
    labelled("Environment id", envId), labelled("Side", side), labelled("θ °C", temp), labelled("Rs m²·K/W", rs),
  ];
}

function layerRow(layer, index, library, defaults) {
  const choice = initialChoice(layer, index, library, defaults);
  const row = { name: layer.name, choice };
  const details = h("div", { class: "layer-details" });
  const error = h("p", { class: "field-error", hidden: true, role: "alert", testid: "field-error",
    "data-field": layer.name });
  const role = h("select", { "aria-label": `${layer.name}: what this layer is`, testid: "layer-role" },
    ["material", "environment", "ignore"].map((r) => h("option", { value: r }, r)));
  role.value = choice.role;
  const fill = () => replace(details, choice.role === "material" ? materialDetails(choice, library, row)
    : choice.role === "environment" ? environmentDetails(choice, row, defaults) : h("span", { class: "muted" }, "not used"));
  role.addEventListener("input", () => { choice.role = role.value; fill(); });
  fill();
  row.apply = (rule) => {
    const next = choiceFromRule(rule, row.choice);
    if (!next) return false;
    Object.assign(choice, next);
    role.value = choice.role;
    fill();
    return true;
  };
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
export function mappingTable(layers, library, climate = null) {
  const defaults = sideDefaults(climate);
  const rows = layers.map((layer, i) => layerRow(layer, i, library, defaults));
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
  /** Apply a saved layer map; what did not fit, as sentences for the user. */
  const load = (map) => {
    const { rules, unused, missing } = matchLayerMap(rows.map((r) => r.name), map);
    const notes = [];
    for (const r of rows) {
      if (r.name in rules && !r.apply(rules[r.name])) notes.push(`Layer ${r.name}: the saved entry says neither material, environment nor ignore; kept as it was.`);
    }
    if (unused.length) notes.push(`Not in this drawing: ${unused.join(", ")}.`);
    if (missing.length) notes.push(`Not in the saved map (first guesses kept): ${missing.join(", ")}.`);
    return notes;
  };
  return { el: h("div", { class: "table-scroll" }, table), read, load,
    fields: rows.map((r) => ({ name: r.name, showError: r.showError })) };
}

/**
 * Save and load buttons for the layer map of `table`: the file is the layer map itself (the
 * import endpoint's `layer_map`, and what `coldseam evaluate drawing.dxf --layers` reads).
 */
export function layerMapFiles(table, drawingName, onNotes) {
  const stem = String(drawingName).replace(/\.dxf$/i, "") || "drawing";
  const save = h("button", { type: "button", class: "secondary", testid: "save-layer-map" }, "Save layer map");
  save.addEventListener("click", () => {
    const { layerMap } = table.read();
    const url = URL.createObjectURL(new Blob([JSON.stringify(layerMap, null, 2) + "\n"], { type: "application/json" }));
    const link = h("a", { href: url, download: `${stem}-layers.json` });
    document.body.append(link);
    link.click();
    link.remove();
    setTimeout(() => URL.revokeObjectURL(url), 10000);
  });
  const picker = h("input", { type: "file", accept: ".json,application/json", class: "file-input",
    id: "layer-map-file", testid: "load-layer-map" });
  picker.addEventListener("change", async () => {
    const file = picker.files[0];
    if (!file) return;
    let map;
    try {
      map = JSON.parse(await file.text());
    } catch (err) {
      onNotes([`${file.name} is not valid JSON (${err.message}).`]);
      return;
    }
    if (!map || typeof map !== "object" || Array.isArray(map)) {
      onNotes([`${file.name} is not a layer map (an object: layer name → what it is).`]);
      return;
    }
    onNotes(table.load(map.layer_map && typeof map.layer_map === "object" ? map.layer_map : map));
    picker.value = "";
  });
  const load = h("label", { for: "layer-map-file", class: "button secondary" }, "Load layer map…");
  return h("div", { class: "actions layer-map-files" }, save, load, picker);
}
