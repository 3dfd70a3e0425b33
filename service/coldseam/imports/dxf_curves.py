"""Arcs, circles, bulges and hatch boundaries as point lists, in the entity's OCS.

Every arc of a circle is tessellated on one angular grid per radius (vertices at absolute
angles k·2π/n), so the same arc drawn twice, as a polyline bulge on a material layer and as an
ARC on a surface layer, or as a hatch edge over its outline, gets the same vertices and the
exposed surface lies exactly on the outline. The chord error (sagitta) is the given chord
tolerance, relaxed to 2e-4 of large radii.
"""

from __future__ import annotations

import math

import ezdxf.path
from ezdxf.entities.boundary_paths import ArcEdge, EdgePath, LineEdge, PolylinePath

Point = tuple[float, float]
#: Grid angles this close (as a share of the grid step) to an arc's end are left out.
_END_SHARE = 1e-6


def sagitta(chord: float, radius: float) -> float:
    return max(chord, 2e-4 * radius)


def grid_size(radius: float, chord: float) -> int:
    """Vertices on a full circle: a multiple of 4 (quadrant points are vertices), at least 8.

    >>> grid_size(100.0, 0.05)
    100
    """
    s = sagitta(chord, radius)
    step = math.pi / 2 if s >= radius else 2 * math.acos(1 - s / radius)
    return max(8, 4 * math.ceil(2 * math.pi / step / 4))


def circle_points(cx: float, cy: float, radius: float, chord: float) -> list[Point]:
    n = grid_size(radius, chord)
    return [(cx + radius * math.cos(2 * math.pi * k / n), cy + radius * math.sin(2 * math.pi * k / n))
            for k in range(n)]


def arc_points(cx: float, cy: float, radius: float, start: float, sweep: float,
               chord: float) -> list[Point]:
    """Grid points strictly inside the arc from angle ``start`` over ``sweep`` (radians,
    positive counter-clockwise); the ends are the caller's."""
    n = grid_size(radius, chord)
    step = 2 * math.pi / n
    end = start + sweep
    lo, hi = min(start, end), max(start, end)
    ks = range(math.floor(lo / step) + 1, math.ceil(hi / step))
    angles = [k * step for k in ks
              if k * step - lo > _END_SHARE * step and hi - k * step > _END_SHARE * step]
    if sweep < 0:
        angles.reverse()
    return [(cx + radius * math.cos(a), cy + radius * math.sin(a)) for a in angles]


def bulge_points(start: Point, end: Point, bulge: float, chord: float) -> list[Point]:
    """Interior points of the arc from start to end with the DXF bulge (tan of a quarter of
    the arc angle, positive counter-clockwise).

    >>> [(round(x, 6) + 0.0, round(y, 6)) for x, y in bulge_points((-1, 0), (1, 0), 1.0, 1.0)]
    [(-0.707107, -0.707107), (0.0, -1.0), (0.707107, -0.707107)]
    """
    dx, dy = end[0] - start[0], end[1] - start[1]
    length = math.hypot(dx, dy)
    if length == 0:
        return []
    offset = length * (1 - bulge * bulge) / (4 * bulge)  # centre from mid-chord, to the left
    cx = (start[0] + end[0]) / 2 - dy / length * offset
    cy = (start[1] + end[1]) / 2 + dx / length * offset
    radius = math.hypot(start[0] - cx, start[1] - cy)
    a0 = math.atan2(start[1] - cy, start[0] - cx)
    return arc_points(cx, cy, radius, a0, 4 * math.atan(bulge), chord)


def polyline_points(vertices: list[tuple[float, float, float]], closed: bool,
                    chord: float) -> list[Point]:
    """(x, y, bulge) vertices as points, arcs tessellated; a closed polyline is not repeated."""
    points: list[Point] = []
    n = len(vertices)
    for i in range(n if closed else n - 1):
        x0, y0, bulge = vertices[i]
        x1, y1, _ = vertices[(i + 1) % n]
        points.append((x0, y0))
        if abs(bulge) > 1e-12:
            points.extend(bulge_points((x0, y0), (x1, y1), bulge, chord))
    if not closed and n:
        points.append((vertices[-1][0], vertices[-1][1]))
    return points


def arc_entity_points(cx: float, cy: float, radius: float, start_deg: float, end_deg: float,
                      chord: float) -> list[Point]:
    """An ARC (counter-clockwise from start to end angle, degrees) with its end points."""
    a0 = math.radians(start_deg)
    sweep = math.radians((end_deg - start_deg) % 360.0) or 2 * math.pi
    ends = [(cx + radius * math.cos(a), cy + radius * math.sin(a)) for a in (a0, a0 + sweep)]
    return [ends[0], *arc_points(cx, cy, radius, a0, sweep, chord), ends[1]]


def hatch_loops(hatch, chord: float) -> tuple[list[list[Point]], list[list[Point]]]:
    """Boundary loops of a hatch: (loops in the hatch's OCS, loops already in WCS)."""
    ocs_loops, wcs_loops = [], []
    for boundary in hatch.paths:
        if isinstance(boundary, PolylinePath):
            vertices = [(v[0], v[1], v[-1] if len(v) > 2 else 0.0) for v in boundary.vertices]
            ocs_loops.append(polyline_points(vertices, True, chord))
        elif isinstance(boundary, EdgePath) and all(
                isinstance(e, LineEdge | ArcEdge) for e in boundary.edges):
            ocs_loops.append(_edge_loop(boundary, chord))
        elif isinstance(boundary, EdgePath):  # ellipse or spline edges: ezdxf flattens them
            path = ezdxf.path.from_hatch_edge_path(boundary, hatch.ocs(),
                                                   hatch.dxf.elevation.z)
            wcs_loops.append([(v.x, v.y) for v in path.flattening(chord, segments=16)])
    return ocs_loops, wcs_loops


def _edge_loop(boundary: EdgePath, chord: float) -> list[Point]:
    pieces = []
    for edge in boundary.edges:
        if isinstance(edge, LineEdge):
            pieces.append([(edge.start[0], edge.start[1]), (edge.end[0], edge.end[1])])
        elif edge.radius > 0:  # loaded arc edges run counter-clockwise
            pieces.append(arc_entity_points(edge.center[0], edge.center[1], edge.radius,
                                            edge.start_angle, edge.end_angle, chord))
    return chain(pieces)


def chain(pieces: list[list[Point]]) -> list[Point]:
    """Edges of one boundary path joined end to end, in either direction."""
    if not pieces:
        return []
    size = max(abs(c) for piece in pieces for p in piece for c in p)
    eps = 1e-9 * max(1.0, size)
    loop, rest = list(pieces[0]), [list(p) for p in pieces[1:]]
    while rest:
        for i, piece in enumerate(rest):
            if math.dist(loop[-1], piece[0]) <= eps:
                loop += piece[1:]
            elif math.dist(loop[-1], piece[-1]) <= eps:
                loop += piece[::-1][1:]
            else:
                continue
            rest.pop(i)
            break
        else:  # a gap: the boundary closes across it with a straight edge, as CAD draws it
            loop += rest.pop(0)
    if len(loop) > 1 and math.dist(loop[0], loop[-1]) <= eps:
        loop.pop()
    return loop
