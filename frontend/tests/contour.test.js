import { test } from "node:test";
import assert from "node:assert/strict";
import { isoSegments, isolines, joinSegments, niceLevels } from "../js/lib/contour.js";

// A structured mesh of the unit square, n × n cells, two triangles each.
function grid(n) {
  const points = [];
  const triangles = [];
  for (let j = 0; j <= n; j++) for (let i = 0; i <= n; i++) points.push([i / n, j / n]);
  const id = (i, j) => j * (n + 1) + i;
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) {
      triangles.push([id(i, j), id(i + 1, j), id(i + 1, j + 1)]);
      triangles.push([id(i, j), id(i + 1, j + 1), id(i, j + 1)]);
    }
  }
  return { points, triangles };
}

test("isoline of a linear field lies exactly on the level set", () => {
  const { points, triangles } = grid(6);
  const values = points.map(([x, y]) => 3 * x + y);
  const level = 1.7;
  const segs = isoSegments(points, triangles, values, level);
  assert.ok(segs.length > 0);
  for (const s of segs) {
    for (const [x, y] of [s.a, s.b]) assert.ok(Math.abs(3 * x + y - level) < 1e-12);
  }
});

test("a straight isoline across the square joins into one polyline from edge to edge", () => {
  const { points, triangles } = grid(5);
  const values = points.map(([x]) => x);
  const lines = isolines(points, triangles, values, 0.33);
  assert.equal(lines.length, 1);
  const ys = lines[0].map(([, y]) => y).sort((a, b) => a - b);
  assert.equal(ys[0], 0);
  assert.equal(ys[ys.length - 1], 1);
  for (const [x] of lines[0]) assert.ok(Math.abs(x - 0.33) < 1e-12);
});

test("a circular isoline closes on itself", () => {
  const { points, triangles } = grid(20);
  const values = points.map(([x, y]) => Math.hypot(x - 0.5, y - 0.5));
  const lines = isolines(points, triangles, values, 0.3);
  assert.equal(lines.length, 1);
  const line = lines[0];
  assert.deepEqual(line[0], line[line.length - 1]);
  for (const [x, y] of line) assert.ok(Math.abs(Math.hypot(x - 0.5, y - 0.5) - 0.3) < 0.02);
});

test("levels outside the value range give nothing", () => {
  const { points, triangles } = grid(3);
  const values = points.map(([x]) => x);
  assert.equal(isoSegments(points, triangles, values, 1.5).length, 0);
  assert.equal(isoSegments(points, triangles, values, -0.1).length, 0);
});

test("a level through mesh vertices is not drawn twice", () => {
  const { points, triangles } = grid(4);
  const values = points.map(([x]) => x);
  const lines = isolines(points, triangles, values, 0.5);
  const length = lines.flat().length;
  assert.equal(lines.length, 1, JSON.stringify(lines));
  assert.ok(length <= 2 * 5, "one crossing per grid row or so");
});

test("joining keeps disjoint pieces apart", () => {
  const segs = [
    { a: [0, 0], b: [1, 0], ka: "0,1", kb: "1,2" },
    { a: [5, 5], b: [6, 5], ka: "7,8", kb: "8,9" },
    { a: [1, 0], b: [2, 0], ka: "1,2", kb: "2,3" },
  ];
  const lines = joinSegments(segs);
  assert.equal(lines.length, 2);
  assert.deepEqual(lines[0], [[0, 0], [1, 0], [2, 0]]);
});

test("nice levels are round steps inside the range", () => {
  assert.deepEqual(niceLevels(0, 20, 10), [2, 4, 6, 8, 10, 12, 14, 16, 18]);
  assert.deepEqual(niceLevels(-5.3, 19.7, 5), [-5, 0, 5, 10, 15]);
  assert.deepEqual(niceLevels(3, 3), []);
  const fine = niceLevels(16.02, 16.98, 8);
  assert.ok(fine.length >= 4 && fine.every((v) => v > 16.02 && v < 16.98));
});
