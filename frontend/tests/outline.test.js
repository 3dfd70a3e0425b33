import { test } from "node:test";
import assert from "node:assert/strict";
import { classifyOutline, inUnion } from "../js/lib/outline.js";

// The example section of the public contract (model-v1.md): EPS 0..100, concrete 100..300 mm.
const SECTION = {
  unit: "mm",
  regions: [
    { material: "eps", polygon: [[0, 0], [100, 0], [100, 1200], [0, 1200]] },
    { material: "concrete", polygon: [[100, 0], [300, 0], [300, 1200], [100, 1200]], holes: [] },
  ],
  boundaries: [
    { environment: "outside", surface_resistance: 0.04, path: [[0, 0], [0, 1200]] },
    { environment: "inside", surface_resistance: 0.13, path: [[300, 0], [300, 1200]] },
  ],
};

const length = ([a, b]) => Math.hypot(b[0] - a[0], b[1] - a[1]);

test("the shared interface is not outline; the two faces are exposed, top and bottom adiabatic", () => {
  const out = classifyOutline(SECTION);
  const exposed = { outside: [], inside: [] };
  for (const e of out.exposed) exposed[e.environment].push(e);
  assert.equal(exposed.outside.reduce((s, e) => s + length(e.segment), 0), 1200);
  assert.equal(exposed.inside.reduce((s, e) => s + length(e.segment), 0), 1200);
  assert.equal(out.adiabatic.reduce((s, seg) => s + length(seg), 0), 600);
  assert.ok(out.adiabatic.every(([a, b]) => a[1] === b[1] && (a[1] === 0 || a[1] === 1200)));
});

test("a boundary path covering part of a face splits it", () => {
  const section = structuredClone(SECTION);
  section.boundaries[1].path = [[300, 0], [300, 500]];
  const out = classifyOutline(section);
  const inside = out.exposed.filter((e) => e.environment === "inside");
  assert.equal(inside.reduce((s, e) => s + length(e.segment), 0), 500);
  assert.equal(out.adiabatic.reduce((s, seg) => s + length(seg), 0), 600 + 700);
});

test("a region drawn over another adds no outline inside it", () => {
  const section = structuredClone(SECTION);
  section.regions.push({ material: "steel", polygon: [[20, 500], [280, 500], [280, 510], [20, 510]] });
  const out = classifyOutline(section);
  const total = [...out.exposed.map((e) => e.segment), ...out.adiabatic].reduce((s, g) => s + length(g), 0);
  assert.equal(total, 2 * 1200 + 2 * 300);
});

test("holes are outside the union and their rims are outline", () => {
  const section = structuredClone(SECTION);
  section.regions[1].holes = [[[150, 100], [250, 100], [250, 200], [150, 200]]];
  assert.equal(inUnion(200, 150, section.regions), false);
  assert.equal(inUnion(120, 150, section.regions), true);
  const out = classifyOutline(section);
  assert.equal(out.adiabatic.reduce((s, seg) => s + length(seg), 0), 600 + 400);
});
