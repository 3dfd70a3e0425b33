"""Shapes of one layer assembled into closed outlines and open paths.

Open pieces (lines, arcs, open polylines) are joined end to end where their ends meet within
the gap tolerance; a chain whose ends meet closes. Pieces that meet at T-junctions (two boards
sharing an edge drawn once) are assembled with shapely's polygonize. Whatever stays open is
reported with its location and the size of its gap.
"""

from __future__ import annotations

import math
from collections import defaultdict
from dataclasses import dataclass, field

from shapely import LineString, MultiLineString, polygonize_full, unary_union

from coldseam.imports.dxf_entities import Point, Shape

KIND_NAMES = {"LINE": "line", "ARC": "arc", "CIRCLE": "circle", "ELLIPSE": "ellipse",
              "SPLINE": "spline", "LWPOLYLINE": "polyline", "POLYLINE": "polyline",
              "HATCH": "hatch boundary"}


@dataclass(frozen=True)
class Ruler:
    """Drawing units to the section unit, for coordinates and for messages."""

    factor: float
    unit: str

    def point(self, p: Point) -> str:
        return f"({_fmt(p[0] * self.factor)}, {_fmt(p[1] * self.factor)}) {self.unit}"

    def length(self, d: float) -> str:
        return f"{_fmt(d * self.factor)} {self.unit}"


@dataclass(frozen=True)
class Tolerance:
    """In drawing units: ends closer than ``coincident`` are the same point; gaps up to
    ``gap`` are closed with a warning."""

    coincident: float
    gap: float


@dataclass
class Outline:
    points: list[Point]
    index: int
    kind: str


@dataclass
class LayerGeometry:
    loops: list[Outline] = field(default_factory=list)
    open_paths: list[Outline] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)


def assemble(shapes: list[Shape], tol: Tolerance, ruler: Ruler, fill: bool) -> LayerGeometry:
    """Closed outlines and open paths of the shapes of one layer; with ``fill`` (a material
    layer) open linework that meets at junctions is assembled into faces."""
    out = LayerGeometry()
    pieces: list[Outline] = []
    for shape in shapes:
        points = dedupe(list(shape.points), tol.coincident)
        target = out.loops if shape.closed else pieces
        if shape.closed and len(points) > 1 and _dist(points[0], points[-1]) <= tol.coincident:
            points.pop()
        if len(points) < (3 if shape.closed else 2):
            continue
        target.append(Outline(points, shape.index, KIND_NAMES.get(shape.kind, shape.kind)))
    chained = LayerGeometry()
    for chain in join(pieces, tol.gap):
        _close_or_keep(chain, tol, ruler, chained)
    if fill and chained.open_paths:
        chained = _faces(chained, ruler) or chained
    out.loops += chained.loops
    out.open_paths = chained.open_paths
    out.notes += chained.notes
    return out


def dedupe(points: list[Point], eps: float) -> list[Point]:
    """Consecutive points closer than eps merged into one."""
    kept: list[Point] = []
    for p in points:
        if not kept or _dist(kept[-1], p) > eps:
            kept.append(p)
    return kept


def join(pieces: list[Outline], tol: float) -> list[Outline]:
    """Open pieces chained end to end where ends meet within tol (nearest end first)."""
    ends = _EndIndex(pieces, tol)
    chains = []
    for i, piece in enumerate(pieces):
        if not ends.take(i):
            continue
        chain = Outline(list(piece.points), piece.index, piece.kind)
        count = 1
        for _ in range(2):  # grow the far end, then the near end
            count += _grow(chain, ends, pieces, tol)
            chain.points.reverse()
        if count > 1:
            chain.kind = f"chain of {count} pieces"
        chains.append(chain)
    return chains


def _grow(chain: Outline, ends: _EndIndex, pieces: list[Outline], tol: float) -> int:
    added = 0
    while not (len(chain.points) > 2 and _dist(chain.points[0], chain.points[-1]) <= tol):
        hit = ends.nearest(chain.points[-1])
        if hit is None:
            return added
        j, at_start = hit
        nxt = pieces[j].points if at_start else pieces[j].points[::-1]
        chain.points.extend(nxt[1:])  # the chain end stands for the joined end (snap)
        chain.index = min(chain.index, pieces[j].index)
        added += 1
    return added


class _EndIndex:
    """Ends of unused pieces on a grid of cell size tol."""

    def __init__(self, pieces: list[Outline], tol: float) -> None:
        self.tol = tol
        self.pieces = pieces
        self.used = [False] * len(pieces)
        self.grid: dict[tuple[int, int], list[tuple[int, bool]]] = defaultdict(list)
        for i, piece in enumerate(pieces):
            self.grid[self._cell(piece.points[0])].append((i, True))
            self.grid[self._cell(piece.points[-1])].append((i, False))

    def _cell(self, p: Point) -> tuple[int, int]:
        return math.floor(p[0] / self.tol), math.floor(p[1] / self.tol)

    def take(self, i: int) -> bool:
        free = not self.used[i]
        self.used[i] = True
        return free

    def nearest(self, p: Point) -> tuple[int, bool] | None:
        cx, cy = self._cell(p)
        best, best_d = None, self.tol
        for key in ((cx + a, cy + b) for a in (-1, 0, 1) for b in (-1, 0, 1)):
            for j, at_start in self.grid.get(key, ()):
                end = self.pieces[j].points[0 if at_start else -1]
                d = _dist(p, end)
                if not self.used[j] and d <= best_d:
                    best, best_d = (j, at_start), d
        if best is not None:
            self.used[best[0]] = True
        return best


def _close_or_keep(chain: Outline, tol: Tolerance, ruler: Ruler, out: LayerGeometry) -> None:
    points = chain.points
    gap = _dist(points[0], points[-1])
    if len(points) > 3 and gap <= tol.gap:
        points.pop()
        if gap > tol.coincident:
            out.notes.append(f"{chain.kind} starting at {ruler.point(points[0])} closed "
                             f"automatically across a gap of {ruler.length(gap)}")
        out.loops.append(chain)
    else:
        out.open_paths.append(chain)


def _faces(chained: LayerGeometry, ruler: Ruler) -> LayerGeometry | None:
    """The faces of all chained linework (noded where pieces meet at T-junctions), when it
    leaves nothing dangling; their rings nest by the same even-odd rule as outlines."""
    rings = [p.points + p.points[:1] for p in chained.loops]
    lines = MultiLineString([LineString(p) for p in rings + [p.points for p in chained.open_paths]])
    faces, cuts, dangles, invalid = polygonize_full([unary_union(lines)])
    if faces.is_empty or not (cuts.is_empty and dangles.is_empty and invalid.is_empty):
        return None
    index = min(p.index for p in chained.loops + chained.open_paths)
    out = LayerGeometry(notes=list(chained.notes))
    for face in faces.geoms:
        for ring in (face.exterior, *face.interiors):
            out.loops.append(Outline([tuple(c) for c in ring.coords[:-1]], index, "outline"))
    out.notes.append(f"lines meeting at junctions assembled into {len(faces.geoms)} outlines "
                     f"(near {ruler.point(chained.open_paths[0].points[0])})")
    return out


def looks_unclosed(path: Outline) -> bool:
    """An open path whose ends are close against its length: an outline meant to be closed."""
    length = sum(_dist(a, b) for a, b in zip(path.points, path.points[1:], strict=False))
    return len(path.points) > 2 and _dist(path.points[0], path.points[-1]) <= 0.1 * length


def describe_open(path: Outline, ruler: Ruler) -> str:
    """'polyline starting at (1200, 0) mm is not closed: gap of 0.4 mm'."""
    gap = _dist(path.points[0], path.points[-1])
    return (f"{path.kind} starting at {ruler.point(path.points[0])} is not closed: "
            f"gap of {ruler.length(gap)}")


def _dist(a: Point, b: Point) -> float:
    return math.hypot(a[0] - b[0], a[1] - b[1])


def _fmt(value: float) -> str:
    text = f"{value:.4f}".rstrip("0").rstrip(".")
    return "0" if text in ("-0", "") else text
