import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { buildLut } from "../js/lib/colormap.js";
import { EXTERIOR, fnv1a, INTERIOR, MATERIAL_COLOURS, materialColours, materialSlot } from "../js/palette.js";

const shared = JSON.parse(readFileSync(new URL("./shared-colours.json", import.meta.url), "utf8"));

test("the thermal map matches the samples the picture is checked against too", () => {
  const lut = buildLut(shared.lut_size);
  for (const { index, rgb } of shared.thermal) {
    assert.deepEqual(Array.from(lut.slice(index * 3, index * 3 + 3)), rgb, `entry ${index}`);
  }
});

test("FNV-1a 32-bit test vectors (FNV reference test suite; recalled from memory)", () => {
  assert.equal(fnv1a(""), 0x811c9dc5);
  assert.equal(fnv1a("a"), 0xe40c292c);
  assert.equal(fnv1a("foobar"), 0xbf9cf968);
});

test("a material keeps its colour from section to section, whatever else is drawn", () => {
  const one = materialColours(["concrete", "eps", "plaster"]);
  const two = materialColours(["timber", "mineral_wool", "concrete"]);
  const three = materialColours(["eps", "render", "concrete", "steel"]);
  assert.equal(one.get("concrete"), two.get("concrete"));
  assert.equal(one.get("concrete"), three.get("concrete"));
  assert.equal(one.get("eps"), three.get("eps"));
  for (const [id, slot] of Object.entries(shared.material_slots)) assert.equal(materialSlot(id), slot, id);
});

test("a library material is coloured by its library id, not by the name the section gives it", () => {
  const a = materialColours([{ id: "slab", library: "concrete" }, { id: "ins", library: "eps" }]);
  const b = materialColours(["concrete"]);
  assert.equal(a.get("slab"), b.get("concrete"));
});

test("two materials of one section never share a colour, in any order", () => {
  // steel and plaster prefer the same slot (see shared-colours.json)
  assert.equal(materialSlot("steel"), materialSlot("plaster"));
  const forward = materialColours(["steel", "plaster", "eps"]);
  const backward = materialColours(["eps", "plaster", "steel"]);
  assert.notEqual(forward.get("steel"), forward.get("plaster"));
  for (const id of ["steel", "plaster", "eps"]) assert.equal(forward.get(id), backward.get(id), id);
  const many = materialColours(MATERIAL_COLOURS.map((_, i) => `m${i}`));
  assert.equal(new Set(many.values()).size, MATERIAL_COLOURS.length);
});

test("surfaces have the colours the picture gives them", () => {
  assert.deepEqual(INTERIOR, shared.surface_colours.interior);
  assert.deepEqual(EXTERIOR, shared.surface_colours.exterior);
});
