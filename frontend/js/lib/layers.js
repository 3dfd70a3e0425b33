// DXF layer mapping: first guesses of what each layer stands for, and the layer-map rule the
// import endpoint expects ({material, conductivity|library, order}, {environment, temperature,
// side, surface_resistance} or {ignore: true}).

/**
 * Surface resistances for first guesses: ISO 6946 horizontal heat flow [from memory]; air
 * temperatures of the design climate. Fallbacks only: the import answer carries the server's
 * defaults (`climate`), and a test checks that these agree with them.
 */
export const DEFAULT_RS = { interior: 0.13, exterior: 0.04 };
export const DEFAULT_TEMPERATURE = { interior: 20, exterior: -5 };

/** Defaults by side ({temperature, rs}) from the import answer's `climate`, else the fallbacks. */
export function sideDefaults(climate) {
  const rs = climate?.surface_resistance || DEFAULT_RS;
  const temperature = climate ? { interior: climate.indoor_temperature, exterior: climate.outdoor_temperature }
    : DEFAULT_TEMPERATURE;
  return { temperature: { ...DEFAULT_TEMPERATURE, ...temperature }, rs: { ...DEFAULT_RS, ...rs } };
}

/**
 * The first-guess environment id of a surface layer: one per side, so that all the interior
 * surface layers (wall, ceiling, floor) make one environment, and all the exterior ones another.
 */
export function environmentFor(side) {
  return side === "interior" ? "inside" : "outside";
}

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

/**
 * The row choices a saved layer-map rule stands for (the inverse of ruleFor); fields the rule
 * does not give keep the values of `base`. Null when the rule says nothing this page knows.
 */
export function choiceFromRule(rule, base) {
  if (!rule || typeof rule !== "object") return null;
  const text = (v, fallback) => (v === undefined || v === null ? fallback : String(v));
  if (rule.ignore === true) return { ...base, role: "ignore" };
  if (typeof rule.material === "string") {
    return { ...base, role: "material", material: rule.material, library: text(rule.library, ""),
      conductivity: Array.isArray(rule.conductivity) ? "" : text(rule.conductivity, ""), order: text(rule.order, "") };
  }
  if (typeof rule.environment === "string") {
    const side = rule.side === "interior" || rule.side === "exterior" ? rule.side : base.side;
    return { ...base, role: "environment", environment: rule.environment, side,
      temperature: text(rule.temperature, base.temperature), surface_resistance: text(rule.surface_resistance, base.surface_resistance) };
  }
  return null;
}

/**
 * Match a saved layer map to the drawing's layer names (case does not matter, as in CAD):
 * `{rules: {layerName: rule}, unused: [map names the drawing lacks], missing: [layers the map
 * does not name]}`.
 */
export function matchLayerMap(names, map) {
  const byKey = new Map(Object.entries(map || {}).map(([k, v]) => [k.toLowerCase(), [k, v]]));
  const rules = {};
  const missing = [];
  for (const name of names) {
    const hit = byKey.get(String(name).toLowerCase());
    if (hit) { rules[name] = hit[1]; byKey.delete(String(name).toLowerCase()); } else missing.push(name);
  }
  return { rules, unused: [...byKey.values()].map(([k]) => k), missing };
}
