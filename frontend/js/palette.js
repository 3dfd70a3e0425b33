// Coldseam's own colours for materials (categorical, mineral tones) and environments.

/** The material palette: a material's colour is fixed by its name (see materialColour). */
export const MATERIAL_COLOURS = [
  "#c9b48f", "#8da4b0", "#d8c66a", "#a88a74", "#9bb59a", "#c7a0a8",
  "#7f8fa6", "#e2c9a0", "#a3a07a", "#b6c9cf", "#d1a178", "#8c9c8a",
  "#b9a3c4", "#d9b8a0", "#9fb8a8", "#c2b9a6",
];

export const INTERIOR = ["#d0573a", "#b5432f", "#e07c50"];
export const EXTERIOR = ["#2a6f97", "#3f8fb5", "#1f4f6e"];

export const ADIABATIC = "#4a555d";

/** 32-bit FNV-1a hash of the UTF-8 bytes of `text`. */
export function fnv1a(text) {
  let hash = 0x811c9dc5;
  for (const byte of new TextEncoder().encode(String(text))) {
    hash = Math.imul(hash ^ byte, 0x01000193) >>> 0;
  }
  return hash;
}

/** The palette slot a material prefers: from its library id when it names one, else its id,
 * so the same material has the same colour in every section. */
export function materialSlot(key) {
  return fnv1a(key) % MATERIAL_COLOURS.length;
}

/**
 * Map material id → colour. `materials`: ids, or {id, library} objects (the section's
 * materials). Each takes its preferred slot; when two materials of one section prefer the
 * same slot, the one whose key sorts first keeps it and the other takes the next free slot,
 * so neighbours never share a colour and the order of drawing never matters.
 */
export function materialColours(materials) {
  const keyOf = new Map();
  for (const m of materials) {
    const id = typeof m === "object" && m !== null ? m.id : m;
    const key = typeof m === "object" && m !== null && m.library ? m.library : id;
    if (!keyOf.has(id)) keyOf.set(id, String(key));
  }
  const taken = new Map();
  const slotOf = new Map();
  const byKey = [...keyOf].sort((a, b) => (a[1] < b[1] ? -1 : a[1] > b[1] ? 1 : a[0] < b[0] ? -1 : 1));
  for (const [id, key] of byKey) {
    let slot = materialSlot(key);
    for (let k = 0; k < MATERIAL_COLOURS.length && taken.has(slot) && taken.get(slot) !== key; k++) {
      slot = (slot + 1) % MATERIAL_COLOURS.length;
    }
    taken.set(slot, key);
    slotOf.set(id, slot);
  }
  return new Map([...keyOf.keys()].map((id) => [id, MATERIAL_COLOURS[slotOf.get(id)]]));
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
