import { test } from "node:test";
import assert from "node:assert/strict";
import { degrees, firstFree, overlaps, textBox } from "../js/lib/labels.js";

test("isotherm labels carry the unit and a proper minus", () => {
  assert.equal(degrees(2.5), "2.5 °C");
  assert.equal(degrees(12), "12 °C");
  assert.equal(degrees(-4), "\u22124 °C");
});

test("a label takes the first place where it covers no other", () => {
  const taken = [textBox(100, 100, "θsi,min 15.28 °C")];
  const candidates = [[100, 100], [100, 104], [100, 130]].map(([x, y]) => ({ x, y, box: textBox(x, y, "fRsi run 13.83 °C") }));
  const chosen = firstFree(candidates, taken);
  assert.equal(chosen.y, 130);
  assert.equal(taken.length, 2);
  assert.ok(!overlaps(taken[0], taken[1]));
});

test("no free place: no label, unless a fallback is asked for", () => {
  const taken = [{ x0: 0, y0: 0, x1: 500, y1: 500 }];
  const candidates = [{ box: textBox(10, 20, "2 °C") }];
  assert.equal(firstFree(candidates, taken), null);
  assert.equal(firstFree(candidates, taken, null, true), candidates[0]);
});

test("labels stay inside the drawing area", () => {
  const area = { x0: 0, y0: 0, x1: 200, y1: 200 };
  const candidates = [{ id: "out", box: textBox(190, 50, "18 °C") }, { id: "in", box: textBox(100, 50, "18 °C") }];
  assert.equal(firstFree(candidates, [], area).id, "in");
});
