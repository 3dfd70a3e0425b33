// Approximate classification of a section's outline for the preview: the pieces of region
// edges that separate the union of regions from the outside, each either exposed to the
// environment of a boundary path lying along it, or adiabatic. The engine's own classification
// (returned with the temperature field) is authoritative; this is for drawing before a solve.

import { boundsOf } from "./viewport.js";

/** Even-odd test of (x, y) against a closed ring. */
export function inRing(x, y, ring) {
  let inside = false;
  for (let i = 0, j = ring.length - 1; i < ring.length; j = i++) {
    const [xi, yi] = ring[i];
    const [xj, yj] = ring[j];
    if (yi > y !== yj > y && x < ((xj - xi) * (y - yi)) / (yj - yi) + xi) inside = !inside;
  }
  return inside;
}

/** Whether (x, y) is inside the union of regions (polygons minus their holes). */
export function inUnion(x, y, regions) {
  return regions.some(
    (r) => inRing(x, y, r.polygon) && !(r.holes || []).some((h) => inRing(x, y, h)),
  );
}

/** Distance from p to segment ab, and the parameter t of the nearest point. */
export function segmentDistance(p, a, b) {
  const dx = b[0] - a[0];
  const dy = b[1] - a[1];
  const len2 = dx * dx + dy * dy;
  const t = len2 ? Math.max(0, Math.min(1, ((p[0] - a[0]) * dx + (p[1] - a[1]) * dy) / len2)) : 0;
  return { d: Math.hypot(p[0] - a[0] - t * dx, p[1] - a[1] - t * dy), t };
}

function rings(region) {
  return [region.polygon, ...(region.holes || [])];
}

function ringEdges(ring) {
  return ring.map((p, i) => [p, ring[(i + 1) % ring.length]]);
}

/** Split edge ab at every point of `cuts` lying on it strictly between its ends. */
function splitEdge(a, b, cuts, tol) {
  const inner = [];
  for (const p of cuts) {
    const { d, t } = segmentDistance(p, a, b);
    if (d < tol && t > 1e-9 && t < 1 - 1e-9) inner.push({ t, p });
  }
  inner.sort((u, v) => u.t - v.t);
  const pts = [a, ...inner.map((c) => c.p), b];
  return pts.slice(1).map((p, i) => [pts[i], p]);
}

function isOutline(a, b, regions, offset) {
  const len = Math.hypot(b[0] - a[0], b[1] - a[1]);
  if (len === 0) return false;
  const nx = -(b[1] - a[1]) / len;
  const ny = (b[0] - a[0]) / len;
  const mx = (a[0] + b[0]) / 2;
  const my = (a[1] + b[1]) / 2;
  return inUnion(mx + nx * offset, my + ny * offset, regions)
    !== inUnion(mx - nx * offset, my - ny * offset, regions);
}

function boundaryAlong(a, b, boundaries, tol) {
  return boundaries.find((bd) =>
    ringEdges(bd.path).slice(0, -1).some(
      ([p, q]) => segmentDistance(a, p, q).d < tol && segmentDistance(b, p, q).d < tol,
    ),
  );
}

/**
 * Outline pieces of `section`: {exposed: [{boundary, environment, segment}], adiabatic:
 * [segment]}, segments in section coordinates. `relTol` is relative to the section diagonal.
 */
export function classifyOutline(section, relTol = 1e-5) {
  const regions = section.regions || [];
  const boundaries = section.boundaries || [];
  const box = boundsOf(regions.flatMap(rings));
  const diag = Math.hypot(box.x1 - box.x0, box.y1 - box.y0) || 1;
  const tol = relTol * diag;
  const cuts = regions.flatMap(rings).flat().concat(boundaries.flatMap((b) => b.path));
  const seen = new Set();
  const out = { exposed: [], adiabatic: [] };
  for (const [a, b] of regions.flatMap(rings).flatMap(ringEdges)) {
    for (const [p, q] of splitEdge(a, b, cuts, tol)) {
      const key = [p, q].map((v) => v.map((c) => Math.round(c / tol)).join(":")).sort().join("|");
      if (seen.has(key) || !isOutline(p, q, regions, tol * 10)) continue;
      seen.add(key);
      const bd = boundaryAlong(p, q, boundaries, tol * 10);
      if (bd) out.exposed.push({ boundary: bd, environment: bd.environment, segment: [p, q] });
      else out.adiabatic.push([p, q]);
    }
  }
  return out;
}
