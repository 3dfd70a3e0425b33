import { test } from "node:test";
import assert from "node:assert/strict";
import {
  buildLabTable, buildLut, colourAt, deltaE, linearSrgbToOklab, oklabToLinearSrgb, textColourOver,
} from "../js/lib/colormap.js";

test("OKLab round trip of linear sRGB primaries (Ottosson 2020 matrices)", () => {
  for (const rgb of [[1, 0, 0], [0, 1, 0], [0, 0, 1], [0.2, 0.5, 0.7]]) {
    const back = oklabToLinearSrgb(linearSrgbToOklab(rgb));
    back.forEach((c, i) => assert.ok(Math.abs(c - rgb[i]) < 1e-6, `${rgb} -> ${back}`));
  }
});

test("OKLab of white is L = 1, a = b = 0 (Ottosson 2020, reference values)", () => {
  const [L, a, b] = linearSrgbToOklab([1, 1, 1]);
  assert.ok(Math.abs(L - 1) < 1e-4 && Math.abs(a) < 1e-4 && Math.abs(b) < 1e-4);
});

test("lightness rises strictly from cold to warm", () => {
  const table = buildLabTable(256);
  for (let i = 1; i < table.length; i++) assert.ok(table[i][0] > table[i - 1][0], `step ${i}`);
  assert.ok(table[0][0] < 0.35 && table[255][0] > 0.85, "spans dark to light");
});

test("equal value steps are equal perceptual steps (OKLab ΔE within 2 % of the mean)", () => {
  const table = buildLabTable(64);
  const steps = table.slice(1).map((c, i) => deltaE(c, table[i]));
  const mean = steps.reduce((s, v) => s + v, 0) / steps.length;
  for (const s of steps) assert.ok(Math.abs(s - mean) / mean < 0.02, `step ${s} vs mean ${mean}`);
});

test("every entry is inside the sRGB gamut before quantisation", () => {
  for (const lab of buildLabTable(128)) {
    for (const c of oklabToLinearSrgb(lab)) assert.ok(c > -1e-3 && c < 1 + 1e-3, `${c}`);
  }
});

test("lookup clamps outside the range and is ordered by value", () => {
  const lut = buildLut(256);
  assert.deepEqual(colourAt(-50, 0, 20, lut), colourAt(0, 0, 20, lut));
  assert.deepEqual(colourAt(99, 0, 20, lut), colourAt(20, 0, 20, lut));
  assert.notDeepEqual(colourAt(0, 0, 20, lut), colourAt(20, 0, 20, lut));
  assert.equal(lut.length, 256 * 3);
});

test("text over the cold end is light, over the warm end dark", () => {
  const lut = buildLut(256);
  assert.equal(textColourOver(colourAt(0, 0, 1, lut)), "#ffffff");
  assert.equal(textColourOver(colourAt(1, 0, 1, lut)), "#10202a");
});
