import { test } from "node:test";
import assert from "node:assert/strict";
import { choiceProblems, guessMaterial, guessRole, guessSide, layerContent, ruleFor, slug } from "../js/lib/layers.js";

test("closed shapes suggest a material, open paths an environment", () => {
  assert.equal(guessRole({ closed_shapes: 2, open_paths: 1 }), "material");
  assert.equal(guessRole({ closed_shapes: 0, open_paths: 3 }), "environment");
  assert.equal(guessRole({ closed_shapes: 0, open_paths: 0 }), "ignore");
});

test("side from the layer name", () => {
  assert.equal(guessSide("INSIDE"), "interior");
  assert.equal(guessSide("Env-Interior"), "interior");
  assert.equal(guessSide("OUTSIDE"), "exterior");
  assert.equal(guessSide("ext_air"), "exterior");
  assert.equal(guessSide("A", 1), "exterior");
});

test("library guesses and ids", () => {
  const lib = [{ id: "concrete_2000" }, { id: "eps" }, { id: "steel" }];
  assert.equal(guessMaterial("EPS", lib), "eps");
  assert.equal(guessMaterial("Concrete", lib), "concrete_2000");
  assert.equal(guessMaterial("Glass", lib), null);
  assert.equal(slug(" Wall / Brick 1 "), "wall_brick_1");
  assert.equal(slug("--"), "layer");
});

test("rules follow the layer-map format of the import endpoint", () => {
  assert.deepEqual(ruleFor({ role: "ignore" }), { ignore: true });
  assert.deepEqual(ruleFor({ role: "material", material: "eps", library: "", conductivity: "0.035" }),
    { material: "eps", conductivity: 0.035 });
  assert.deepEqual(ruleFor({ role: "material", material: "c", library: "concrete_2000", order: "2" }),
    { material: "c", library: "concrete_2000", order: 2 });
  assert.deepEqual(ruleFor({ role: "environment", environment: "in", temperature: "20", side: "interior",
    surface_resistance: "0.13" }), { environment: "in", temperature: 20, side: "interior", surface_resistance: 0.13 });
});

test("incomplete rows are caught before sending", () => {
  assert.deepEqual(Object.keys(choiceProblems({ role: "material", material: "", conductivity: "" })),
    ["material", "conductivity"]);
  assert.deepEqual(choiceProblems({ role: "material", material: "x", library: "eps" }), {});
  assert.deepEqual(Object.keys(choiceProblems({ role: "environment", environment: "e", temperature: "",
    surface_resistance: "-1" })), ["temperature", "surface_resistance"]);
  assert.deepEqual(choiceProblems({ role: "ignore" }), {});
});

test("layer content in words", () => {
  assert.equal(layerContent({ closed_shapes: 1, open_paths: 2 }), "1 closed shape, 2 open paths");
  assert.equal(layerContent({}), "nothing usable");
});

test("surface layers of one side share one environment", async () => {
  const { environmentFor } = await import("../js/lib/layers.js");
  assert.equal(environmentFor("interior"), "inside");
  assert.equal(environmentFor("exterior"), "outside");
});

test("defaults by side come from the server's climate when it sends one", async () => {
  const { sideDefaults } = await import("../js/lib/layers.js");
  assert.deepEqual(sideDefaults(null).temperature, { interior: 20, exterior: -5 });
  const d = sideDefaults({ indoor_temperature: 21, outdoor_temperature: -12, surface_resistance: { interior: 0.13, exterior: 0.04 } });
  assert.deepEqual(d.temperature, { interior: 21, exterior: -12 });
  assert.equal(d.rs.exterior, 0.04);
});

test("a saved layer map gives back the row choices it was made from", async () => {
  const { choiceFromRule, matchLayerMap } = await import("../js/lib/layers.js");
  const base = { role: "material", material: "x", library: "", conductivity: "", order: "", environment: "x",
    side: "interior", temperature: "20", surface_resistance: "0.13" };
  const rules = [
    { material: "pir", conductivity: 0.022 },
    { material: "c", library: "concrete_2000", order: 2 },
    { environment: "outside", temperature: -5, side: "exterior", surface_resistance: 0.04 },
    { ignore: true },
  ];
  for (const rule of rules) assert.deepEqual(ruleFor(choiceFromRule(rule, base)), rule);
  assert.equal(choiceFromRule({ colour: "red" }, base), null);
  const env = choiceFromRule({ environment: "inside", side: "interior" }, base);
  assert.equal(env.temperature, "20");  // not in the rule: the row's default stays
  const matched = matchLayerMap(["PIR", "Surf-Ext", "NEW"], { pir: rules[0], "SURF-EXT": rules[2], OLD: rules[3] });
  assert.deepEqual(Object.keys(matched.rules), ["PIR", "Surf-Ext"]);
  assert.deepEqual(matched.unused, ["OLD"]);
  assert.deepEqual(matched.missing, ["NEW"]);
});
