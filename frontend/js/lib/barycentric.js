// Point location on a triangle mesh with a uniform bucket grid, and barycentric interpolation
// of nodal values (exact for a field that is linear on each triangle).

/** Barycentric weights of point (x, y) in triangle (a, b, c); null for a degenerate triangle. */
export function barycentric(x, y, a, b, c) {
  const det = (b[1] - c[1]) * (a[0] - c[0]) + (c[0] - b[0]) * (a[1] - c[1]);
  if (det === 0) return null;
  const w0 = ((b[1] - c[1]) * (x - c[0]) + (c[0] - b[0]) * (y - c[1])) / det;
  const w1 = ((c[1] - a[1]) * (x - c[0]) + (a[0] - c[0]) * (y - c[1])) / det;
  return [w0, w1, 1 - w0 - w1];
}

function bounds(points) {
  let [x0, y0, x1, y1] = [Infinity, Infinity, -Infinity, -Infinity];
  for (const [x, y] of points) {
    x0 = Math.min(x0, x); y0 = Math.min(y0, y);
    x1 = Math.max(x1, x); y1 = Math.max(y1, y);
  }
  return { x0, y0, x1, y1 };
}

/** Bucket grid of triangle indices by bounding box. */
export function buildLocator(points, triangles) {
  const box = bounds(points);
  const n = Math.max(1, Math.ceil(Math.sqrt(triangles.length / 2)));
  const w = (box.x1 - box.x0) / n || 1;
  const h = (box.y1 - box.y0) / n || 1;
  const cell = (v, lo, size) => Math.min(n - 1, Math.max(0, Math.floor((v - lo) / size)));
  const buckets = Array.from({ length: n * n }, () => []);
  triangles.forEach((tri, t) => {
    const tb = bounds(tri.map((i) => points[i]));
    for (let i = cell(tb.x0, box.x0, w); i <= cell(tb.x1, box.x0, w); i++) {
      for (let j = cell(tb.y0, box.y0, h); j <= cell(tb.y1, box.y0, h); j++) {
        buckets[j * n + i].push(t);
      }
    }
  });
  return { points, triangles, box, n, w, h, buckets, cell };
}

/**
 * Triangle containing (x, y) and its weights, or null when the point is outside the mesh.
 * `eps` admits points on an edge within rounding.
 */
export function locate(loc, x, y, eps = 1e-9) {
  const { box, n, w, h, buckets, cell } = loc;
  const pad = 1e-9 * Math.max(box.x1 - box.x0, box.y1 - box.y0, 1);
  if (x < box.x0 - pad || x > box.x1 + pad || y < box.y0 - pad || y > box.y1 + pad) return null;
  const bucket = buckets[cell(y, box.y0, h) * n + cell(x, box.x0, w)];
  for (const t of bucket) {
    const [a, b, c] = loc.triangles[t].map((i) => loc.points[i]);
    const weights = barycentric(x, y, a, b, c);
    if (weights && weights.every((v) => v >= -eps)) return { triangle: t, weights };
  }
  return null;
}

/** Interpolated nodal value at (x, y), or null outside the mesh. */
export function valueAt(loc, values, x, y) {
  const hit = locate(loc, x, y);
  if (!hit) return null;
  const tri = loc.triangles[hit.triangle];
  return hit.weights.reduce((sum, wt, k) => sum + wt * values[tri[k]], 0);
}
