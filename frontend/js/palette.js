// Coldseam's own colours for materials (categorical, mineral tones) and environments.

const MATERIAL_COLOURS = [
  "#c9b48f", "#8da4b0", "#d8c66a", "#a88a74", "#9bb59a", "#c7a0a8",
  "#7f8fa6", "#e2c9a0", "#a3a07a", "#b6c9cf", "#d1a178", "#8c9c8a",
];

const INTERIOR = ["#d0573a", "#b5432f", "#e07c50"];
const EXTERIOR = ["#2a6f97", "#3f8fb5", "#1f4f6e"];

export const ADIABATIC = "#4a555d";

/** Map material id → colour, in the order the ids first appear. */
export function materialColours(ids) {
  const map = new Map();
  for (const id of ids) {
    if (!map.has(id)) map.set(id, MATERIAL_COLOURS[map.size % MATERIAL_COLOURS.length]);
  }
  return map;
}

/** Map environment id → colour: warm for interior, cold for exterior. */
export function environmentColours(environments) {
  const counts = { interior: 0, exterior: 0 };
  const map = new Map();
  for (const env of environments) {
    const list = env.side === "interior" ? INTERIOR : EXTERIOR;
    const k = counts[env.side === "interior" ? "interior" : "exterior"]++;
    map.set(env.id, list[k % list.length]);
  }
  return map;
}

/** Conductivity as text: "2.3" or "0.13 / 0.29" (orthotropic). */
export function lambdaText(conductivity) {
  if (Array.isArray(conductivity)) {
    return conductivity[0] === conductivity[1]
      ? String(conductivity[0])
      : `${conductivity[0]} / ${conductivity[1]}`;
  }
  return conductivity === undefined || conductivity === null ? "library" : String(conductivity);
}
