"""Framed wall (plan section): studs at a spacing with insulation between, sheathing outside,
lining inside, optional continuous insulation outside. One period of the wall, cut at
mid-bay on both sides (symmetry planes, adiabatic), stud in the middle.

The result's L2D over the spacing is the wall's effective U (see :func:`effective_u_value`);
ψ is reported against the clear-bay U, so it is the extra heat flow of one stud per metre
of its height.
"""

from __future__ import annotations

from typing import Any

from coldseam.templates.base import (
    RSE,
    RSI_HORIZONTAL,
    TemplateInfo,
    boundary,
    flanking,
    length,
    material,
    optional_length,
    rect,
    region,
    request,
)

INFO = TemplateInfo(
    id="framed_wall",
    title="Framed wall, studs at a spacing",
    description="Plan section of one period of a framed wall: studs with insulation "
    "between, sheathing, lining and optional continuous outer insulation. Gives the "
    "wall's effective U-value.",
    parameters=(
        length("stud_spacing", 600, 300, 1200, "Centre-to-centre spacing of the studs"),
        length("stud_width", 45, 30, 120, "Width of a stud (at most 120 mm, below half the "
               "smallest spacing)"),
        length("stud_depth", 145, 70, 300, "Depth of the studs, filled with insulation"),
        material("stud_material", "timber_500", "Studs"),
        material("cavity_insulation_material", "mineral_wool_035", "Insulation between studs"),
        optional_length("sheathing_thickness", 12, 5, 30, "Sheathing board outside the studs"),
        material("sheathing_material", "osb", "Sheathing board"),
        optional_length("lining_thickness", 12.5, 5, 30, "Lining board inside the studs"),
        material("lining_material", "gypsum_plasterboard", "Lining board"),
        optional_length("outer_insulation_thickness", 0, 10, 200,
                        "Continuous insulation outside the sheathing"),
        material("outer_insulation_material", "wood_fibre_040", "Continuous outer insulation"),
    ),
)


def build(p: dict[str, Any]) -> dict[str, Any]:
    s, w = p["stud_spacing"], p["stud_width"]
    layers = [("outer_insulation", p["outer_insulation_thickness"]),
              ("sheathing", p["sheathing_thickness"]),
              ("cavity_insulation", p["stud_depth"]), ("lining", p["lining_thickness"])]
    regions, x = [], 0.0
    for role, thickness in layers:
        if thickness > 0:
            regions.append(region(role, rect(x, 0, x + thickness, s)))
        x += thickness
    stud_from = p["outer_insulation_thickness"] + p["sheathing_thickness"]
    regions.append(region("stud", rect(stud_from, (s - w) / 2, stud_from + p["stud_depth"],
                                       (s + w) / 2)))  # drawn last: over the insulation
    boundaries = [boundary("outside", RSE, [(0, 0), (0, s)]),
                  boundary("inside", RSI_HORIZONTAL, [(x, 0), (x, s)])]
    y_bay = (s - w) / 4
    materials = {role: p[f"{role}_material"] for role, thickness in layers if thickness > 0}
    materials["stud"] = p["stud_material"]
    return request(f"Framed wall, studs {w:g} × {p['stud_depth']:g} mm at {s:g} mm",
                   f"Template framed_wall. Effective U = L2D / {s / 1000:g} m.", materials,
                   regions, boundaries, [flanking("bay", s, (0, y_bay), (x, y_bay))], None,
                   symmetry_lines=[[(0, 0), (x, 0)], [(0, s), (x, s)]])  # mid-bay planes


def effective_u_value(l2d: float, stud_spacing: float) -> float:
    """The wall's effective U in W/(m²·K): L2D in W/(m·K) over the spacing in mm."""
    return l2d / (stud_spacing / 1000)
