// Gouraud rasterisation of a nodal field on a triangle mesh into an RGBA pixel buffer.
// Pixel centres (i + 0.5, j + 0.5) inside a triangle take the barycentric blend of its nodal
// values, coloured through a lookup table; pixels outside every triangle stay transparent.

import { toScreen } from "./viewport.js";

/**
 * Fill `rgba` (Uint8ClampedArray, width*height*4) with the field seen through `view`.
 * `lut` is a flat RGB table; values are mapped linearly from [lo, hi].
 */
export function rasterise({ rgba, width, height, view, points, triangles, values, lo, hi, lut }) {
  const screen = points.map(([x, y]) => toScreen(view, x, y));
  const n = lut.length / 3;
  const span = hi > lo ? hi - lo : 1;
  for (const tri of triangles) {
    const p = tri.map((i) => screen[i]);
    const t = tri.map((i) => (values[i] - lo) / span);
    fillTriangle(rgba, width, height, p, t, lut, n);
  }
  return rgba;
}

function fillTriangle(rgba, width, height, p, t, lut, n) {
  const [a, b, c] = p;
  const det = (b[1] - c[1]) * (a[0] - c[0]) + (c[0] - b[0]) * (a[1] - c[1]);
  if (det === 0) return;
  const y0 = Math.max(0, Math.floor(Math.min(a[1], b[1], c[1])));
  const y1 = Math.min(height - 1, Math.ceil(Math.max(a[1], b[1], c[1])));
  const x0 = Math.max(0, Math.floor(Math.min(a[0], b[0], c[0])));
  const x1 = Math.min(width - 1, Math.ceil(Math.max(a[0], b[0], c[0])));
  const eps = -1e-7;
  for (let j = y0; j <= y1; j++) {
    const py = j + 0.5;
    for (let i = x0; i <= x1; i++) {
      const px = i + 0.5;
      const w0 = ((b[1] - c[1]) * (px - c[0]) + (c[0] - b[0]) * (py - c[1])) / det;
      const w1 = ((c[1] - a[1]) * (px - c[0]) + (a[0] - c[0]) * (py - c[1])) / det;
      const w2 = 1 - w0 - w1;
      if (w0 < eps || w1 < eps || w2 < eps) continue;
      const v = w0 * t[0] + w1 * t[1] + w2 * t[2];
      const k = Math.round(Math.min(1, Math.max(0, v)) * (n - 1)) * 3;
      const o = (j * width + i) * 4;
      rgba[o] = lut[k];
      rgba[o + 1] = lut[k + 1];
      rgba[o + 2] = lut[k + 2];
      rgba[o + 3] = 255;
    }
  }
}
