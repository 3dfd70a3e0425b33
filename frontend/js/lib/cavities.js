// Air cavities on the field drawing: Coldseam's cavity hatch (an SVG pattern of fine
// diagonal lines) and the words the readout shows for a cavity under the cursor.

import { fixed, sig } from "./format.js";

export const HATCH_ID = "cs-cavity-hatch";
/** Pattern cell (px) and angle (degrees) of the hatch. */
export const HATCH_CELL = 6;
export const HATCH_ANGLE = 40;

const VENTILATION = { unventilated: "unventilated", slightly_ventilated: "slightly ventilated",
  well_ventilated: "well ventilated" };

/** The pattern definition as [tag, attributes, children] triples, for any element builder. */
export function hatchSpec() {
  return ["pattern", { id: HATCH_ID, patternUnits: "userSpaceOnUse", width: HATCH_CELL, height: HATCH_CELL,
    patternTransform: `rotate(${HATCH_ANGLE})` },
  [["line", { x1: 0, y1: 0, x2: 0, y2: HATCH_CELL, class: "cavity-hatch-line" }]]];
}

/** The readout text for a cavity (a field `cavities` entry or a material's `cavity`). */
export function cavityText(c) {
  if (!c) return "";
  const name = `${c.material ?? "cavity"}${c.cavity ? `, cavity ${c.cavity}` : ""}` +
    (Number.isInteger(c.region) ? ` (region ${c.region})` : "");
  if (c.equivalent_conductivity === null || c.equivalent_conductivity === undefined) {
    return `${name}: ${VENTILATION[c.ventilation] || "open"} air, exposed to ${c.exposed_to ?? "—"}`;
  }
  const size = Number.isFinite(c.width) && Number.isFinite(c.thickness)
    ? `, b ${fixed(c.width * 1000, 1)} × d ${fixed(c.thickness * 1000, 1)} mm` : "";
  const flow = c.heat_flow_direction ? `, ${c.heat_flow_direction} heat flow` : "";
  return `${name}: λeq ${sig(c.equivalent_conductivity, 4)} W/(m·K)${size}${flow}`;
}

/** Readout words for the material of a triangle: a cavity's λeq, else the solid's λ. */
export function materialText(mat) {
  if (!mat) return "";
  if (mat.cavity) return cavityText(mat.cavity);
  const [lx, ly] = mat.conductivity || [];
  return `${mat.id}, λ ${lx === ly ? lx : `${lx} / ${ly}`} W/(m·K)`;
}

/** Table rows for the result's `cavities`: [label, b mm, d mm, heat flow, λeq]. */
export function cavityRows(cavities) {
  return (cavities || []).map((c) => [
    `${c.material ?? "cavity"}${Number.isInteger(c.region) ? ` (region ${c.region})` : ""}`,
    Number.isFinite(c.width) ? fixed(c.width * 1000, 1) : "—",
    Number.isFinite(c.thickness) ? fixed(c.thickness * 1000, 1) : "—",
    c.heat_flow_direction || VENTILATION[c.ventilation] || "—",
    c.equivalent_conductivity === null || c.equivalent_conductivity === undefined
      ? `open to ${c.exposed_to ?? "—"}` : sig(c.equivalent_conductivity, 4),
  ]);
}
