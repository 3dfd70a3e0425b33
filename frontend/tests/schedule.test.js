import { test } from "node:test";
import assert from "node:assert/strict";
import { axisRange, countsLine, gridDocument, gridSize, parseValues, psiSeries, variedParameters } from "../js/lib/schedule.js";

test("grid cells read as lists of numbers, text kept as text", () => {
  assert.deepEqual(parseValues("100, 160,200"), [100, 160, 200]);
  assert.deepEqual(parseValues(" continuous; thermal_break "), ["continuous", "thermal_break"]);
  assert.deepEqual(parseValues(""), []);
  assert.deepEqual(parseValues("0.13"), [0.13]);
});

test("a grid document sends only the parameters with values, single values held fixed", () => {
  const values = { insulation_thickness: [100, 160], slab_thickness: [250], wall_thickness: [] };
  assert.equal(gridSize(values), 2);
  assert.deepEqual(gridDocument("floor_slab", values, { length: 12, name: "options" }), {
    name: "options",
    grid: { template: "floor_slab", length: 12, parameters: { insulation_thickness: [100, 160], slab_thickness: 250 } },
  });
  assert.deepEqual(gridDocument("eaves", {}, { length: NaN }), { grid: { template: "eaves", parameters: {} } });
});

const item = (a, b, psi, status = "done") => ({ status, psi, parameters: { insulation_thickness: a, slab_thickness: b } });

test("ψ is plotted against the first numeric varied parameter, one series per other value", () => {
  const batch = {
    grid: { parameters: { insulation_thickness: [100, 200], slab_thickness: [200, 250] } },
    items: [item(200, 200, 0.04), item(100, 200, 0.06), item(100, 250, 0.07), item(200, 250, 0.05, "running")],
  };
  assert.deepEqual(variedParameters(batch), ["insulation_thickness", "slab_thickness"]);
  const plot = psiSeries(batch);
  assert.equal(plot.parameter, "insulation_thickness");
  assert.deepEqual(plot.series, [
    { label: "slab_thickness=200", points: [[100, 0.06], [200, 0.04]] },
    { label: "slab_thickness=250", points: [[100, 0.07]] },
  ]);
});

test("nothing to plot without a grid that varies a number", () => {
  assert.equal(psiSeries({ items: [] }), null);
  assert.equal(psiSeries({ grid: { parameters: { connection: ["continuous", "thermal_break"] } },
    items: [{ status: "done", psi: 0.2, parameters: { connection: "continuous" } }] }), null);
});

test("axis ranges leave room and never collapse", () => {
  assert.deepEqual(axisRange([0, 10]), [-0.5, 10.5]);
  assert.deepEqual(axisRange([2, 2]), [1.8, 2.2]);
  assert.deepEqual(axisRange([]), [0, 1]);
});

test("the counts line", () => {
  assert.equal(countsLine({ total: 40, counts: { done: 11, failed: 1, running: 2, queued: 26 } }),
    "12 of 40 finished · 1 failed · 2 running");
});
