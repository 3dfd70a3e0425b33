// Isotherms by marching triangles on a linear triangle mesh, and joining of the pieces into
// polylines. Crossing points are keyed by the mesh edge they lie on, so neighbouring triangles
// produce exactly the same point and joining needs no distance tolerance.

function edgeKey(i, j) {
  return i < j ? `${i},${j}` : `${j},${i}`;
}

/** Point where the level crosses edge (i, j); always interpolated from the lower index. */
function crossing(points, values, i, j, level) {
  const [a, b] = i < j ? [i, j] : [j, i];
  const t = (level - values[a]) / (values[b] - values[a]);
  const [ax, ay] = points[a];
  const [bx, by] = points[b];
  return [ax + (bx - ax) * t, ay + (by - ay) * t];
}

/**
 * Segments of the isoline `value = level` over a triangle mesh.
 * A vertex counts as "above" when value >= level, so a level through a vertex is never doubled.
 * Returns [{a: [x, y], b: [x, y], ka: edgeKey, kb: edgeKey}, ...].
 */
export function isoSegments(points, triangles, values, level) {
  const segments = [];
  for (const tri of triangles) {
    const above = tri.map((v) => values[v] >= level);
    const count = above.filter(Boolean).length;
    if (count === 0 || count === 3) continue;
    const lone = above.findIndex((x) => (count === 1 ? x : !x));
    const p = tri[lone];
    const q = tri[(lone + 1) % 3];
    const r = tri[(lone + 2) % 3];
    segments.push({
      a: crossing(points, values, p, q, level),
      b: crossing(points, values, p, r, level),
      ka: edgeKey(p, q),
      kb: edgeKey(p, r),
    });
  }
  return segments;
}

/** Join segments sharing an edge key into polylines; closed loops repeat their first point. */
export function joinSegments(segments) {
  const byKey = new Map();
  segments.forEach((s, idx) => {
    for (const k of [s.ka, s.kb]) {
      if (!byKey.has(k)) byKey.set(k, []);
      byKey.get(k).push(idx);
    }
  });
  const used = new Uint8Array(segments.length);
  const lines = [];
  for (let start = 0; start < segments.length; start++) {
    if (used[start]) continue;
    used[start] = 1;
    const s = segments[start];
    const forward = walk(segments, byKey, used, s.kb, [s.a, s.b]);
    const backward = walk(segments, byKey, used, s.ka, [s.a]);
    lines.push(backward.reverse().concat(forward.slice(1)));
  }
  return lines;
}

function walk(segments, byKey, used, key, line) {
  let k = key;
  for (;;) {
    const next = (byKey.get(k) || []).find((i) => !used[i]);
    if (next === undefined) return line;
    used[next] = 1;
    const s = segments[next];
    const forwardDir = s.ka === k;
    line.push(forwardDir ? s.b : s.a);
    k = forwardDir ? s.kb : s.ka;
  }
}

/** Polylines of the isoline `value = level`. */
export function isolines(points, triangles, values, level) {
  return joinSegments(isoSegments(points, triangles, values, level));
}

/**
 * Round contour levels strictly inside (lo, hi): a step of 1, 2 or 5 × 10^k giving about
 * `target` lines.
 */
export function niceLevels(lo, hi, target = 10) {
  if (!(hi > lo) || !Number.isFinite(lo) || !Number.isFinite(hi)) return [];
  const raw = (hi - lo) / target;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 2.5, 5, 10].map((m) => m * mag).find((s) => s >= raw);
  const levels = [];
  for (let v = Math.ceil(lo / step) * step; v < hi - 1e-9 * step; v += step) {
    if (v > lo + 1e-9 * step) levels.push(Number(v.toPrecision(12)));
  }
  return levels;
}
