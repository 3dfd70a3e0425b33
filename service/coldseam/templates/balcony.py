"""Cantilevered balcony slab through an externally insulated wall (vertical section),
continuous or through a load-bearing insulated break element.

As the floor-slab template, with the slab running on outside the wall face (x < 0). The break
element, given by its equivalent conductivity and thickness, sits in the insulation plane
against the wall structure.
"""

from __future__ import annotations

from typing import Any

from coldseam.templates import floor_slab
from coldseam.templates.base import (
    RSE,
    MaterialChoice,
    Parameter,
    TemplateInfo,
    boundary,
    choice,
    dimensions,
    invalid,
    length,
    rect,
    region,
    request,
)

INFO = TemplateInfo(
    id="balcony",
    title="Cantilevered balcony slab",
    description="Vertical section of a floor slab that runs on through an externally "
    "insulated wall as a balcony, either continuous or through an insulated load-bearing "
    "break element.",
    parameters=floor_slab.WALL_PARAMETERS + (
        length("balcony_depth", 1500, 500, 3000, "Projection of the balcony from the wall face"),
        choice("connection", ("continuous", "thermal_break"),
               "Slab continuous through the insulation, or through a break element"),
        length("break_thickness", 80, 40, 200, "Thickness of the break element"),
        Parameter("break_conductivity", "W/(m·K)", 0.20, "Equivalent conductivity of the "
                  "break element across its thickness (insulation, bars and bearings together)",
                  "number", 0.03, 5.0),
        dimensions("wall"),
    ),
)


def build(p: dict[str, Any]) -> dict[str, Any]:
    g = floor_slab.geometry(p)
    ti, ds, h, depth = g["ti"], g["ds"], g["h"], p["balcony_depth"]
    with_break = p["connection"] == "thermal_break"
    if with_break and p["break_thickness"] > ti:
        raise invalid("break_thickness", f"the break element ({p['break_thickness']:g} mm) sits "
                      f"in the insulation layer and must not be thicker than the insulation "
                      f"({ti:g} mm)")
    regions = floor_slab.wall_and_slab_regions(g, x_start=-depth)
    materials = floor_slab.materials(p)
    if with_break:
        regions.append(region("break_element", rect(ti - p["break_thickness"], 0, ti, ds)))
        materials["break_element"] = MaterialChoice(p["break_conductivity"])
    outside = [(0, ds + h), (0, ds), (-depth, ds), (-depth, 0), (0, 0), (0, -h)]
    boundaries = [boundary("outside", RSE, outside)] + floor_slab.interior_boundaries(g)
    kind = (f"break element {p['break_thickness']:g} mm, λ {p['break_conductivity']:g}"
            if with_break else "continuous slab")
    return request(f"Balcony {depth:g} mm, {kind}", "Template balcony.", materials, regions,
                   boundaries, floor_slab.wall_flanking(g, p["dimensions"]), p["dimensions"])
