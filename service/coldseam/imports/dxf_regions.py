"""Closed outlines of one material layer as regions with holes.

Outlines on one layer nest by the even-odd rule, as hatches do: an outline lying wholly inside
another one on the same layer is a hole in it (the hollow of a steel tube), an outline inside a
hole is an island again. An outline drawn twice (a hatch over its own boundary polyline) counts
once. An outline that crosses itself is refused with its location.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from shapely import Polygon, STRtree
from shapely.validation import explain_validity, make_valid

from coldseam.errors import InvalidSection
from coldseam.imports.dxf_entities import Point
from coldseam.imports.dxf_shapes import Outline, Ruler

#: Two outlines whose symmetric difference is below this share of their area are one outline.
DUPLICATE_SHARE = 1e-6


@dataclass
class RegionDraft:
    layer: str
    polygon: list[Point]
    index: int
    holes: list[list[Point]] = field(default_factory=list)


def nest(layer: str, loops: list[Outline], ruler: Ruler,
         pointer: str) -> tuple[list[RegionDraft], list[str]]:
    """Regions of one layer and notes on what was merged, dropped or taken as a hole."""
    notes: list[str] = []
    polygons = [_polygon(layer, loop, ruler, pointer, notes) for loop in loops]
    items = [(p, loop) for p, loop in zip(polygons, loops, strict=True) if p is not None]
    items.sort(key=lambda item: -item[0].area)  # stable: of two twins the earlier comes first
    nesting = _Nesting(items)
    for i in range(len(items)):
        nesting.place(i)
    if nesting.twins:
        notes.append(f"{nesting.twins} outline(s) drawn twice counted once")
    notes.extend(f"outline starting at {ruler.point(points[0])} lies inside another outline "
                 "on the same layer and is taken as a hole in it" for points in nesting.holes)
    drafts = [RegionDraft(layer, loop.points, nesting.index[i], nesting.holes_of[i])
              for i, (_, loop) in enumerate(items) if i in nesting.outer]
    return sorted(drafts, key=lambda d: d.index), notes


class _Nesting:
    """Even-odd nesting of polygons sorted by falling area."""

    def __init__(self, items: list[tuple[Polygon, Outline]]) -> None:
        self.items = items
        self.tree = STRtree([p for p, _ in items])
        self.depth: dict[int, int] = {}
        self.outer: set[int] = set()
        self.index = {i: loop.index for i, (_, loop) in enumerate(items)}
        self.holes_of: dict[int, list[list[Point]]] = {i: [] for i in range(len(items))}
        self.holes: list[list[Point]] = []
        self.twins = 0

    def place(self, i: int) -> None:
        poly, loop = self.items[i]
        bigger = [int(j) for j in self.tree.query(poly) if j < i and j in self.depth]
        twin = next((j for j in bigger if _same(self.items[j][0], poly)), None)
        if twin is not None:  # painter's order: the copy drawn last decides precedence
            self.index[twin] = max(self.index[twin], loop.index)
            self.twins += 1
            return
        holders = [j for j in bigger if self.items[j][0].contains_properly(poly)]
        parent = min(holders, key=lambda j: self.items[j][0].area) if holders else None
        self.depth[i] = 0 if parent is None else self.depth[parent] + 1
        if self.depth[i] % 2 == 0:
            self.outer.add(i)
        else:
            self.holes_of[parent].append(loop.points)
            self.holes.append(loop.points)


def _polygon(layer: str, loop: Outline, ruler: Ruler, pointer: str,
             notes: list[str]) -> Polygon | None:
    poly = Polygon(loop.points)
    if make_valid(poly).area <= 0:
        notes.append(f"{loop.kind} starting at {ruler.point(loop.points[0])} encloses no area "
                     "and was skipped")
        return None
    if not poly.is_valid:
        raise InvalidSection(
            f"layer {layer}: the {loop.kind} starting at {ruler.point(loop.points[0])} "
            f"crosses itself{_where(poly, ruler)}; redraw it as a simple outline",
            pointer,
        )
    return poly


def _where(poly: Polygon, ruler: Ruler) -> str:
    reason = explain_validity(poly)
    if "[" not in reason:
        return ""
    try:
        x, y = (float(v) for v in reason[reason.index("[") + 1: reason.index("]")].split()[:2])
    except ValueError:
        return ""
    return f" near {ruler.point((x, y))}"


def _same(a: Polygon, b: Polygon) -> bool:
    return a.symmetric_difference(b).area <= DUPLICATE_SHARE * max(a.area, b.area)
