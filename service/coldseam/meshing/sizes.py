"""Mesh sizes graded towards junction vertices, and the 1D discretisation of every segment.

A junction vertex is a point where materials or boundary conditions meet, or where the outline
turns. The target size at x is h(x) = min(h_max, minᵥ(hᵥ + g·|x − v|), k·lfs(x)), with hᵥ the
size at junction vertex v (at most half its local feature size, the distance to the nearest
segment it is not on) and lfs(x) the distance from x to the nearest other segment, so thin layers
get elements no longer than k times their thickness. Every segment is cut by Coldseam itself
into pieces following h(x); gmsh then fills the faces.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from coldseam.geometry.outline import Classified

#: Level-0 sizes as fractions of the section extent, and the growth rate g.
H_MAX = 1 / 6
H_JUNCTION = 1 / 8
GROWTH = 0.5
#: Elements along a thin layer are at most this many times its thickness.
THIN_ASPECT = 12.0
SAMPLES = 24
#: Junction-vertex sizes shrink as factor^VERTEX_POWER from level to level.
VERTEX_POWER = 1.0
#: h(x) takes the minimum over this many nearest junction vertices (all of them when fewer).
NEAREST = 8
#: Up to this many junction vertices the nearest ones are found by brute force in numpy, which
#: spares a cold start the import of scipy.spatial (≈ 50 ms); above it, by a k-d tree.
BRUTE_FORCE_VERTICES = 32
#: Query points per brute-force chunk (chunk × vertices distances in memory at once).
CHUNK = 4096
#: Local feature sizes: up to this many point-segment pairs every distance is taken; above
#: it, only those of the segments an STRtree finds near each point, bounded by the nearest of
#: the segments of the NEAREST_SEGMENTS nearest midpoints.
BRUTE_FORCE_PAIRS = 200_000
NEAREST_SEGMENTS = 16


@dataclass
class SegmentPlan:
    """The level's discretisation: interior node coordinates of every segment (a -> b)."""

    inner: dict[tuple[int, int], np.ndarray]
    point_size: np.ndarray  # size at every partition point, metres
    h_max: float
    junctions: np.ndarray  # indices of junction vertices

    def size_at(self, xy: np.ndarray) -> np.ndarray:
        return self._graded(np.atleast_2d(xy))

    def _graded(self, xy: np.ndarray) -> np.ndarray:
        return _graded(xy, self._vertices, self._vertex_size, self.h_max, self._growth)


class JunctionIndex:
    """The junction vertices, for the minimum of hᵥ + g·|x − v| over the NEAREST of them.

    Brute force while there are few vertices; a scipy k-d tree (built on first use) otherwise,
    and for the rare query point whose NEAREST-th neighbour is tied with another one of a
    different size, where the k-d tree's choice between them decides the result.
    """

    def __init__(self, vertex_xy: np.ndarray) -> None:
        self.xy = vertex_xy
        self._tree = None

    def tree(self):
        if self._tree is None:
            from scipy.spatial import cKDTree

            self._tree = cKDTree(self.xy)
        return self._tree


def _graded(xy, vertices: JunctionIndex, vertex_size, h_max, growth) -> np.ndarray:
    k = min(NEAREST, len(vertex_size))
    if len(vertex_size) > BRUTE_FORCE_VERTICES:
        return _graded_by_tree(xy, vertices, vertex_size, h_max, growth, k)
    out = np.empty(len(xy))
    for start in range(0, len(xy), CHUNK):
        chunk = xy[start:start + CHUNK]
        h, ambiguous = _graded_brute_force(chunk, vertices.xy, vertex_size, growth, k)
        if np.any(ambiguous):
            h[ambiguous] = _graded_by_tree(chunk[ambiguous], vertices, vertex_size, np.inf,
                                           growth, k)
        out[start:start + len(chunk)] = np.minimum(h_max, h)
    return out


def _graded_by_tree(xy, vertices: JunctionIndex, vertex_size, h_max, growth, k) -> np.ndarray:
    dist, idx = vertices.tree().query(xy, k=k)
    dist, idx = dist.reshape(len(xy), k), idx.reshape(len(xy), k)
    return np.minimum(h_max, np.min(vertex_size[idx] + growth * dist, axis=1))


def _graded_brute_force(xy, vertex_xy, vertex_size, growth, k):
    """min over the k nearest vertices of hᵥ + g·d for each xy, and where that is ambiguous.

    The distances are bit for bit the k-d tree's (√(dx² + dy²)); the k nearest are those
    closer than the k-th smallest distance plus some of the ones at it. When more are at it
    than are needed and they differ in size, the choice matters: those rows are ambiguous.
    """
    dx = xy[:, None, 0] - vertex_xy[None, :, 0]
    dy = xy[:, None, 1] - vertex_xy[None, :, 1]
    dist = np.sqrt(dx * dx + dy * dy)
    value = vertex_size[None, :] + growth * dist
    if k == len(vertex_size):
        return np.min(value, axis=1), np.zeros(len(xy), bool)
    kth = np.partition(dist, k - 1, axis=1)[:, k - 1:k]
    closer, tied = dist < kth, dist == kth
    best_closer = np.where(closer, value, np.inf).min(axis=1)
    best_tied = np.where(tied, value, np.inf).min(axis=1)
    worst_tied = np.where(tied, value, -np.inf).max(axis=1)
    all_tied_taken = tied.sum(axis=1) == k - closer.sum(axis=1)
    ambiguous = ~all_tied_taken & (best_tied < best_closer) & (best_tied != worst_tied)
    return np.minimum(best_closer, best_tied), ambiguous


def junction_vertices(classified: Classified) -> np.ndarray:
    part = classified.partition
    segments = part.segments()
    incident: dict[int, list[tuple[int, int]]] = {}
    for seg in segments:
        for p in seg:
            incident.setdefault(p, []).append(seg)
    out = []
    for p, segs in incident.items():
        if len(segs) != 2 or _label(classified, segments, segs[0]) != _label(
                classified, segments, segs[1]) or not _collinear(part.points, p, segs):
            out.append(p)
    return np.array(sorted(out), int)


def _label(classified, segments, seg):
    return tuple(sorted(segments[seg])), classified.exposure.get(seg, -1)


def _collinear(points, p, segs) -> bool:
    (a1, b1), (a2, b2) = segs
    u = points[b1 if a1 == p else a1] - points[p]
    v = points[b2 if a2 == p else a2] - points[p]
    cross = abs(u[0] * v[1] - u[1] * v[0])
    return cross <= 1e-9 * np.linalg.norm(u) * np.linalg.norm(v) and np.dot(u, v) < 0


def _distance_to_segments(xy: np.ndarray, a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """(n, m) distances from n points to m segments a-b."""
    d = b - a
    t = np.einsum("nmk,mk->nm", xy[:, None, :] - a[None], d) / np.maximum(
        np.einsum("mk,mk->m", d, d), 1e-300)
    t = np.clip(t, 0.0, 1.0)
    foot = a[None] + t[..., None] * d[None]
    return np.linalg.norm(xy[:, None, :] - foot, axis=2)


def local_feature_size(points, seg_array, xy, own: np.ndarray) -> np.ndarray:
    """Distance from each xy to the nearest segment sharing no point with ``own`` (n, 2) ends.

    Few points and segments: every distance. Many: only the segments whose boxes reach within
    an upper bound of the answer (the nearest non-touching segment among those of the
    NEAREST_SEGMENTS nearest midpoints), found with an STRtree, so the work grows with the
    points near each one, not with all of them; the distances are the same numbers."""
    if len(xy) * len(seg_array) <= BRUTE_FORCE_PAIRS or len(seg_array) <= NEAREST_SEGMENTS:
        return _local_feature_size_all(points, seg_array, xy, own)
    return _local_feature_size_indexed(points, seg_array, xy, own)


def _local_feature_size_all(points, seg_array, xy, own: np.ndarray) -> np.ndarray:
    out = np.empty(len(xy))
    a, b = points[seg_array[:, 0]], points[seg_array[:, 1]]
    for start in range(0, len(xy), 512):
        stop = min(start + 512, len(xy))
        dist = _distance_to_segments(xy[start:stop], a, b)
        ends = own[start:stop]
        touches = np.zeros(dist.shape, bool)
        for column in range(ends.shape[1]):
            e = ends[:, column][:, None]
            touches |= (seg_array[None, :, 0] == e) | (seg_array[None, :, 1] == e)
        dist[touches] = np.inf
        out[start:stop] = dist.min(axis=1)
    return out


def _pair_distances(xy, a, b, seg_array, own, row, seg) -> np.ndarray:
    """Distance of point ``row[k]`` to segment ``seg[k]`` (inf where they touch), in the
    arithmetic of ``_distance_to_segments``."""
    p, a, d = xy[row], a[seg], b[seg] - a[seg]
    t = np.einsum("nk,nk->n", p - a, d) / np.maximum(np.einsum("nk,nk->n", d, d), 1e-300)
    t = np.clip(t, 0.0, 1.0)
    dist = np.linalg.norm(p - (a + t[:, None] * d), axis=1)
    ends = seg_array[seg]
    for column in range(own.shape[1]):
        e = own[row, column]
        dist[(ends[:, 0] == e) | (ends[:, 1] == e)] = np.inf
    return dist


def _local_feature_size_indexed(points, seg_array, xy, own: np.ndarray) -> np.ndarray:
    import shapely
    from scipy.spatial import cKDTree

    a, b = points[seg_array[:, 0]], points[seg_array[:, 1]]
    k = min(NEAREST_SEGMENTS, len(seg_array))
    _, near = cKDTree(0.5 * (a + b)).query(xy, k=k)
    near = near.reshape(len(xy), k)
    row = np.repeat(np.arange(len(xy)), k)
    bound = np.full(len(xy), np.inf)
    np.minimum.at(bound, row, _pair_distances(xy, a, b, seg_array, own, row, near.ravel()))
    out = np.full(len(xy), np.inf)
    unbounded = ~np.isfinite(bound)
    if unbounded.any():  # every nearby segment touches: all of them, for these few
        out[unbounded] = _local_feature_size_all(points, seg_array, xy[unbounded],
                                                 own[unbounded])
    tree = shapely.STRtree(shapely.linestrings(np.stack([a, b], axis=1)))
    rows = np.flatnonzero(~unbounded)
    for start in range(0, len(rows), 8192):
        chunk = rows[start:start + 8192]
        reach = bound[chunk] * (1 + 1e-9) + 1e-300
        x, y = xy[chunk, 0], xy[chunk, 1]
        boxes = shapely.box(x - reach, y - reach, x + reach, y + reach)
        index, seg = tree.query(boxes)  # segments whose boxes meet the point's box
        np.minimum.at(out, chunk[index],
                      _pair_distances(xy, a, b, seg_array, own, chunk[index], seg))
    return out


def plan(classified: Classified, factor: float = 1.0) -> SegmentPlan:
    """Discretise every segment for a level whose sizes are the level-0 sizes / factor
    (the whole size function scales, growth included, so nodes grow as factor²), except at
    junction vertices, where sizes shrink as factor^VERTEX_POWER: singular corners need ever
    stronger grading, at a cost that grows only with the logarithm of the size ratio.

    Kept on ``classified`` per factor: the node estimate and the first level ask for the same
    plan (it is only read afterwards)."""
    cache = vars(classified).setdefault("_plans", {})
    if factor not in cache:
        cache[factor] = _plan(classified, factor)
    return cache[factor]


def _plan(classified: Classified, factor: float) -> SegmentPlan:
    part = classified.partition
    extent = part.extent
    h_max, h_junction = H_MAX * extent, H_JUNCTION * extent
    segments = list(part.segments())
    seg_array = np.array(segments, int)
    junctions = junction_vertices(classified)
    vertex_xy = part.points[junctions]
    lfs_vertex = local_feature_size(part.points, seg_array, vertex_xy,
                                    np.column_stack([junctions, junctions]))
    vertex_size = np.minimum(h_junction, 0.5 * lfs_vertex) / factor ** VERTEX_POWER
    vertices = JunctionIndex(vertex_xy)
    growth = GROWTH / factor
    inner = _discretise(part.points, seg_array, vertices, vertex_size, h_max / factor, growth,
                        factor)
    result = SegmentPlan(inner, np.empty(0), h_max / factor, junctions)
    result._vertices, result._vertex_size, result._growth = vertices, vertex_size, growth
    result.point_size = result.size_at(part.points)
    return result


def _discretise(points, seg_array, vertices, vertex_size, h_max, growth, factor) -> dict:
    t = np.linspace(0.0, 1.0, SAMPLES)
    a, b = points[seg_array[:, 0]], points[seg_array[:, 1]]
    xy = (a[:, None, :] + t[None, :, None] * (b - a)[:, None, :]).reshape(-1, 2)
    own = np.repeat(seg_array, SAMPLES, axis=0)
    h = _graded(xy, vertices, vertex_size, h_max, growth)
    lfs = local_feature_size(points, seg_array, xy, own)
    h = np.minimum(h, THIN_ASPECT * lfs / factor).reshape(len(seg_array), SAMPLES)
    length = np.linalg.norm(b - a, axis=1)
    inner = {}
    for k, seg in enumerate(map(tuple, seg_array)):
        density = length[k] / h[k]
        cumulative = np.concatenate([[0.0], np.cumsum(0.5 * (density[1:] + density[:-1]) *
                                                      np.diff(t))])
        n = max(1, int(round(cumulative[-1])))
        s = np.interp(np.arange(1, n) * cumulative[-1] / n, cumulative, t)
        inner[seg] = a[k] + s[:, None] * (b[k] - a[k])
    return inner
