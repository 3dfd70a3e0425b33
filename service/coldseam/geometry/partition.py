"""Resolve a section's regions into a planar partition of disjoint material faces.

Regions are painted in list order (a later region covers an earlier one). The result is a
planar graph: points (metres), faces as rings of point indices, each face with one material;
every piece of the outline is later classified against the boundary paths (see outline.py).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import shapely
import shapely.errors
from shapely.geometry import MultiLineString, Polygon

from coldseam.errors import InvalidSection
from coldseam.schema.section import Section

#: Coordinates are snapped to a power-of-ten grid near this fraction of the section extent.
GRID = 1e-9
#: Pieces thinner than this fraction of the extent (2·area/perimeter) are slivers.
SLIVER = 1e-5
#: Coordinates at most this many section extents from the origin keep the precision the
#: grid and the mesher need (float64 resolves about 2e-16 of a coordinate).
FAR = 1e5
#: The smallest section taken, in metres: smaller than any building detail (likely a drawing
#: in metres labelled "mm"), and far smaller ones lose the energy balance to rounding.
SMALLEST = 1e-3


@dataclass
class Face:
    material: int
    rings: list[list[int]]  # exterior first (counter-clockwise), then holes


@dataclass
class Partition:
    points: np.ndarray  # (P, 2) metres
    faces: list[Face]
    extent: float  # metres
    scale: float  # metres per section unit
    pieces: list[tuple[int, shapely.Polygon]]  # material index, polygon (metres)

    def segments(self) -> dict[tuple[int, int], list[int]]:
        """Every segment as a sorted point pair, with the faces it borders."""
        out: dict[tuple[int, int], list[int]] = {}
        for index, face in enumerate(self.faces):
            for ring in face.rings:
                for a, b in zip(ring, ring[1:] + ring[:1], strict=True):
                    out.setdefault((min(a, b), max(a, b)), []).append(index)
        return out


def where(section: Section, x: float, y: float) -> str:
    """A point in metres, written in the section unit for messages."""
    s = section.scale
    fmt = "{:.4g}" if section.unit == "m" else "{:.1f}"
    return f"({fmt.format(x / s)}, {fmt.format(y / s)}) {section.unit}"


def region_polygons(section: Section) -> list[Polygon]:
    """Each region as a valid shapely polygon in metres, or InvalidSection saying why not."""
    polygons = []
    for i, region in enumerate(section.regions):
        s = section.scale
        shell = np.asarray(region.polygon, float) * s
        holes = [np.asarray(h, float) * s for h in region.holes]
        pointer = f"/section/regions/{i}"
        for k, hole in enumerate(holes):
            if len(hole) < 3:
                raise InvalidSection(f"region {i} ({region.material}): hole {k} needs at least "
                                     "3 points", f"{pointer}/holes/{k}")
        polygon = Polygon(shell, holes)
        _check_polygon(section, i, polygon, pointer)
        polygons.append(shapely.orient_polygons(polygon) if hasattr(shapely, "orient_polygons")
                        else shapely.geometry.polygon.orient(polygon))
    return polygons


def _check_polygon(section: Section, i: int, polygon: Polygon, pointer: str) -> None:
    label = f"region {i} ({section.regions[i].material})"
    if not polygon.is_valid:
        reason = shapely.is_valid_reason(polygon)
        near = ""
        if "[" in reason:
            x, y = (float(v) for v in reason[reason.index("[") + 1:reason.index("]")].split()[:2])
            near = f" near {where(section, x, y)}"
            reason = reason[:reason.index("[")]
        words = {"Self-intersection": "polygon crosses itself",
                 "Ring Self-intersection": "polygon touches itself",
                 "Hole lies outside shell": "a hole lies outside the polygon",
                 "Interior is disconnected": "holes cut the polygon into separate parts",
                 "Nested holes": "holes are nested", "Too few points": "polygon has too few "
                 "distinct points"}
        text = words.get(reason.strip(), reason.strip().lower())
        raise InvalidSection(f"{label}: {text}{near}", f"{pointer}/polygon")
    if polygon.area <= 0:
        raise InvalidSection(f"{label}: polygon encloses no area", f"{pointer}/polygon")


def paint(section: Section, polygons: list[Polygon], grid: float) -> list[tuple[int, Polygon]]:
    """Painter's order: each region minus everything drawn after it. (region index, part)."""
    materials = {m.id: k for k, m in enumerate(section.materials)}
    pieces: list[tuple[int, Polygon]] = []
    covered = None
    for i in reversed(range(len(polygons))):
        poly = shapely.set_precision(polygons[i], grid)
        visible = poly if covered is None else shapely.difference(poly, covered, grid_size=grid)
        covered = poly if covered is None else shapely.union(covered, poly, grid_size=grid)
        for part in getattr(visible, "geoms", [visible]):
            if isinstance(part, Polygon) and not part.is_empty:
                pieces.append((i, part))
    pieces.reverse()
    return [(materials[section.regions[i].material], part) for i, part in
            _check_slivers(section, pieces)]


def _check_slivers(section: Section, pieces: list[tuple[int, Polygon]]):
    extent = _extent(shapely.union_all([p for _, p in pieces]))
    for i, part in pieces:
        thickness = 2 * part.area / part.length
        if thickness < SLIVER * extent:
            c = part.representative_point()
            raise InvalidSection(
                f"region {i} ({section.regions[i].material}) leaves a sliver only "
                f"{thickness / section.scale:.3g} {section.unit} thin near {where(section, c.x, c.y)}"
                " once overlapping regions are resolved: align the outlines so they meet "
                "exactly, or overlap them clearly", f"/section/regions/{i}/polygon")
    return pieces


def _extent(geometry) -> float:
    x0, y0, x1, y1 = geometry.bounds
    return max(x1 - x0, y1 - y0)


def build_partition(section: Section) -> Partition:
    """Planar partition of the section: shared points, faces with materials, rings."""
    _check_precision(section)
    polygons = region_polygons(section)
    extent = _extent(shapely.union_all(polygons))
    grid = 10.0 ** np.floor(np.log10(GRID * extent))  # a power of ten keeps round inputs exact
    try:
        pieces = paint(section, polygons, grid)
        faces_geo = _noded_faces(pieces, grid)
    except shapely.errors.GEOSException as exc:  # GEOS gave up on the overlaps
        raise InvalidSection(
            f"the overlapping regions could not be resolved into separate pieces "
            f"({str(exc)[:100]}): look for outlines that nearly coincide, or overlap by a "
            "hair", "/section/regions") from None
    tree = shapely.STRtree([p for _, p in pieces])
    points: dict[tuple[float, float], int] = {}
    faces = []
    for face in faces_geo:
        inside = face.representative_point()
        hits = [k for k in tree.query(inside, predicate="intersects")]
        if not hits:
            continue  # a void: part of the outline, not of the solid
        material = pieces[int(hits[0])][0]
        rings = [_ring_indices(r, points, ccw=(n == 0)) for n, r in
                 enumerate([face.exterior, *face.interiors])]
        faces.append(Face(material, rings))
    coords = np.array(sorted(points, key=points.get), float).reshape(-1, 2)
    partition = Partition(coords, faces, extent, section.scale, pieces)
    _check_near_misses(section, partition, polygons)
    return partition


def _check_near_misses(section: Section, partition: Partition, polygons: list[Polygon]) -> None:
    """Refuse a corner closer than ``SLIVER × extent`` to an edge it is not on.

    Such a near miss (a corner a hair off a neighbour's edge, a repeated point a hair from a
    corner) is almost always drawing noise, and the mesh would need elements as small as the
    gap along everything near it: millions of nodes for a gap of 1e-8 of the section.
    """
    pts = partition.points
    segments = np.array(list(partition.segments()), int).reshape(-1, 2)
    if not len(segments):
        return
    tol = SLIVER * partition.extent
    lines = shapely.linestrings(np.stack([pts[segments[:, 0]], pts[segments[:, 1]]], axis=1))
    point_index, segment_index = shapely.STRtree(lines).query(
        shapely.points(pts), predicate="dwithin", distance=tol)
    ends = segments[segment_index]
    apart = (ends[:, 0] != point_index) & (ends[:, 1] != point_index)
    if not apart.any():
        return
    k = int(np.flatnonzero(apart)[0])
    corner, edge = pts[point_index[k]], segment_index[k]
    gap = shapely.distance(shapely.points(corner), lines[edge])
    i = _region_near(polygons, corner, tol)
    raise InvalidSection(
        f"region {i} ({section.regions[i].material}): a point of its outline lies only "
        f"{gap / section.scale:.3g} {section.unit} from an edge it does not meet, near "
        f"{where(section, *corner)}: make the outlines meet exactly, or keep them at least "
        f"{tol / section.scale:.3g} {section.unit} apart", f"/section/regions/{i}/polygon")


def _region_near(polygons: list[Polygon], xy: np.ndarray, tol: float) -> int:
    """The last region whose outline passes within ``tol`` of ``xy`` (the one on top)."""
    point = shapely.points(xy)
    near = [i for i, p in enumerate(polygons) if shapely.distance(p.boundary, point) <= 2 * tol]
    return near[-1] if near else len(polygons) - 1


def _noded_faces(pieces: list[tuple[int, Polygon]], grid: float) -> list[Polygon]:
    """Every face of the arrangement of the pieces' outlines, voids included."""
    lines = [ring for _, p in pieces for ring in [p.exterior, *p.interiors]]
    noded = shapely.union_all(MultiLineString([list(r.coords) for r in lines]), grid_size=grid)
    return list(shapely.get_parts(shapely.polygonize(shapely.get_parts(noded))))


def _check_precision(section: Section) -> None:
    """Refuse a section under SMALLEST across, or drawn so far from the origin that its
    coordinates cannot resolve it."""
    xy = np.array([p for r in section.regions for p in r.polygon], float)
    extent = float(np.max(xy.max(axis=0) - xy.min(axis=0)))
    far = float(np.max(np.abs(xy)))
    if extent * section.scale < SMALLEST:
        raise InvalidSection(
            f"the section is only {extent:.3g} {section.unit} across, smaller than any building "
            f"detail: is the unit right (\"mm\" or \"m\")?", "/section/unit")
    if far > FAR * extent:
        unit = section.unit
        raise InvalidSection(
            f"the section is {extent:.4g} {unit} across but lies {far:.4g} {unit} from the "
            "origin: coordinates that far out cannot resolve it. Move the drawing near (0, 0) "
            f"(within {FAR * extent:.3g} {unit})", "/section/regions")


def _ring_indices(ring, points: dict, ccw: bool) -> list[int]:
    coords = list(ring.coords)[:-1]
    if shapely.LinearRing(coords).is_ccw != ccw:
        coords.reverse()
    return [points.setdefault((float(x), float(y)), len(points)) for x, y in coords]
