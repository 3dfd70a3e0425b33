"""Ground-floor slab edge on the ground (vertical section), with insulation under the slab
and/or perimeter insulation down the outside of the foundation.

Ground level outside at y = 0, outer face of the wall insulation at x = 0, room at
x > wall thickness. The ground block follows ISO 10211: 0.5·b inside (to the symmetry plane
of the building), 2.5·b outside and 2.5·b below ground, with b the floor width
[from memory]. ψ = L2D − U_wall·l_wall − U_floor·l_floor, the floor's U from the ISO 13370
slab-on-ground formula (below) with characteristic dimension B' = floor width.
"""

from __future__ import annotations

import math
from typing import Any

from coldseam.templates.base import (
    CUT_INSET,
    RSE,
    RSI_DOWNWARD,
    RSI_HORIZONTAL,
    TemplateInfo,
    boundary,
    cutoff_distance,
    dimensions,
    flanking,
    invalid,
    length,
    material,
    optional_length,
    rect,
    region,
    request,
    wall_insulation,
    wall_structure,
)

INFO = TemplateInfo(
    id="ground_floor",
    title="Ground-floor slab edge on ground",
    description="Vertical section of a slab on ground meeting an externally insulated wall "
    "and its foundation, with insulation under the slab and/or perimeter insulation.",
    parameters=(
        *wall_structure(what="wall and foundation structure"),
        *wall_insulation("wall_", "Wall insulation", high=300),
        length("slab_thickness", 150, 80, 300, "Thickness of the floor slab"),
        material("slab_material", "reinforced_concrete_1pct", "Floor slab"),
        optional_length("floor_insulation_thickness", 100, 10, 300, "Insulation under the slab"),
        material("floor_insulation_material", "xps_034", "Insulation under the slab"),
        optional_length("perimeter_insulation_thickness", 80, 10, 200,
                        "Perimeter insulation on the outside of the foundation"),
        optional_length("perimeter_insulation_depth", 600, 50, 1500,
                        "Depth of the perimeter insulation below ground level"),
        material("perimeter_insulation_material", "xps_034", "Perimeter insulation"),
        length("floor_level", 150, 0, 600, "Height of the finished floor above ground level"),
        length("foundation_depth", 800, 300, 2000, "Depth of the foundation below ground level"),
        length("floor_width", 8000, 2000, 20000, "Width b of the floor (between the inner faces "
               "of the external walls)"),
        material("ground_material", "ground_iso10211", "Ground"),
        dimensions("wall and floor"),
    ),
)


def build(p: dict[str, Any]) -> dict[str, Any]:
    _check(p)
    t = p["wall_insulation_thickness"] + p["wall_thickness"]
    b, hf = p["floor_width"], p["floor_level"]
    top, inner_end = hf + cutoff_distance(t), t + 0.5 * b
    regions = _regions(p, t, top, inner_end)
    boundaries = [
        boundary("outside", RSE, [(-2.5 * b, 0), (0, 0), (0, top)]),
        boundary("inside", RSI_HORIZONTAL, [(t, top), (t, hf)]),
        boundary("inside", RSI_DOWNWARD, [(t, hf), (inner_end, hf)]),
    ]
    external = p["dimensions"] == "external"
    floor_bottom = _floor_bottom(p)
    wall_length = top - (floor_bottom if external else hf)
    floor_length = 0.5 * b + (t if external else 0.0)
    u_floor = floor_u_value(p, b + 2 * t if external else b, t)
    wall_cut = top - CUT_INSET
    flank = [flanking("wall", wall_length, (0, wall_cut), (t, wall_cut)),
             {"id": "floor", "length": round(floor_length, 6), "u_value": u_floor}]
    materials = {role: p[f"{role}_material"] for role in (
        "ground", "wall", "wall_insulation", "slab", "floor_insulation",
        "perimeter_insulation")}
    return request(f"Ground floor, {p['floor_insulation_thickness']:g} mm under slab, "
                   f"{p['perimeter_insulation_thickness']:g} mm perimeter", "Template "
                   f"ground_floor; floor U {u_floor:.4f} W/(m²·K) from ISO 13370.",
                   materials, regions, boundaries, flank, p["dimensions"],
                   symmetry_lines=[[(inner_end, hf), (inner_end, -1e6)]])  # mid-floor plane


def _floor_bottom(p: dict[str, Any]) -> float:
    return p["floor_level"] - p["slab_thickness"] - p["floor_insulation_thickness"]


def _check(p: dict[str, Any]) -> None:
    if _floor_bottom(p) <= -p["foundation_depth"]:
        raise invalid("foundation_depth", "the floor construction (slab and insulation) must "
                      "end above the foundation bottom: deepen the foundation")
    has_perimeter = p["perimeter_insulation_thickness"] > 0
    if has_perimeter and p["perimeter_insulation_depth"] > p["foundation_depth"]:
        raise invalid("perimeter_insulation_depth", f"perimeter insulation "
                      f"({p['perimeter_insulation_depth']:g} mm deep) must not reach below the "
                      f"foundation ({p['foundation_depth']:g} mm)")


def _regions(p: dict[str, Any], t: float, top: float, inner_end: float) -> list[dict]:
    """Painter's order: ground, wall, insulation layers, slab."""
    ti, b = p["wall_insulation_thickness"], p["floor_width"]
    fb, tu = _floor_bottom(p), p["floor_insulation_thickness"]
    tp, dp = p["perimeter_insulation_thickness"], p["perimeter_insulation_depth"]
    ground_top = max(fb, 0.0)  # under the building the ground meets the floor construction
    out = [region("ground", [(-2.5 * b, -2.5 * b), (inner_end, -2.5 * b),
                             (inner_end, ground_top), (t, ground_top), (t, 0), (-2.5 * b, 0)])]
    out += [region("wall", rect(ti, -p["foundation_depth"], t, top)),
            region("wall_insulation", rect(0, 0, ti, top))]
    if tp > 0 and dp > 0:
        out.append(region("perimeter_insulation", rect(ti - tp, -dp, ti, 0)))
    if tu > 0:
        out.append(region("floor_insulation", rect(t, fb, inner_end, fb + tu)))
    out.append(region("slab", rect(t, fb + tu, inner_end, p["floor_level"])))
    return out


def floor_u_value(p: dict[str, Any], characteristic: float, wall: float) -> float:
    """U of a slab on ground, W/(m²·K), ISO 13370 [from memory]; lengths in mm.

    dt = w + λg·(Rsi + Rf + Rse); U = 2λg/(π·B' + dt)·ln(π·B'/dt + 1) when dt < B',
    else U = λg/(0.457·B' + dt).
    """
    lam_g = p["ground_material"].conductivity
    r_floor = (p["slab_thickness"] / 1000 / p["slab_material"].conductivity
               + p["floor_insulation_thickness"] / 1000
               / p["floor_insulation_material"].conductivity)
    b_prime = characteristic / 1000
    dt = wall / 1000 + lam_g * (RSI_DOWNWARD + r_floor + RSE)
    if dt < b_prime:
        return 2 * lam_g / (math.pi * b_prime + dt) * math.log(math.pi * b_prime / dt + 1)
    return lam_g / (0.457 * b_prime + dt)
