import { test } from "node:test";
import assert from "node:assert/strict";
import { fitView, panBy, toScreen, toWorld, zoomAt } from "../js/lib/viewport.js";
import { rasterise } from "../js/lib/raster.js";
import { buildLut } from "../js/lib/colormap.js";

const close = (a, b) => a.every((v, i) => Math.abs(v - b[i]) < 1e-9);

test("fit centres the box and flips y", () => {
  const view = fitView({ x0: 0, y0: 0, x1: 2, y1: 1 }, 220, 120, 10);
  assert.ok(close(toScreen(view, 1, 0.5), [110, 60]));
  assert.ok(close(toScreen(view, 0, 1), [10, 10]));
  assert.ok(close(toScreen(view, 2, 0), [210, 110]));
});

test("zoom keeps the point under the cursor, pan moves by pixels", () => {
  const view = fitView({ x0: 0, y0: 0, x1: 1, y1: 1 }, 100, 100, 0);
  const before = toWorld(view, 30, 70);
  const zoomed = zoomAt(view, 2.5, 30, 70);
  assert.ok(close(toWorld(zoomed, 30, 70), before));
  assert.equal(zoomed.scale, view.scale * 2.5);
  const moved = panBy(zoomed, 5, -3);
  assert.ok(close(toScreen(moved, ...before), [35, 67]));
});

test("rasterising a linear field colours covered pixels by their interpolated value", () => {
  const width = 10;
  const height = 10;
  const view = fitView({ x0: 0, y0: 0, x1: 1, y1: 1 }, width, height, 0);
  const points = [[0, 0], [1, 0], [1, 1], [0, 1]];
  const triangles = [[0, 1, 2], [0, 2, 3]];
  const lut = buildLut(256);
  const rgba = new Uint8ClampedArray(width * height * 4);
  rasterise({ rgba, width, height, view, points, triangles, values: [0, 1, 1, 0], lo: 0, hi: 1, lut });
  for (let j = 0; j < height; j++) {
    for (let i = 0; i < width; i++) {
      const o = (j * width + i) * 4;
      const k = Math.round(((i + 0.5) / width) * 255) * 3;
      assert.equal(rgba[o + 3], 255, `pixel ${i},${j} covered`);
      assert.deepEqual([rgba[o], rgba[o + 1], rgba[o + 2]], [lut[k], lut[k + 1], lut[k + 2]]);
    }
  }
});

test("pixels outside the mesh stay transparent", () => {
  const view = fitView({ x0: 0, y0: 0, x1: 1, y1: 1 }, 10, 10, 0);
  const rgba = new Uint8ClampedArray(400);
  rasterise({ rgba, width: 10, height: 10, view, points: [[0, 0], [1, 0], [0, 1]],
    triangles: [[0, 1, 2]], values: [0, 0, 0], lo: 0, hi: 1, lut: buildLut(16) });
  assert.equal(rgba[(1 * 10 + 9) * 4 + 3], 0, "top-right corner is outside");
  assert.equal(rgba[(9 * 10 + 0) * 4 + 3], 255, "bottom-left corner is inside");
});
