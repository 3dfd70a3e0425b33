// The flanking elements of a ψ evaluation, for sections that come without them (an uploaded
// drawing): id, length in the section unit, and a U-value or a cut across the plain element.

import { h, replace } from "../dom.js";
import { pointerParts } from "../lib/errors.js";

const DIMENSIONS = [["", "not stated"], ["internal", "internal"],
  ["overall_internal", "overall internal"], ["external", "external"]];

function numberInput(label, value, testid, cls = "") {
  return h("input", { type: "number", step: "any", value: value ?? "", "aria-label": label, testid, class: cls });
}

function flankRow(flank, index, unit, onRemove) {
  const id = h("input", { value: flank.id ?? `element_${index + 1}`, "aria-label": "Flanking element id", testid: "flank-id" });
  const length = numberInput(`Length in ${unit}`, flank.length, "flank-length");
  const source = h("select", { "aria-label": "Where U comes from", testid: "flank-source" },
    h("option", { value: "u" }, "U-value given"), h("option", { value: "cut" }, "U from a cut"));
  source.value = flank.cut ? "cut" : "u";
  const u = numberInput("U in W/(m²·K)", flank.u_value, "flank-u");
  const cut = (flank.cut || [[], []]).flat();
  const cuts = ["x1", "y1", "x2", "y2"].map((n, i) => numberInput(`Cut ${n} in ${unit}`, cut[i], `flank-cut-${n}`, "narrow"));
  const uBox = h("label", { class: "mini" }, h("span", {}, "U W/(m²·K)"), u);
  const cutBox = h("div", { class: "mini" }, h("span", {}, `Cut from (x1, y1) to (x2, y2), ${unit}`), h("div", { class: "cut-inputs" }, cuts));
  const sync = () => { uBox.hidden = source.value !== "u"; cutBox.hidden = source.value === "u"; };
  source.addEventListener("input", sync);
  sync();
  const error = h("p", { class: "field-error", hidden: true, role: "alert", testid: "field-error" });
  const remove = h("button", { type: "button", class: "small", "aria-label": "Remove this flanking element", onclick: onRemove }, "Remove");
  const el = h("div", { class: "flank-row", testid: "flank-row" },
    h("div", { class: "layer-details" }, h("label", { class: "mini" }, h("span", {}, "Id"), id),
      h("label", { class: "mini" }, h("span", {}, `Length l, ${unit}`), length), h("label", { class: "mini" }, h("span", {}, "U from"), source), uBox),
    cutBox, h("div", { class: "flank-foot" }, error, remove));
  const showError = (m) => { error.hidden = !m; replace(error, m || ""); };
  const read = () => {
    const out = { id: id.value.trim(), length: Number(length.value) };
    const problems = [];
    if (!out.id) problems.push("Give the element an id.");
    if (!(out.length > 0)) problems.push(`Enter a length above 0 ${unit}.`);
    if (source.value === "u") {
      out.u_value = Number(u.value);
      if (!(out.u_value > 0)) problems.push("Enter U above 0 W/(m²·K).");
    } else {
      const v = cuts.map((c) => Number(c.value));
      if (cuts.some((c) => c.value === "")) problems.push("Give both ends of the cut.");
      out.cut = [[v[0], v[1]], [v[2], v[3]]];
    }
    showError(problems.join(" "));
    return { flank: out, bad: problems.length > 0 };
  };
  return { el, read, showError };
}

/** Editor of `psi` (may be undefined); `unit()` gives the section unit for labels. */
export function flankingEditor(psi, unit) {
  let rows = [];
  const list = h("div", { class: "flank-list" });
  const dims = h("select", { id: "flank-dimensions", testid: "flank-dimensions" }, DIMENSIONS.map(([v, t]) => h("option", { value: v }, t)));
  dims.value = psi?.dimensions ?? "";
  const add = (flank = {}) => {
    const row = flankRow(flank, rows.length, unit, () => { rows = rows.filter((r) => r !== row); row.el.remove(); });
    rows.push(row);
    list.append(row.el);
  };
  (psi?.flanking || []).forEach(add);
  const el = h("section", { class: "card" }, h("h2", { class: "card-title" }, "Flanking elements for ψ"),
    h("p", { class: "hint" }, "ψ = L2D − Σ U·l. Give each plain element beside the junction its length and U, or a cut across it for Coldseam to compute U. Leave empty for L2D and fRsi only."),
    list, h("div", { class: "actions" }, h("button", { type: "button", class: "small", testid: "add-flanking", onclick: () => add() }, "Add flanking element")),
    h("div", { class: "field" }, h("label", { for: "flank-dimensions" }, "Dimension system of the lengths"), dims));
  const read = () => {
    const results = rows.map((r) => r.read());
    if (results.some((r) => r.bad)) return { bad: true, psi: null };
    if (!results.length) return { bad: false, psi: null };
    const out = { flanking: results.map((r) => r.flank) };
    if (dims.value) out.dimensions = dims.value;
    return { bad: false, psi: out };
  };
  const place = (problems) => problems.filter((p) => {
    const parts = pointerParts(p.field);
    if (parts[0] !== "psi" || parts[1] !== "flanking" || !rows[Number(parts[2])]) return true;
    rows[Number(parts[2])].showError(p.message);
    return false;
  });
  return { el, read, place };
}
