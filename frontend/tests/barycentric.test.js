import { test } from "node:test";
import assert from "node:assert/strict";
import { barycentric, buildLocator, locate, valueAt } from "../js/lib/barycentric.js";

test("weights of the vertices and the centroid", () => {
  const [a, b, c] = [[0, 0], [2, 0], [0, 2]];
  assert.deepEqual(barycentric(0, 0, a, b, c), [1, 0, 0]);
  assert.deepEqual(barycentric(2, 0, a, b, c), [0, 1, 0]);
  const w = barycentric(2 / 3, 2 / 3, a, b, c);
  w.forEach((v) => assert.ok(Math.abs(v - 1 / 3) < 1e-12));
  assert.equal(barycentric(0, 0, [0, 0], [1, 1], [2, 2]), null);
});

// An L-shaped mesh: unit squares at (0,0), (1,0), (0,1), split into triangles.
function lShape() {
  const points = [[0, 0], [1, 0], [2, 0], [0, 1], [1, 1], [2, 1], [0, 2], [1, 2]];
  const triangles = [[0, 1, 4], [0, 4, 3], [1, 2, 5], [1, 5, 4], [3, 4, 7], [3, 7, 6]];
  return { points, triangles };
}

test("a linear field is reproduced exactly inside the mesh", () => {
  const { points, triangles } = lShape();
  const values = points.map(([x, y]) => 20 - 4 * x + 1.5 * y);
  const loc = buildLocator(points, triangles);
  for (const [x, y] of [[0.1, 0.2], [1.7, 0.9], [0.5, 1.5], [1, 1], [2, 0]]) {
    assert.ok(Math.abs(valueAt(loc, values, x, y) - (20 - 4 * x + 1.5 * y)) < 1e-12);
  }
});

test("points outside the mesh, including the notch of the L, give null", () => {
  const { points, triangles } = lShape();
  const loc = buildLocator(points, triangles);
  assert.equal(locate(loc, 1.5, 1.5), null);
  assert.equal(locate(loc, -0.1, 0.5), null);
  assert.equal(valueAt(loc, points.map(() => 1), 3, 3), null);
});

test("the located triangle contains the point", () => {
  const { points, triangles } = lShape();
  const loc = buildLocator(points, triangles);
  const hit = locate(loc, 1.8, 0.3);
  assert.deepEqual(triangles[hit.triangle], [1, 2, 5]);
  assert.ok(hit.weights.every((w) => w >= 0));
});

test("bucket grid finds every point of a large random-ish mesh", () => {
  const n = 30;
  const points = [];
  const triangles = [];
  for (let j = 0; j <= n; j++) for (let i = 0; i <= n; i++) points.push([i * 0.01, j * 0.003]);
  const id = (i, j) => j * (n + 1) + i;
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) {
      triangles.push([id(i, j), id(i + 1, j), id(i, j + 1)]);
      triangles.push([id(i + 1, j), id(i + 1, j + 1), id(i, j + 1)]);
    }
  }
  const loc = buildLocator(points, triangles);
  const values = points.map(([x, y]) => x * 7 - y * 3);
  for (let k = 0; k < 200; k++) {
    const x = ((k * 37) % 300) / 1000;
    const y = ((k * 53) % 90) / 1000;
    assert.ok(Math.abs(valueAt(loc, values, x, y) - (7 * x - 3 * y)) < 1e-12, `${x},${y}`);
  }
});
