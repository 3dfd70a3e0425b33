"""Intermediate floor slab meeting an externally insulated wall (vertical section).

The slab bears through the wall structure up to the insulation. Outer face of the insulation
at x = 0, slab between y = 0 and y = slab thickness; rooms above and below at 20 °C.
"""

from __future__ import annotations

from typing import Any

from coldseam.templates.base import (
    CUT_INSET,
    RSE,
    RSI_DOWNWARD,
    RSI_HORIZONTAL,
    RSI_UPWARD,
    TemplateInfo,
    boundary,
    cutoff_distance,
    dimensions,
    flanking,
    length,
    material,
    rect,
    region,
    request,
    wall_insulation,
    wall_structure,
)

WALL_PARAMETERS = (
    *wall_structure(),
    *wall_insulation(),
    length("slab_thickness", 200, 120, 400, "Thickness of the floor slab"),
    material("slab_material", "reinforced_concrete_1pct", "Floor slab"),
)

INFO = TemplateInfo(
    id="floor_slab",
    title="Intermediate floor slab, externally insulated wall",
    description="Vertical section of a floor slab bearing on an external wall whose "
    "insulation runs continuously past the slab edge.",
    parameters=(*WALL_PARAMETERS, dimensions("wall")),
)


def build(p: dict[str, Any]) -> dict[str, Any]:
    g = geometry(p)
    regions = wall_and_slab_regions(g, x_start=g["ti"])
    boundaries = [boundary("outside", RSE, [(0, -g["h"]), (0, g["ds"] + g["h"])])]
    boundaries += interior_boundaries(g)
    return request(
        f"Floor slab {g['ds']:g} mm, wall {p['wall_thickness']:g} mm + {g['ti']:g} mm "
        "insulation", "Template floor_slab.", materials(p), regions, boundaries,
        wall_flanking(g, p["dimensions"]), p["dimensions"])


def geometry(p: dict[str, Any]) -> dict[str, float]:
    ti, ds = p["insulation_thickness"], p["slab_thickness"]
    t = ti + p["wall_thickness"]
    return {"ti": ti, "t": t, "ds": ds, "h": cutoff_distance(t),
            "slab_end": t + cutoff_distance(ds)}


def materials(p: dict[str, Any]) -> dict[str, Any]:
    return {"wall": p["wall_material"], "insulation": p["insulation_material"],
            "slab": p["slab_material"]}


def wall_and_slab_regions(g: dict[str, float], x_start: float) -> list[dict[str, Any]]:
    """Insulation, then wall structure, then the slab from ``x_start`` drawn over both."""
    ti, t, ds, h = g["ti"], g["t"], g["ds"], g["h"]
    return [region("insulation", rect(0, -h, ti, ds + h)),
            region("wall", rect(ti, -h, t, ds + h)),
            region("slab", rect(x_start, 0, g["slab_end"], ds))]


def interior_boundaries(g: dict[str, float]) -> list[dict[str, Any]]:
    """Wall faces (horizontal heat flow), slab soffit (upward) and floor (downward)."""
    t, ds, h, end = g["t"], g["ds"], g["h"], g["slab_end"]
    return [boundary("inside", RSI_HORIZONTAL, [(t, -h), (t, 0)]),
            boundary("inside", RSI_UPWARD, [(t, 0), (end, 0)]),
            boundary("inside", RSI_DOWNWARD, [(t, ds), (end, ds)]),
            boundary("inside", RSI_HORIZONTAL, [(t, ds), (t, ds + h)])]


def wall_flanking(g: dict[str, float], dimensions: str) -> list[dict[str, Any]]:
    """Walls above and below; externally each counts half the slab edge."""
    t, ds, h = g["t"], g["ds"], g["h"]
    each = h + ds / 2 if dimensions == "external" else h
    top, bottom = ds + h - CUT_INSET, -h + CUT_INSET
    return [flanking("wall_above", each, (0, top), (t, top)),
            flanking("wall_below", each, (0, bottom), (t, bottom))]
