"""Model-space entities of a DXF drawing as flat 2D point lists ("shapes").

Blocks (INSERT) are exploded with ezdxf, nested up to a depth limit; entities on layer "0"
inside a block take the layer of the block reference, as in CAD. Arcs, bulges, circles,
ellipses and splines are tessellated with a chord error (sagitta) given in drawing units.
Entity and vertex counts are capped: a drawing over the limits raises LimitExceeded.
"""

from __future__ import annotations

import logging
import math
from collections.abc import Iterator
from dataclasses import dataclass, field

from ezdxf.entities import DXFGraphic, Insert
from ezdxf.lldxf.const import DXFError
from ezdxf.math import OCS, Vec3

from coldseam.errors import LimitExceeded
from coldseam.imports.dxf_curves import (
    arc_entity_points,
    circle_points,
    hatch_loops,
    polyline_points,
)

logger = logging.getLogger(__name__)

Point = tuple[float, float]

_SPLINE_FRAME = 16  # VERTEX flag: control point of a spline-fit polyline's frame
#: Entity types whose geometry becomes a shape; any other type is counted and skipped.
GEOMETRY_TYPES = frozenset(
    {"LINE", "ARC", "CIRCLE", "ELLIPSE", "SPLINE", "LWPOLYLINE", "POLYLINE", "HATCH"}
)


@dataclass(frozen=True)
class DxfLimits:
    """Upper bounds on what one drawing may hold, after exploding blocks."""

    max_entities: int = 20_000
    max_vertices: int = 50_000
    max_block_depth: int = 8


@dataclass(frozen=True)
class Shape:
    """One tessellated piece of geometry on one layer, in drawing units.

    ``closed`` shapes list each vertex once (the closing edge is implicit); ``index`` is the
    position in drawing (redraw) order, which decides precedence between regions.
    """

    layer: str
    kind: str
    points: tuple[Point, ...]
    closed: bool
    index: int


@dataclass
class _Budget:
    limits: DxfLimits
    entities: int = 0
    vertices: int = 0
    skipped: dict[tuple[str, str], int] = field(default_factory=dict)

    def count_entity(self, n: int = 1) -> None:
        self.entities += n
        if self.entities > self.limits.max_entities:
            raise LimitExceeded(
                f"the drawing holds more than {self.limits.max_entities} entities (after "
                "exploding blocks); purge unused geometry or export only the junction detail",
                "/file",
            )

    def count_vertices(self, n: int) -> None:
        self.vertices += n
        if self.vertices > self.limits.max_vertices:
            raise LimitExceeded(
                f"the drawing tessellates to more than {self.limits.max_vertices} vertices; "
                "simplify curves or export only the junction detail",
                "/file",
            )


def clean_text(text: str) -> str:
    """A name with undecodable bytes (kept as surrogates by ezdxf) replaced by '?'."""
    return text.encode("utf-8", "replace").decode("utf-8")


def iter_layer_entities(
    entities: Iterator[DXFGraphic], budget: _Budget, layer: str | None = None, depth: int = 0
) -> Iterator[tuple[str, DXFGraphic]]:
    """(effective layer, entity) in drawing order, with block references exploded."""
    for entity in entities:
        budget.count_entity()
        own = _layer_of(entity)
        effective = layer if (layer is not None and own == "0") else own
        if isinstance(entity, Insert):
            yield from _explode(entity, budget, effective, depth)
        else:
            yield effective, entity


def _layer_of(entity: DXFGraphic) -> str:
    try:
        return clean_text(entity.dxf.get("layer", "0"))
    except DXFError:  # an entity of an unknown type has no layer attribute
        return "0"


def _explode(insert: Insert, budget: _Budget, layer: str, depth: int) -> Iterator[tuple[str, DXFGraphic]]:
    if depth >= budget.limits.max_block_depth:
        raise LimitExceeded(
            f"block '{clean_text(insert.dxf.name)}' is nested more than "
            f"{budget.limits.max_block_depth} levels deep (or refers to itself)",
            "/file",
        )
    block = insert.block()
    size = len(block) if block is not None else 0
    if insert.mcount * size > budget.limits.max_entities:
        budget.count_entity(insert.mcount * size)  # raises: refuse before exploding
    for reference in insert.multi_insert():
        virtual = reference.virtual_entities(redraw_order=True)
        yield from iter_layer_entities(virtual, budget, layer, depth + 1)


def shapes_of(entity: DXFGraphic, layer: str, index: int, chord: float, budget: _Budget) -> list[Shape]:
    """The shapes of one entity; an empty list for an entity that carries no geometry."""
    kind = entity.dxftype()
    if kind not in GEOMETRY_TYPES or not _in_drawing_plane(entity):
        key = (layer, kind if kind not in GEOMETRY_TYPES else f"{kind} out of the drawing plane")
        budget.skipped[key] = budget.skipped.get(key, 0) + 1
        return []
    if kind in ("ELLIPSE", "SPLINE"):
        chord = curve_chord(entity, kind, chord, budget)
    shapes = [
        Shape(layer, kind, points, closed, index)
        for points, closed in _flatten(entity, kind, chord)
        if len(points) >= 2
    ]
    if not all(math.isfinite(c) for s in shapes for p in s.points for c in p):
        raise ValueError("a coordinate is not a finite number")
    budget.count_vertices(sum(len(s.points) for s in shapes))
    return shapes


#: Chord error of ellipses and splines relaxed to this share of their size (as for circles).
CURVE_SHARE = 2e-4
#: ezdxf's flattening makes at least this many segments per ellipse or spline span.
SEGMENTS = 16


def curve_chord(entity: DXFGraphic, kind: str, chord: float, budget: _Budget) -> float:
    """The chord error to flatten an ellipse or spline with: at least CURVE_SHARE of its
    size, so that a huge curve stays a few hundred points; LimitExceeded when even so its
    estimated points (counted before flattening) would pass the drawing's vertex limit."""
    size, spans = _curve_size(entity, kind)
    if not math.isfinite(size):
        raise ValueError(f"a {kind.lower()} has a coordinate that is not a finite number")
    relaxed = max(chord, CURVE_SHARE * size)
    # a curve of size a flattened to sagitta s: about sqrt(π a / s) points over its length
    estimate = SEGMENTS * spans + (math.sqrt(math.pi * size / relaxed) if relaxed > 0 else 0)
    if budget.vertices + estimate > budget.limits.max_vertices:
        raise LimitExceeded(
            f"a {kind.lower()} of the drawing would tessellate to about {estimate:.0f} "
            f"vertices (estimated before flattening), past the limit of "
            f"{budget.limits.max_vertices}; simplify it or export only the junction detail",
            "/file")
    return relaxed


def _curve_size(entity: DXFGraphic, kind: str) -> tuple[float, int]:
    """(largest extent in drawing units, spans) of an ellipse or spline."""
    if kind == "ELLIPSE":
        return 2 * Vec3(entity.dxf.major_axis).magnitude, 4
    points = list(entity.control_points) or list(entity.fit_points)
    if not points:
        return 0.0, 1
    xs, ys = [p[0] for p in points], [p[1] for p in points]
    size = max(max(xs) - min(xs), max(ys) - min(ys))
    return size, max(1, len(points) - int(entity.dxf.get("degree", 3)))


def _in_drawing_plane(entity: DXFGraphic) -> bool:
    extrusion = entity.dxf.get("extrusion", None)
    if extrusion is None:
        return True
    x, y, z = Vec3(extrusion)
    return abs(x) < 1e-9 and abs(y) < 1e-9 and abs(z) > 0


def _flatten(entity: DXFGraphic, kind: str, chord: float) -> list[tuple[tuple[Point, ...], bool]]:
    if kind == "LINE":
        return [(_xy([entity.dxf.start, entity.dxf.end]), False)]
    if kind in ("ARC", "CIRCLE"):
        centre, radius = Vec3(entity.dxf.center), entity.dxf.radius
        if kind == "CIRCLE":
            points = circle_points(centre.x, centre.y, radius, chord)
        else:
            points = arc_entity_points(centre.x, centre.y, radius, entity.dxf.start_angle,
                                       entity.dxf.end_angle, chord)
        return [(_to_wcs(entity.ocs(), points, centre.z), kind == "CIRCLE")]
    if kind in ("ELLIPSE", "SPLINE"):
        return [_closed_or_open(_xy(entity.flattening(chord, segments=16)))]
    if kind == "LWPOLYLINE":
        vertices = [(x, y, b) for x, y, b in entity.get_points("xyb")]
        points = polyline_points(vertices, entity.closed, chord)
        return [_shape(_to_wcs(entity.ocs(), points, entity.dxf.elevation), entity.closed)]
    if kind == "POLYLINE":
        return _old_polyline(entity, chord)
    ocs_loops, wcs_loops = hatch_loops(entity, chord)
    elevation = Vec3(entity.dxf.get("elevation", (0, 0, 0))).z
    return ([(_to_wcs(entity.ocs(), loop, elevation), True) for loop in ocs_loops]
            + [(_xy(loop), True) for loop in wcs_loops])


def _old_polyline(entity: DXFGraphic, chord: float) -> list[tuple[tuple[Point, ...], bool]]:
    if entity.is_2d_polyline:
        vertices = [(v.dxf.location.x, v.dxf.location.y, v.dxf.get("bulge", 0.0))
                    for v in entity.vertices
                    if not v.dxf.get("flags", 0) & _SPLINE_FRAME]  # frame points lie off the curve
        elevation = Vec3(entity.dxf.get("elevation", (0, 0, 0))).z
        points = polyline_points(vertices, entity.is_closed, chord)
        return [_shape(_to_wcs(entity.ocs(), points, elevation), entity.is_closed)]
    if entity.is_3d_polyline:
        return [_shape(_xy(entity.points()), entity.is_closed)]
    return []  # polyface and polygon meshes carry no 2D outline


def _to_wcs(ocs: OCS, points: list[Point], elevation: float) -> tuple[Point, ...]:
    return _xy(ocs.points_to_wcs(Vec3(x, y, elevation) for x, y in points))


def _shape(points: tuple[Point, ...], closed: bool) -> tuple[tuple[Point, ...], bool]:
    return (points, True) if closed else _closed_or_open(points)


def _closed_or_open(points: tuple[Point, ...]) -> tuple[tuple[Point, ...], bool]:
    """A point list whose last point repeats the first exactly is a closed shape."""
    if len(points) > 3 and points[0] == points[-1]:
        return points[:-1], True
    return points, False


def _xy(vertices) -> tuple[Point, ...]:
    return tuple((float(v[0]), float(v[1])) for v in vertices)
