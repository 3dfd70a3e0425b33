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
from scipy.spatial import cKDTree

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
        return _graded(xy, self._tree, self._vertex_size, self.h_max, self._growth)


def _graded(xy, tree, vertex_size, h_max, growth) -> np.ndarray:
    k = min(8, len(vertex_size))
    dist, idx = tree.query(xy, k=k)
    dist, idx = dist.reshape(len(xy), k), idx.reshape(len(xy), k)
    return np.minimum(h_max, np.min(vertex_size[idx] + growth * dist, axis=1))


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
    """Distance from each xy to the nearest segment sharing no point with ``own`` (n, 2) ends."""
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


def plan(classified: Classified, factor: float = 1.0) -> SegmentPlan:
    """Discretise every segment for a level whose sizes are the level-0 sizes / factor
    (the whole size function scales, growth included, so nodes grow as factor²), except at
    junction vertices, where sizes shrink as factor^VERTEX_POWER: singular corners need ever
    stronger grading, at a cost that grows only with the logarithm of the size ratio."""
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
    tree = cKDTree(vertex_xy)
    growth = GROWTH / factor
    inner = _discretise(part.points, seg_array, tree, vertex_size, h_max / factor, growth, factor)
    result = SegmentPlan(inner, np.empty(0), h_max / factor, junctions)
    result._tree, result._vertex_size, result._growth = tree, vertex_size, growth
    result.point_size = result.size_at(part.points)
    return result


def _discretise(points, seg_array, tree, vertex_size, h_max, growth, factor) -> dict:
    t = np.linspace(0.0, 1.0, SAMPLES)
    a, b = points[seg_array[:, 0]], points[seg_array[:, 1]]
    xy = (a[:, None, :] + t[None, :, None] * (b - a)[:, None, :]).reshape(-1, 2)
    own = np.repeat(seg_array, SAMPLES, axis=0)
    h = _graded(xy, tree, vertex_size, h_max, growth)
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
