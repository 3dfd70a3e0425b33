"""External corner of two equal walls (plan section), insulation outside or inside.

The outer corner is at the origin; wall A runs along +x, wall B along +y; the room lies at
x, y > thickness. Each leg reaches a cut-off plane max(1 m, 3 × wall thickness) beyond the
inner corner.
"""

from __future__ import annotations

from typing import Any

from coldseam.templates.base import (
    CUT_INSET,
    RSE,
    RSI_HORIZONTAL,
    TemplateInfo,
    boundary,
    choice,
    cutoff_distance,
    dimensions,
    flanking,
    region,
    request,
    wall_insulation,
    wall_structure,
)

INFO = TemplateInfo(
    id="wall_corner",
    title="External wall corner",
    description="Plan section of an external corner where two equal walls meet at 90°, "
    "with the insulation on the outside or the inside of the structure.",
    parameters=(
        *wall_structure(low=80, high=500),
        *wall_insulation(label="Insulation layer", low=10),
        choice("insulation_position", ("outside", "inside"),
               "Insulation on the outside or the inside of the structure"),
        dimensions("wall"),
    ),
)


def build(p: dict[str, Any]) -> dict[str, Any]:
    structure, insulation = p["wall_thickness"], p["insulation_thickness"]
    t = structure + insulation
    leg = t + cutoff_distance(t)
    outer, inner = ("insulation", "wall") if p["insulation_position"] == "outside" else (
        "wall", "insulation")
    inner_from = insulation if outer == "insulation" else structure
    regions = [region(outer, _l_shape(0.0, t, leg)), region(inner, _l_shape(inner_from, t, leg))]
    boundaries = [
        boundary("outside", RSE, [(leg, 0), (0, 0), (0, leg)]),
        boundary("inside", RSI_HORIZONTAL, [(leg, t), (t, t), (t, leg)]),
    ]
    wall_length = leg if p["dimensions"] == "external" else leg - t
    cut = leg - CUT_INSET
    flank = [flanking("wall_a", wall_length, (cut, 0), (cut, t)),
             flanking("wall_b", wall_length, (0, cut), (t, cut))]
    return request(
        f"External corner, {structure:g} mm wall, {insulation:g} mm insulation "
        f"{p['insulation_position']}", "Template wall_corner.",
        {"wall": p["wall_material"], "insulation": p["insulation_material"]},
        regions, boundaries, flank, p["dimensions"])


def _l_shape(offset: float, t: float, leg: float) -> list[tuple[float, float]]:
    """The L-shaped band between ``offset`` and ``t`` from the outer faces."""
    a = offset
    return [(a, a), (leg, a), (leg, t), (t, t), (t, leg), (a, leg)]
