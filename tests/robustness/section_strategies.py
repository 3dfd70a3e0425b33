"""Hypothesis strategies for strange sections: boards on a grid with drawing defects (overlaps,
exactly shared edges, slivers, holes on the outline, repeated and collinear points), random
polygons, extreme scales and offsets, boundary paths that miss, and bad numbers."""

from __future__ import annotations

import copy
import math
from typing import Any

from hypothesis import strategies as st
from robust_support import WALL_1D, environments

CONDUCTIVITY = st.floats(-3, 3).map(lambda e: round(10.0 ** e, 6))
#: Building materials, from insulation to steel (about 0.02 to 60 W/(m·K)).
BUILDING_CONDUCTIVITY = st.floats(-1.7, 1.8).map(lambda e: round(10.0 ** e, 6))
RESISTANCE = st.sampled_from([0.04, 0.13, 0.25, 1.0])
DEFECTS = ["none", "repeated point", "midpoint", "collinear point", "overlay inside",
           "overlay across",
           "sliver overlay", "hole", "hole on the outline", "shared edge split"]
SIDES = ["exact", "exact", "overlong", "partial", "miss", "dot"]


def _cuts(draw: Any, count: int) -> list[float]:
    """``count`` + 1 increasing grid lines from 0 to 1000, at least 2 apart."""
    inner = draw(st.lists(st.integers(2, 998), min_size=count - 1, max_size=count - 1,
                          unique=True))
    return [0.0, *sorted(float(v) for v in inner), 1000.0]


@st.composite
def boards(draw: Any, defects: list[str] = DEFECTS,
           conductivity: st.SearchStrategy[float] = CONDUCTIVITY,
           sides: list[str] = SIDES) -> dict[str, Any]:
    """A grid of 1-3 x 1-3 boards, 1000 x 1000 grid units, scaled to the unit, with a
    drawing defect; exposed on the left (outside) and right (inside)."""
    xs, ys = _cuts(draw, draw(st.integers(1, 3))), _cuts(draw, draw(st.integers(1, 3)))
    unit = draw(st.sampled_from(["mm", "m"]))
    scale = draw(st.sampled_from([0.1, 1.0, 3.0])) * (1.0 if unit == "mm" else 1e-3)
    materials, regions = [], []
    for i in range(len(xs) - 1):
        for j in range(len(ys) - 1):
            k = len(materials)
            materials.append({"id": f"m{k}", "conductivity": draw(conductivity)})
            box = [[xs[i], ys[j]], [xs[i + 1], ys[j]], [xs[i + 1], ys[j + 1]], [xs[i], ys[j + 1]]]
            regions.append({"material": f"m{k}", "polygon": box})
    _defect(draw, draw(st.sampled_from(defects)), regions, materials, conductivity)
    section = {"unit": unit, "materials": materials, "regions": regions,
               "environments": environments(), "boundaries": _sides(draw, sides)}
    return _scaled(section, scale)


def _defect(draw: Any, kind: str, regions: list[dict], materials: list[dict],
            conductivity: st.SearchStrategy[float]) -> None:
    target = draw(st.sampled_from(regions))
    polygon = target["polygon"]
    (x0, y0), (x1, y1) = polygon[0], polygon[2]
    if kind == "repeated point":
        polygon.insert(1, list(polygon[0]))
    elif kind in ("midpoint", "collinear point"):
        t = 0.5 if kind == "midpoint" else draw(st.sampled_from([1e-3, 1e-6, 1e-9]))
        polygon.insert(1, [x0 + t * (x1 - x0), y0])
    elif kind in ("overlay inside", "overlay across", "sliver overlay"):
        materials.append({"id": "overlay", "conductivity": draw(conductivity)})
        cx, cy = draw(st.floats(0, 1000)), draw(st.floats(0, 1000))
        w = draw(st.sampled_from([1e-6, 1e-3, 1.0, 50.0, 400.0])) if kind != "sliver overlay" \
            else 1e-4
        h = draw(st.sampled_from([1.0, 50.0, 400.0]))
        if kind == "overlay across":
            cx = draw(st.sampled_from([0.0, 1000.0]))
        regions.append({"material": "overlay",
                        "polygon": [[cx - w, cy - h], [cx + w, cy - h], [cx + w, cy + h],
                                    [cx - w, cy + h]]})
    elif kind in ("hole", "hole on the outline"):
        d = draw(st.sampled_from([0.1, 0.4, 0.5]))
        hx0 = x0 if kind == "hole on the outline" else x0 + d * (x1 - x0) / 2
        hx1, hy0, hy1 = x0 + d * (x1 - x0), y0 + 0.25 * (y1 - y0), y0 + 0.75 * (y1 - y0)
        target["holes"] = [[[hx0, hy0], [hx1, hy0], [hx1, hy1], [hx0, hy1]]]
    elif kind == "shared edge split":
        eps = draw(st.sampled_from([0.0, 1e-9, 1e-6, 1e-3, 1.0]))
        polygon[1] = [x1 + eps, y0 + draw(st.sampled_from([0.0, eps]))]


def _sides(draw: Any, kinds: list[str] = SIDES) -> list[dict[str, Any]]:
    """Boundary paths on the left and right: exact, overlong, partial or missing."""
    def side(x: float) -> list[list[float]]:
        kind = draw(st.sampled_from(kinds))
        if kind == "overlong":
            return [[x, -500.0], [x, 1500.0]]
        if kind == "partial":
            return [[x, draw(st.floats(0, 400))], [x, draw(st.floats(600, 1000))]]
        if kind == "miss":
            return [[x + draw(st.sampled_from([-30.0, 30.0, 1e-3])), 0.0], [x, 1000.0]]
        if kind == "dot":
            return [[x, 500.0], [x, 500.0]]
        return [[x, 0.0], [x, 1000.0]]

    return [{"environment": "outside", "surface_resistance": draw(RESISTANCE), "path": side(0.0)},
            {"environment": "inside", "surface_resistance": draw(RESISTANCE),
             "path": side(1000.0)}]


def _scaled(section: dict[str, Any], factor: float, offset: float = 0.0) -> dict[str, Any]:
    def move(points: list) -> list:
        return [[x * factor + offset, y * factor + offset] for x, y in points]

    for region in section["regions"]:
        region["polygon"] = move(region["polygon"])
        region["holes"] = [move(h) for h in region.get("holes", [])]
    for boundary in section["boundaries"]:
        boundary["path"] = move(boundary["path"])
    return section


@st.composite
def extreme_scales(draw: Any) -> dict[str, Any]:
    """Clean boards drawn enormous or tiny, near or far from the origin."""
    section = draw(boards(defects=["none"]))
    factor = 10.0 ** draw(st.sampled_from([-9, -6, -3, 3, 6, 9]))
    offset = draw(st.sampled_from([0.0, 1e3, 1e9, -1e15]))
    return _scaled(section, factor, offset * factor)


@st.composite
def random_polygons(draw: Any) -> dict[str, Any]:
    """1-3 polygons of random points (often crossing themselves), over a background board or
    alone, exposed left and right of the whole."""
    point = st.tuples(st.floats(0, 1000), st.floats(0, 1000)).map(list)
    polygons = draw(st.lists(st.lists(point, min_size=3, max_size=7), min_size=1, max_size=3))
    if draw(st.booleans()):  # sorted by angle about their centre: simple, and they overlap
        polygons = [_star(p) for p in polygons]
    materials = [{"id": f"m{k}", "conductivity": draw(CONDUCTIVITY)}
                 for k in range(len(polygons))]
    regions = [{"material": f"m{k}", "polygon": p} for k, p in enumerate(polygons)]
    if draw(st.booleans()):
        materials.append({"id": "board", "conductivity": draw(CONDUCTIVITY)})
        regions.insert(0, {"material": "board", "polygon": [[-10.0, -10.0], [1010.0, -10.0],
                                                            [1010.0, 1010.0], [-10.0, 1010.0]]})
    xs = [x for r in regions for x, _ in r["polygon"]]
    left, right = min(xs), max(xs)
    return {"unit": "mm", "materials": materials, "regions": regions,
            "environments": environments(),
            "boundaries": [
                {"environment": "outside", "surface_resistance": draw(RESISTANCE),
                 "path": [[left, -10.0], [left, 1010.0]]},
                {"environment": "inside", "surface_resistance": draw(RESISTANCE),
                 "path": [[right, -10.0], [right, 1010.0]]}]}


def _star(points: list[list[float]]) -> list[list[float]]:
    cx = sum(x for x, _ in points) / len(points)
    cy = sum(y for _, y in points) / len(points)
    return sorted(points, key=lambda p: math.atan2(p[1] - cy, p[0] - cx))


BAD_NUMBERS = [math.nan, math.inf, -math.inf, 1e308, -1e308, 0.0, -1.0, 1e-300]


@st.composite
def bad_numbers(draw: Any) -> tuple[dict[str, Any], str]:
    """The example wall with one number replaced; (request, JSON pointer of the number)."""
    request = copy.deepcopy(WALL_1D)
    leaves = list(_numbers(request, ""))
    pointer = draw(st.sampled_from(leaves))
    _set(request, pointer, draw(st.sampled_from(BAD_NUMBERS)))
    return request, pointer


def _numbers(node: Any, pointer: str):
    if isinstance(node, dict):
        for key, value in node.items():
            yield from _numbers(value, f"{pointer}/{key}")
    elif isinstance(node, list):
        for i, value in enumerate(node):
            yield from _numbers(value, f"{pointer}/{i}")
    elif isinstance(node, int | float) and not isinstance(node, bool):
        yield pointer


def _set(node: Any, pointer: str, value: float) -> None:
    *path, last = pointer.strip("/").split("/")
    for part in path:
        node = node[int(part)] if isinstance(node, list) else node[part]
    if isinstance(node, list):
        node[int(last)] = value
    else:
        node[last] = value
