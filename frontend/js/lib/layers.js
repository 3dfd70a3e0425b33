// DXF layer mapping: first guesses of what each layer stands for, and the layer-map rule the
// import endpoint expects ({material, conductivity|library, order}, {environment, temperature,
// side, surface_resistance} or {ignore: true}).

/** Surface resistances for first guesses: ISO 6946 horizontal heat flow [from memory]. */
export const DEFAULT_RS = { interior: 0.13, exterior: 0.04 };
export const DEFAULT_TEMPERATURE = { interior: 20, exterior: -5 };

/** "material", "environment" or "ignore" from what the layer holds. */
export function guessRole(layer) {
  if ((layer.closed_shapes || 0) > 0) return "material";
  if ((layer.open_paths || 0) > 0) return "environment";
  return "ignore";
}

/** "interior" or "exterior" from the layer name; unknown names alternate by `index`. */
export function guessSide(name, index = 0) {
  const n = String(name).toLowerCase();
  if (/(^|[^a-z])(int|inside|indoor|room|warm)/.test(n) || n.startsWith("in")) return "interior";
  if (/(^|[^a-z])(ext|outside|outdoor|out|cold|air)/.test(n)) return "exterior";
  return index % 2 === 0 ? "interior" : "exterior";
}

/** An id for a section material or environment from a layer name. */
export function slug(name) {
  const s = String(name).trim().toLowerCase().replace(/[^a-z0-9]+/g, "_").replace(/^_|_$/g, "");
  return s || "layer";
}

/** The library material a layer name most likely means, or null. */
export function guessMaterial(name, library) {
  const n = slug(name);
  const exact = library.find((m) => m.id.toLowerCase() === n);
  if (exact) return exact.id;
  const prefix = library.find((m) => m.id.toLowerCase().startsWith(n) || n.startsWith(m.id.toLowerCase()));
  return prefix ? prefix.id : null;
}

/** The layer-map rule for one row of choices. */
export function ruleFor(choice) {
  if (choice.role === "ignore") return { ignore: true };
  if (choice.role === "environment") {
    return {
      environment: choice.environment,
      temperature: Number(choice.temperature),
      side: choice.side,
      surface_resistance: Number(choice.surface_resistance),
    };
  }
  const rule = { material: choice.material };
  if (choice.library) rule.library = choice.library;
  else rule.conductivity = Number(choice.conductivity);
  if (choice.order) rule.order = Number(choice.order);
  return rule;
}

/** What is wrong with a row of choices, as {key: message}; empty when it can be sent. */
export function choiceProblems(choice) {
  const out = {};
  if (choice.role === "material") {
    if (!choice.material) out.material = "Give the material an id.";
    if (!choice.library && !(Number(choice.conductivity) > 0)) out.conductivity = "Enter λ above 0 W/(m·K).";
  } else if (choice.role === "environment") {
    if (!choice.environment) out.environment = "Give the environment an id.";
    if (!Number.isFinite(Number(choice.temperature)) || choice.temperature === "") out.temperature = "Enter a temperature in °C.";
    const rs = Number(choice.surface_resistance);
    if (choice.surface_resistance === "" || !(rs >= 0 && rs <= 10)) out.surface_resistance = "Enter Rs from 0 to 10 m²·K/W.";
  }
  return out;
}

/** A short description of a layer's content: "2 closed shapes, 1 open path". */
export function layerContent(layer) {
  const parts = [];
  const plural = (n, word) => `${n} ${word}${n === 1 ? "" : "s"}`;
  if (layer.closed_shapes) parts.push(plural(layer.closed_shapes, "closed shape"));
  if (layer.open_paths) parts.push(plural(layer.open_paths, "open path"));
  return parts.join(", ") || "nothing usable";
}
