"""Window reveal (plan section through the jamb) with the frame as a block of equivalent
conductivity and optional reveal insulation.

Outer face of the wall insulation at x = 0, room side at x = wall thickness; the wall runs
from the reveal (y = 0) to its cut-off plane. The frame block occupies y from −frame width
to 0; its glass edge is a cut (adiabatic). The frame's U for ψ is read through the block,
1 / (Rse + depth/λ + Rsi).

Simplification: the glass edge of the frame is only one frame width from the reveal, so it is
no ISO 10211 cut-off plane; the engine says so in its warnings. The glazing itself is not
modelled (ψ here is that of the installed frame block).
"""

from __future__ import annotations

from typing import Any

from coldseam.templates.base import (
    CUT_INSET,
    RSE,
    RSI_CONDENSATION_FRAME,
    RSI_HORIZONTAL,
    MaterialChoice,
    Parameter,
    TemplateInfo,
    boundary,
    cutoff_distance,
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
    id="window_reveal",
    title="Window reveal",
    description="Plan section through a window jamb in an externally insulated wall; the "
    "frame is a block of equivalent conductivity, the reveal optionally insulated.",
    parameters=(
        *wall_structure(),
        *wall_insulation(high=300),
        length("frame_depth", 80, 50, 150, "Depth of the frame through the wall"),
        length("frame_width", 100, 50, 200, "Visible width of the frame"),
        Parameter("frame_conductivity", "W/(m·K)", 0.13, "Equivalent conductivity of the "
                  "frame block", "number", 0.03, 10.0),
        optional_length("frame_offset", 160, 10, 650, "Distance from the outer face of the "
                        "wall to the outer face of the frame"),
        optional_length("reveal_insulation_thickness", 0, 10, 100, "Insulation on the outer "
                        "reveal, between the wall face and the frame"),
        material("reveal_insulation_material", "xps_034", "Reveal insulation"),
    ),
)

#: The frame block's heat capacity, for the dynamic results: the default frame (0.13 W/(m·K))
#: is a timber frame, so softwood of 500 kg/m³, c = 1600 J/(kg·K), the EN 12524:2000 /
#: ISO 10456:2007 table values of the library's ``timber_500`` row (as tabulated in the ht
#: library, not checked against the standard's text; they match the values recalled from
#: memory). A metal or PVC frame stores more per volume of profile but is mostly hollow, so
#: one value for the block stays an approximation of its equivalent ρc.
FRAME_DENSITY = 500.0
FRAME_SPECIFIC_HEAT = 1600.0


def build(p: dict[str, Any]) -> dict[str, Any]:
    ti, t = p["insulation_thickness"], p["insulation_thickness"] + p["wall_thickness"]
    xf, df, bf = p["frame_offset"], p["frame_depth"], p["frame_width"]
    tr = p["reveal_insulation_thickness"]
    _check(p, t)
    lw = cutoff_distance(t)
    regions = [region("insulation", rect(0, 0, ti, lw)), region("wall", rect(ti, 0, t, lw)),
               region("frame", rect(xf, -bf, xf + df, 0))]
    materials = {"wall": p["wall_material"], "insulation": p["insulation_material"],
                 "frame": MaterialChoice(p["frame_conductivity"], density=FRAME_DENSITY,
                                         specific_heat=FRAME_SPECIFIC_HEAT)}
    if tr > 0:
        regions.append(region("reveal_insulation", rect(0, -tr, xf, 0)))
        materials["reveal_insulation"] = p["reveal_insulation_material"]
    outside = [(0, lw), (0, -tr), (xf, -tr), (xf, -bf)]
    boundaries = [
        boundary("outside", RSE, outside),
        boundary("inside", RSI_HORIZONTAL, [(xf + df, -bf), (xf + df, 0)],
                 condensation_resistance=RSI_CONDENSATION_FRAME),
        boundary("inside", RSI_HORIZONTAL, [(xf + df, 0), (t, 0), (t, lw)]),
    ]
    y_frame = -(bf + tr) / 2
    flank = [flanking("wall", lw, (0, lw - CUT_INSET), (t, lw - CUT_INSET)),
             flanking("frame", bf, (xf, y_frame), (xf + df, y_frame))]
    return request(f"Window reveal, frame {df:g} × {bf:g} mm at {xf:g} mm",
                   "Template window_reveal. The wall and frame lengths are the same in "
                   "internal and external dimensions; the frame's glass edge is modelled "
                   "adiabatic and the glazing is not modelled.", materials, regions, boundaries,
                   flank, None)


def _check(p: dict[str, Any], t: float) -> None:
    xf, df = p["frame_offset"], p["frame_depth"]
    if xf + df > t:
        raise invalid("frame_offset", f"the frame (offset {xf:g} + depth {df:g} mm) must fit "
                      f"within the wall thickness ({t:g} mm including insulation)")
    tr = p["reveal_insulation_thickness"]
    if tr > 0 and xf <= 0:
        raise invalid("reveal_insulation_thickness", "reveal insulation needs the frame set "
                      "back from the outer wall face (frame_offset above 0)")
    if tr >= p["frame_width"]:
        raise invalid("reveal_insulation_thickness", f"reveal insulation ({tr:g} mm) must be "
                      f"thinner than the frame width ({p['frame_width']:g} mm)")
