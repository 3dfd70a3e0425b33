import { test } from "node:test";
import assert from "node:assert/strict";
import { HATCH_ID, cavityRows, cavityText, hatchSpec, materialText } from "../js/lib/cavities.js";

// A cavity as the engine's field document gives it (16 × 16 mm chamber, λeq by hand in
// tests/thermal/test_cavities.py).
const CAVITY = { material: "air", region: 1, cavity: 1, width: 0.016, thickness: 0.016,
  heat_flow_direction: "horizontal", equivalent_conductivity: 0.075507, ventilation: "unventilated" };

test("a cavity under the cursor shows its λeq, extent and heat-flow direction", () => {
  assert.equal(cavityText(CAVITY),
    "air, cavity 1 (region 1): λeq 0.07551 W/(m·K), b 16.0 × d 16.0 mm, horizontal heat flow");
});

test("a well-ventilated cavity says it is open air", () => {
  const open = { material: "groove", region: 3, ventilation: "well_ventilated",
    equivalent_conductivity: null, exposed_to: "outside" };
  assert.equal(cavityText(open), "groove (region 3): well ventilated air, exposed to outside");
});

test("material words: cavities by their λeq, solids by λ (orthotropic as λx / λy)", () => {
  assert.match(materialText({ id: "air [cavity 1]", conductivity: [0.0755, 0.0755], cavity: CAVITY }), /^air, cavity 1/);
  assert.equal(materialText({ id: "pvc", conductivity: [0.17, 0.17] }), "pvc, λ 0.17 W/(m·K)");
  assert.equal(materialText({ id: "timber", conductivity: [0.13, 0.29] }), "timber, λ 0.13 / 0.29 W/(m·K)");
  assert.equal(materialText(undefined), "");
});

test("the hatch is one pattern of diagonal lines referenced by its id", () => {
  const [tag, attrs, children] = hatchSpec();
  assert.equal(tag, "pattern");
  assert.equal(attrs.id, HATCH_ID);
  assert.match(attrs.patternTransform, /^rotate\(\d+\)$/);
  assert.equal(children.length, 1);
  assert.equal(children[0][0], "line");
});

test("cavity table rows: region, b and d in mm, heat flow, λeq; open cavities say so", () => {
  const rows = cavityRows([CAVITY, { material: "groove", region: 3, ventilation: "well_ventilated",
    equivalent_conductivity: null, exposed_to: "outside" }]);
  assert.deepEqual(rows[0], ["air (region 1)", "16.0", "16.0", "horizontal", "0.07551"]);
  assert.deepEqual(rows[1], ["groove (region 3)", "—", "—", "well ventilated", "open to outside"]);
});
