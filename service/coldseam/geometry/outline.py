"""Classify the outline of a partition: exposed to which boundary, or adiabatic.

Boundary paths and probes split outline segments where they start, end or sit, so that every
segment is wholly exposed or wholly adiabatic. A segment is exposed to a boundary when both ends
and its midpoint lie within ``TOLERANCE × extent`` of the path; a later boundary wins.
"""

from __future__ import annotations

import bisect
from dataclasses import dataclass

import numpy as np
import shapely
from shapely.geometry import LineString, Point

from coldseam.errors import InvalidSection
from coldseam.geometry.partition import Partition, where
from coldseam.schema.section import Section

TOLERANCE = 1e-5


@dataclass
class Classified:
    partition: Partition
    exposure: dict[tuple[int, int], int]  # outline segment -> boundary index
    adiabatic: list[tuple[int, int]]
    probe_points: list[int | None]  # point index of a probe on a vertex/edge, else None
    probe_faces: list[int | None]  # face index containing an interior probe
    probe_xy: np.ndarray  # (K, 2) probe coordinates, metres
    symmetry: set[tuple[int, int]]  # adiabatic segments on a declared symmetry line


def classify(section: Section, partition: Partition) -> Classified:
    tol = TOLERANCE * partition.extent
    paths = [LineString(np.asarray(b.path, float) * section.scale) for b in section.boundaries]
    index = RingIndex(partition)
    for path in paths + [LineString(np.asarray(line, float) * section.scale)
                         for line in section.symmetry_lines]:
        for x, y in path.coords:
            _split_at(partition, np.array([x, y]), tol, index)
    probe_points, probe_faces = _place_probes(section, partition, tol, index)
    segments = partition.segments()
    outline = [s for s, faces in segments.items() if len(faces) == 1]
    exposure = _match_paths(section, partition, outline, paths, tol)
    _check_connected(section, partition, segments, exposure)
    adiabatic = [s for s in outline if s not in exposure]
    probe_xy = np.array([p.point for p in section.probes], float).reshape(-1, 2) * section.scale
    symmetry = _on_lines(partition, adiabatic, [LineString(np.asarray(line, float) * section.scale)
                                                for line in section.symmetry_lines], tol)
    return Classified(partition, exposure, adiabatic, probe_points, probe_faces, probe_xy,
                      symmetry)


def _on_lines(partition, segments, lines, tol) -> set[tuple[int, int]]:
    if not segments or not lines:
        return set()
    pts = partition.points
    ends = np.asarray(segments)
    a, c = pts[ends[:, 0]], pts[ends[:, 1]]
    probes = shapely.points(np.concatenate([a, c, 0.5 * (a + c)]))
    on = np.zeros(len(segments), bool)
    for line in lines:
        on |= _near_line(line, probes, tol).reshape(3, -1).all(axis=0)
    return {segments[k] for k in np.flatnonzero(on)}


def _near_line(line: LineString, points: np.ndarray, tol: float) -> np.ndarray:
    """distance(line, point) <= tol for each of ``points``, through an STRtree of the line's
    pieces: the distance to a line is the least distance to one of its pieces, so this is the
    same test, in time that grows with the points near each piece, not with all pairs."""
    xy = np.asarray(line.coords)
    if len(xy) < 3:
        return shapely.distance(line, points) <= tol
    pieces = shapely.linestrings(np.stack([xy[:-1], xy[1:]], axis=1))
    hit = shapely.STRtree(pieces).query(points, predicate="dwithin", distance=tol)[0]
    out = np.zeros(len(points), bool)
    out[hit] = True
    return out


def _split_at(partition: Partition, p: np.ndarray, tol: float,
              index: RingIndex | None = None) -> int | None:
    """Insert point p into every ring segment it lies on (within tol); its index, if on one.

    Without ``index``: vectorised over all segments (numpy), a pass over the outline per
    point. With one (``classify``, for paths of many points): only the points and segments
    near p are looked at, with the same tests, so the outcome is the same."""
    if index is not None:
        return index.split_at(p, tol)
    pts = partition.points
    near = np.flatnonzero(np.linalg.norm(pts - p, axis=1) <= tol)
    if len(near):
        return int(near[0])
    hits = _segments_through(partition, p, tol)
    if not hits:
        return None
    partition.points = np.vstack([pts, p])
    new_index = len(partition.points) - 1
    for face, ring, k in hits:
        partition.faces[face].rings[ring].insert(k + 1, new_index)
    partition.__dict__.pop("_segment_table", None)  # the rings changed
    return new_index


class RingIndex:
    """The points and ring segments of a partition, indexed for ``_split_at`` while points
    are inserted (valid only while nothing else changes the rings).

    Points: a k-d tree of those there were at the start or at the last rebuild, and the few
    added since, looked through in full. Segments: an STRtree of the ring segments there were
    at the start; each keeps the chain of points it has been split into, with their positions
    along it, and the index how far inserted points stray from their segments, so that the
    pieces p may lie on (within tol) are found from the segments within tol plus that reach,
    and along each from the positions within the same reach of p's. The tests on them are
    those of ``_segments_through``, so the outcome is the same as looking at every segment."""

    REBUILD = 256  # points added before the k-d tree is rebuilt
    TREE_POINTS = 512

    def __init__(self, partition: Partition) -> None:
        self.partition = partition
        self._tree_points()
        self.where: list[tuple[int, int]] = []  # per original segment: face, ring
        self.chain: list[list[int]] = []  # its points from start to end
        self.along: list[list[float]] = []  # their positions along it (0 to 1)
        self.ordered: list[bool] = []  # positions increasing along the chain
        starts, ends = [], []
        for f, face in enumerate(partition.faces):
            for r, ring in enumerate(face.rings):
                for a, b in zip(ring, ring[1:] + ring[:1], strict=True):
                    self.where.append((f, r))
                    self.chain.append([a, b])
                    self.along.append([0.0, 1.0])
                    self.ordered.append(True)
                    starts.append(a)
                    ends.append(b)
        pts = partition.points
        self.original = np.column_stack([starts, ends]).reshape(-1, 2)
        self.tree = shapely.STRtree(shapely.linestrings(
            np.stack([pts[self.original[:, 0]], pts[self.original[:, 1]]], axis=1))) \
            if len(starts) else None
        self.reach = 0.0  # farthest an inserted point lies from its original segment

    def _tree_points(self) -> None:
        """A k-d tree of the points, once there are TREE_POINTS (fewer are all looked at,
        which spares a small section the import of scipy.spatial)."""
        if len(self.partition.points) < self.TREE_POINTS:
            self.indexed, self.points_tree = 0, None
            return
        from scipy.spatial import cKDTree

        self.indexed = len(self.partition.points)
        self.points_tree = cKDTree(self.partition.points)

    def _near_point(self, p: np.ndarray, tol: float) -> int | None:
        pts = self.partition.points
        found = [] if self.points_tree is None else self.points_tree.query_ball_point(
            p, tol * (1 + 1e-9) + 1e-300)
        candidates = np.array(sorted(found) + list(range(self.indexed, len(pts))), int)
        if not len(candidates):
            return None
        near = candidates[np.linalg.norm(pts[candidates] - p, axis=1) <= tol]
        return int(near.min()) if len(near) else None

    def _position(self, original: int, p: np.ndarray) -> tuple[float, float]:
        """Position of p's projection along an original segment (0 at its start, 1 at its
        end), and the position change a distance of 1 makes."""
        pts = self.partition.points
        a, b = pts[self.original[original, 0]], pts[self.original[original, 1]]
        d = b - a
        length2 = float(d @ d)
        if not length2 > 0:
            return 0.0, np.inf
        return float((p - a) @ d) / length2, 1 / np.sqrt(length2)

    def split_at(self, p: np.ndarray, tol: float) -> int | None:
        near = self._near_point(p, tol)
        if near is not None:
            return near
        hits = self._segments_through(p, tol)
        if not hits:
            return None
        partition = self.partition
        partition.points = np.vstack([partition.points, p])
        new_index = len(partition.points) - 1
        for original, piece, k in hits:
            f, r = self.where[original]
            partition.faces[f].rings[r].insert(k + 1, new_index)
            position = self._position(original, p)[0]
            along = self.along[original]
            self.chain[original].insert(piece + 1, new_index)
            along.insert(piece + 1, position)
            if not along[piece] <= position <= along[piece + 2]:
                self.ordered[original] = False
            stray = float(shapely.distance(shapely.points(p), self.tree.geometries[original]))
            self.reach = max(self.reach, stray)
        partition.__dict__.pop("_segment_table", None)  # the rings changed
        if len(partition.points) - self.indexed > self.REBUILD:
            self._tree_points()
        return new_index

    def _pieces_near(self, original: int, p: np.ndarray, reach: float) -> range:
        """The pieces of an original segment p may lie on: all of them, or (positions in
        order) those whose ends' positions come within ``reach`` of p's."""
        along = self.along[original]
        if not self.ordered[original] or len(along) < 8:
            return range(len(along) - 1)
        position, per_length = self._position(original, p)
        margin = reach * per_length * (1 + 1e-9) + 1e-12
        low = max(bisect.bisect_left(along, position - margin) - 1, 0)
        high = min(bisect.bisect_right(along, position + margin), len(along) - 1)
        return range(low, high)

    def _segments_through(self, p: np.ndarray, tol: float) -> list:
        """(original, piece, k) of the first piece (ring position k) of each ring that p lies
        on, inside it: the test of ``_segments_through`` on the pieces near p."""
        if self.tree is None:
            return []
        reach = (tol + self.reach) * (1 + 1e-9) + 1e-300
        originals = self.tree.query(shapely.points(p), predicate="dwithin", distance=reach)
        found = [(int(o), i) for o in originals for i in self._pieces_near(int(o), p, reach)]
        if not found:
            return []
        pts = self.partition.points
        ends = np.array([self.chain[o][i:i + 2] for o, i in found], int)
        on = _within_segments(p, pts[ends[:, 0]], pts[ends[:, 1]], tol)
        first: dict[tuple[int, int], tuple[int, int, int]] = {}
        for row in on:
            original, piece = found[row]
            f, r = self.where[original]
            k = self.partition.faces[f].rings[r].index(int(ends[row, 0]))
            if (f, r) not in first or k < first[(f, r)][2]:
                first[(f, r)] = (original, piece, k)
        return [first[key] for key in sorted(first)]


def _within_segments(p: np.ndarray, a: np.ndarray, b: np.ndarray, tol: float) -> np.ndarray:
    """Rows of the segments a→b (S, 2) that p lies on within ``tol``, strictly between the
    ends."""
    d = b - a
    length2 = np.einsum("ij,ij->i", d, d)
    with np.errstate(divide="ignore", invalid="ignore"):
        t = np.einsum("ij,ij->i", p - a, d) / length2
    inside = (t > 0) & (t < 1)
    foot = a + np.where(inside, t, 0.0)[:, None] * d
    return np.flatnonzero(inside & (np.linalg.norm(foot - p, axis=1) <= tol))


def _segments_through(partition: Partition, p: np.ndarray, tol: float) -> list:
    """(face, ring, k) of the first segment k of each ring that p lies on, inside it."""
    ids, a, b = _segment_table(partition)
    if not len(ids):
        return []
    on = _within_segments(p, a, b, tol)
    first: dict[tuple[int, int], int] = {}
    for row in on:
        face, ring, k = (int(v) for v in ids[row])
        first.setdefault((face, ring), k)
    return [(face, ring, k) for (face, ring), k in first.items()]


def _segment_table(partition: Partition) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Every ring segment as (face, ring, k) and its end points; cached until a ring changes."""
    table = partition.__dict__.get("_segment_table")
    if table is None:
        ids, starts, ends = [], [], []
        for f, face in enumerate(partition.faces):
            for r, ring in enumerate(face.rings):
                index = np.asarray(ring)
                ids.append(np.column_stack([np.full(len(ring), f), np.full(len(ring), r),
                                            np.arange(len(ring))]))
                starts.append(index)
                ends.append(np.roll(index, -1))
        if not ids:
            return np.zeros((0, 3), int), np.zeros((0, 2)), np.zeros((0, 2))
        pts = partition.points
        table = (np.vstack(ids), pts[np.concatenate(starts)], pts[np.concatenate(ends)])
        partition.__dict__["_segment_table"] = table
    return table


def _place_probes(section: Section, partition: Partition, tol: float,
                  index: RingIndex | None = None):
    polygons = [shapely.Polygon(partition.points[f.rings[0]],
                                [partition.points[r] for r in f.rings[1:]])
                for f in partition.faces]
    probe_points, probe_faces = [], []
    for i, probe in enumerate(section.probes):
        p = np.asarray(probe.point, float) * section.scale
        point = _split_at(partition, p, tol, index)
        face = None
        if point is None:
            hits = [k for k, poly in enumerate(polygons) if poly.contains(Point(p))]
            if not hits:
                raise InvalidSection(
                    f"probe '{probe.id}' at {where(section, *p)} lies outside the section",
                    f"/section/probes/{i}/point")
            face = hits[0]
        probe_points.append(point)
        probe_faces.append(face)
    return probe_points, probe_faces


def _match_paths(section, partition, outline, paths, tol) -> dict[tuple[int, int], int]:
    pts = partition.points
    exposure: dict[tuple[int, int], int] = {}
    for b, path in enumerate(paths):
        # Distances to the path, never a buffer of it: GEOS buffers a path that doubles back
        # on itself in time and memory far beyond its size (600 points: ~40 s, or a crash).
        # One vectorised distance call per path: both ends and the midpoint of every segment.
        hit = False
        if outline:
            ends = np.asarray(outline)
            a, c = pts[ends[:, 0]], pts[ends[:, 1]]
            probes = shapely.points(np.concatenate([a, c, 0.5 * (a + c)]))
            near = _near_line(path, probes, tol).reshape(3, -1).all(axis=0)
            for k in np.flatnonzero(near):
                exposure[outline[k]] = b
            hit = bool(near.any())
        if not hit:
            _explain_miss(section, partition, outline, b, path)
    return exposure


def _explain_miss(section, partition, outline, b, path) -> None:
    pts = partition.points
    rings = shapely.MultiLineString([[pts[a], pts[c]] for a, c in outline])
    gap = path.distance(rings)
    env = section.boundaries[b].environment
    if gap <= TOLERANCE * partition.extent:
        text = ("touches the section outline only at points, or runs along an interface "
                "between two regions, not along an outer surface")
    else:
        text = f"does not run along the section outline: it stays {gap / section.scale:.4g} " \
               f"{section.unit} away from it"
    raise InvalidSection(f"boundary {b} ({env}): the path {text}",
                         f"/section/boundaries/{b}/path")


def _check_connected(section, partition, segments, exposure) -> None:
    """Every connected group of faces must touch at least one exposed segment."""
    n = len(partition.faces)
    parent = list(range(n))

    def root(k: int) -> int:
        while parent[k] != k:
            parent[k] = parent[parent[k]]
            k = parent[k]
        return k

    for faces in segments.values():
        if len(faces) == 2:
            parent[root(faces[0])] = root(faces[1])
    exposed_roots = {root(segments[s][0]) for s in exposure}
    _check_coupled(section, {(root(segments[s][0]), section.boundaries[b].environment)
                             for s, b in exposure.items()})
    for k in range(n):
        if root(k) not in exposed_roots:
            face = partition.faces[k]
            x, y = partition.points[face.rings[0]].mean(axis=0)
            material = section.materials[face.material].id
            raise InvalidSection(
                f"the part of the section made of {material} near {where(section, x, y)} "
                "touches no exposed boundary: it floats free of the rest, so its temperature "
                "is undefined. Join it to the section or give it a boundary path",
                "/section/regions")


def _check_coupled(section, exposed: set[tuple[int, str]]) -> None:
    """Every environment must share some connected part of the section with another one:
    otherwise no heat can flow to or from it and its heat flow, L2D or Lij mean nothing."""
    if len(section.environments) < 2:
        raise InvalidSection("the section has only one environment: heat flows between two or "
                             "more (add the other side, e.g. an exterior)", "/section/environments")
    parts: dict[int, set[str]] = {}
    for part, env in exposed:
        parts.setdefault(part, set()).add(env)
    coupled = {env for envs in parts.values() if len(envs) > 1 for env in envs}
    for i, env in enumerate(section.environments):
        if env.id not in coupled:
            raise InvalidSection(
                f"environment '{env.id}' is exposed only to parts of the section that touch no "
                "other environment, so no heat can flow between it and the others: join the "
                "parts, or check the boundary paths", f"/section/environments/{i}")
