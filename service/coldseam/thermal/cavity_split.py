"""Split a cavity where it narrows below the slit limit of ISO 10077-2.

Cavities connected only through a slit of ``SLIT`` (2 mm) or less are separate cavities
[recalled from memory, ISO 10077-2]. A cavity face is eroded by half the slit: where the
erosion falls apart, the face narrows below the slit, and it is cut along the narrowest chord
of each such neck. The cut is a new edge of the planar partition, shared by the two parts; the
points it ends on are inserted into the neighbouring solid faces too, so the partition stays
conforming. Runs on the partition before the outline is classified.
"""

from __future__ import annotations

import logging

import numpy as np
import shapely
from shapely.geometry import LineString, MultiLineString, Polygon
from shapely.ops import split

from coldseam.geometry.outline import TOLERANCE, _split_at
from coldseam.geometry.partition import Face, Partition

log = logging.getLogger(__name__)

#: Slit width, m, at or below which two cavities count as separate [recalled from memory,
#: ISO 10077-2: cavities joined by a slit of at most 2 mm are treated as separate].
SLIT = 0.002
#: No section needs more cuts than this; it bounds the work on a pathological outline.
MAX_CUTS = 500


def split_narrowings(partition: Partition, kinds: set[int]) -> int:
    """Cut every cavity face (material in ``kinds``) at its necks; the number of cuts made."""
    cuts = 0
    for k in range(len(partition.faces)):
        face = partition.faces[k]
        if face.material not in kinds:
            continue
        chords = _neck_chords(_polygon(partition, face))[:MAX_CUTS - cuts]
        if chords:
            cuts += _cut(partition, k, chords)
    if cuts:
        log.debug("cavities: %d cut(s) at narrowings below %.1f mm", cuts, SLIT * 1e3)
    return cuts


def _polygon(partition: Partition, face: Face) -> Polygon:
    rings = [partition.points[r] for r in face.rings]
    return Polygon(rings[0], rings[1:])


def _neck_chords(polygon: Polygon) -> list[LineString]:
    """The narrowest chord across each neck narrower than SLIT (none if there is no neck)."""
    cores = [p for p in shapely.get_parts(polygon.buffer(-SLIT / 2)) if p.area > 0]
    if len(cores) < 2:
        return []
    opened = shapely.union_all([c.buffer(SLIT / 2 * 1.001) for c in cores])
    chords = []
    for neck in shapely.get_parts(shapely.difference(polygon, opened)):
        if sum(1 for c in cores if neck.distance(c) < SLIT * 0.51) < 2:
            continue  # a corner or a dead end, not a passage between two chambers
        walls = sorted(shapely.get_parts(shapely.line_merge(
            shapely.intersection(polygon.boundary, neck.buffer(SLIT * 1e-3)))),
            key=lambda w: -w.length)
        if len(walls) >= 2:
            chord = shapely.shortest_line(walls[0], walls[1])
            if 0 < chord.length <= SLIT * 1.01:
                chords.append(chord)
    return chords


def _cut(partition: Partition, k: int, chords: list[LineString]) -> int:
    """Split face k along the chords; the number of chords used (0 if it cannot be split)."""
    tol = TOLERANCE * partition.extent
    used = []
    for chord in chords:
        ends = [_snap(partition, partition.faces[k].rings, xy, 0.1 * SLIT)
                for xy in np.asarray(chord.coords, float)]
        indices = [_split_at(partition, xy, tol) for xy in ends]
        if None not in indices and indices[0] != indices[1]:
            used.append(partition.points[indices])
    if not used:
        return 0
    polygon = _polygon(partition, partition.faces[k])
    blades = [[tuple(a), tuple(b)] for a, b in used]  # ends are ring points: exact
    parts = [p for p in shapely.get_parts(split(polygon, MultiLineString(blades))) if p.area > 0]
    faces = [_face(partition, partition.faces[k].material, p, tol) for p in parts]
    if len(faces) < 2 or None in faces:
        return 0
    partition.faces[k] = faces[0]
    partition.faces.extend(faces[1:])
    return len(used)


def _face(partition: Partition, material: int, polygon: Polygon, tol: float) -> Face | None:
    """The polygon as a face on the partition's points (None if a corner is not a point)."""
    polygon = shapely.geometry.polygon.orient(polygon, sign=1.0)
    rings = []
    for ring in [polygon.exterior, *polygon.interiors]:
        xy = np.asarray(ring.coords, float)[:-1]
        distance = np.linalg.norm(partition.points[None, :, :] - xy[:, None, :], axis=2)
        nearest = distance.argmin(axis=1)
        if np.any(distance[np.arange(len(xy)), nearest] > tol):
            return None
        indices = [int(i) for n, i in enumerate(nearest) if n == 0 or i != nearest[n - 1]]
        if len(indices) > 1 and indices[0] == indices[-1]:
            indices.pop()
        rings.append(indices)
    return Face(material, rings)


def _snap(partition: Partition, rings: list[list[int]], xy: np.ndarray,
          reach: float) -> np.ndarray:
    """A ring vertex within ``reach`` of xy, else xy: no needless tiny edges."""
    pts = partition.points[[i for ring in rings for i in ring]]
    distance = np.linalg.norm(pts - xy, axis=1)
    nearest = int(np.argmin(distance))
    return pts[nearest].copy() if distance[nearest] <= reach else xy
