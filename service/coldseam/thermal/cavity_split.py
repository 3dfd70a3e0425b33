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
from shapely.geometry import LineString, Polygon

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
    k = 0
    while k < len(partition.faces) and cuts < MAX_CUTS:
        face = partition.faces[k]
        if face.material in kinds:
            chord = _neck_chord(_polygon(partition, face))
            if chord is not None and _cut(partition, k, chord):
                cuts += 1
                continue  # look at the same face again: it may have more necks
        k += 1
    if cuts:
        log.debug("cavities: %d cut(s) at narrowings below %.1f mm", cuts, SLIT * 1e3)
    return cuts


def _polygon(partition: Partition, face: Face) -> Polygon:
    rings = [partition.points[r] for r in face.rings]
    return Polygon(rings[0], rings[1:])


def _neck_chord(polygon: Polygon) -> LineString | None:
    """The narrowest chord across one neck narrower than SLIT, or None if there is none."""
    cores = [p for p in shapely.get_parts(polygon.buffer(-SLIT / 2)) if p.area > 0]
    if len(cores) < 2:
        return None
    opened = shapely.union_all([c.buffer(SLIT / 2 * 1.001) for c in cores])
    necks = shapely.get_parts(shapely.difference(polygon, opened))
    for neck in sorted(necks, key=lambda g: -g.area):
        touching = sum(1 for c in cores if neck.distance(c) < SLIT * 0.51)
        if touching < 2:
            continue
        walls = sorted(shapely.get_parts(shapely.line_merge(
            shapely.intersection(polygon.exterior, neck.buffer(SLIT * 1e-3)))),
            key=lambda w: -w.length)
        if len(walls) >= 2:
            chord = shapely.shortest_line(walls[0], walls[1])
            if chord.length <= SLIT * 1.01:
                return chord
    return None


def _cut(partition: Partition, k: int, chord: LineString) -> bool:
    """Split face k along the chord (both ends on its outer ring); False if it cannot."""
    tol = TOLERANCE * partition.extent
    ends = []
    for xy in np.asarray(chord.coords, float):
        xy = _snap(partition, partition.faces[k].rings[0], xy, 0.1 * SLIT)
        index = _split_at(partition, xy, tol)
        if index is None:
            return False
        ends.append(index)
    ring = partition.faces[k].rings[0]
    if ends[0] == ends[1] or ends[0] not in ring or ends[1] not in ring:
        return False
    i, j = sorted((ring.index(ends[0]), ring.index(ends[1])))
    if j - i < 2 or len(ring) - (j - i) < 2:
        return False  # the chord runs along an edge: nothing to cut
    first, second = ring[i:j + 1], ring[j:] + ring[:i + 1]
    holes = partition.faces[k].rings[1:]
    material = partition.faces[k].material
    shapes = [Polygon(partition.points[r]) for r in (first, second)]
    parts = [Face(material, [first]), Face(material, [second])]
    for hole in holes:
        inside = shapely.points(partition.points[hole[0]])
        parts[0 if shapes[0].covers(inside) else 1].rings.append(hole)
    partition.faces[k] = parts[0]
    partition.faces.append(parts[1])
    return True


def _snap(partition: Partition, ring: list[int], xy: np.ndarray, reach: float) -> np.ndarray:
    """A ring vertex within ``reach`` of xy, else xy: no needless tiny edges."""
    pts = partition.points[ring]
    distance = np.linalg.norm(pts - xy, axis=1)
    nearest = int(np.argmin(distance))
    return pts[nearest].copy() if distance[nearest] <= reach else xy
