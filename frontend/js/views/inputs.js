// Form inputs for template parameters and similar numbers: unit shown, range enforced, an error
// slot beside each input for messages from the page or from the API.

import { h, replace } from "../dom.js";
import { lambdaText } from "../palette.js";

let serial = 0;
const nextId = (name) => `in-${name}-${++serial}`;

/** Human label from a parameter name ("slab_thickness" → "Slab thickness"). */
export function humanise(name) {
  const words = String(name).replace(/_/g, " ");
  return words.charAt(0).toUpperCase() + words.slice(1);
}

function errorSlot(name) {
  return h("p", { class: "field-error", hidden: true, role: "alert", "data-field": name,
    testid: "field-error" });
}

function setError(slot, input, message) {
  slot.hidden = !message;
  replace(slot, message || "");
  input.setAttribute("aria-invalid", message ? "true" : "false");
}

function rangeText(p) {
  const unit = p.unit ? ` ${p.unit}` : "";
  if (p.min !== undefined && p.min !== null && p.max !== undefined && p.max !== null) {
    return `${p.min} – ${p.max}${unit}`;
  }
  if (p.min !== undefined && p.min !== null) return `≥ ${p.min}${unit}`;
  if (p.max !== undefined && p.max !== null) return `≤ ${p.max}${unit}`;
  return "";
}

/** Check a number against a parameter's range; the message, or "" when it is fine. */
export function rangeProblem(value, p) {
  if (!Number.isFinite(value)) return "Enter a number.";
  if (p.kind === "integer" && !Number.isInteger(value)) return "Enter a whole number.";
  if (p.min !== undefined && p.min !== null && value < p.min) return `At least ${p.min}${p.unit ? " " + p.unit : ""}.`;
  if (p.max !== undefined && p.max !== null && value > p.max) return `At most ${p.max}${p.unit ? " " + p.unit : ""}.`;
  return "";
}

/** A number input for parameter `p`. */
export function numberField(p, onChange) {
  const id = nextId(p.name);
  const input = h("input", { id, name: p.name, type: "number", inputMode: "decimal",
    step: p.kind === "integer" ? "1" : "any", value: p.default ?? "",
    min: p.min ?? undefined, max: p.max ?? undefined, testid: `param-${p.name}` });
  const slot = errorSlot(p.name);
  const hint = rangeText(p);
  const el = h("div", { class: "field" },
    h("label", { for: id }, p.description || humanise(p.name)),
    h("div", { class: "input-unit" }, input, p.unit ? h("span", { class: "unit" }, p.unit) : null),
    hint ? h("p", { class: "hint" }, `Range ${hint}`) : null, slot);
  const read = () => {
    const value = input.value === "" ? NaN : Number(input.value);
    const problem = rangeProblem(value, p);
    setError(slot, input, problem);
    return { value, problem };
  };
  input.addEventListener("input", () => { read(); onChange(); });
  return { el, name: p.name, read, showError: (m) => setError(slot, input, m), focus: () => input.focus() };
}

function materialOption(m) {
  const label = `${m.name || m.title || m.id} · λ ${lambdaText(m.conductivity ?? m.lambda)} W/(m·K)`;
  return h("option", { value: m.id }, label);
}

/** A material picker: a library material, or "own λ" with a number input. */
export function materialField(p, materials, onChange) {
  const id = nextId(p.name);
  const select = h("select", { id, name: p.name, testid: `param-${p.name}` },
    materials.map(materialOption), h("option", { value: "__lambda" }, "Own value of λ…"));
  const lam = h("input", { type: "number", step: "any", min: "0", inputMode: "decimal",
    "aria-label": `${p.description || humanise(p.name)}: λ in W/(m·K)`, testid: `param-${p.name}-lambda` });
  const lamRow = h("div", { class: "input-unit", hidden: true }, lam, h("span", { class: "unit" }, "W/(m·K)"));
  const slot = errorSlot(p.name);
  setInitial(select, lam, p.default, materials);
  lamRow.hidden = select.value !== "__lambda";
  const read = () => {
    lamRow.hidden = select.value !== "__lambda";
    if (select.value !== "__lambda") { setError(slot, select, ""); return { value: select.value, problem: "" }; }
    const value = lam.value === "" ? NaN : Number(lam.value);
    const problem = rangeProblem(value, { min: p.min ?? 1e-9, max: p.max, unit: "W/(m·K)" });
    setError(slot, lam, problem);
    return { value, problem };
  };
  for (const el of [select, lam]) el.addEventListener("input", () => { read(); onChange(); });
  const el = h("div", { class: "field" }, h("label", { for: id }, p.description || humanise(p.name)),
    select, lamRow, slot);
  return { el, name: p.name, read, showError: (m) => setError(slot, select, m), focus: () => select.focus() };
}

function setInitial(select, lam, value, materials) {
  if (typeof value === "number") {
    select.value = "__lambda";
    lam.value = String(value);
  } else if (materials.some((m) => m.id === value)) select.value = value;
}

/** A choice among fixed options (`p.options` or `p.choices`). */
export function choiceField(p, onChange) {
  const id = nextId(p.name);
  const options = p.options || p.choices || p.enum || [];
  const select = h("select", { id, name: p.name, testid: `param-${p.name}` },
    options.map((o) => h("option", { value: String(o.value ?? o) }, String(o.label ?? o.value ?? o))));
  if (p.default !== undefined) select.value = String(p.default);
  const slot = errorSlot(p.name);
  select.addEventListener("input", onChange);
  const el = h("div", { class: "field" }, h("label", { for: id }, p.description || humanise(p.name)), select, slot);
  return { el, name: p.name, read: () => ({ value: select.value, problem: "" }),
    showError: (m) => setError(slot, select, m), focus: () => select.focus() };
}

/** The right input for a template parameter. */
export function parameterField(p, materials, onChange) {
  if (String(p.kind || "").includes("material")) return materialField(p, materials, onChange);
  if (p.options || p.choices || p.enum) return choiceField(p, onChange);
  return numberField(p, onChange);
}
