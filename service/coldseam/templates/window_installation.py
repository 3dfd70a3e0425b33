"""Window installation junction: plan section through a jamb, a multi-chamber frame set in
the opening of an externally insulated wall, glazing as a panel of its centre U-value.

Outer face of the wall insulation at x = 0, room side at x = wall thickness; the wall runs
from the reveal (y = 0) to its cut-off plane; the frame fills y from −frame width to 0 at
``frame_offset`` from the outer face, its chambers air cavities (ISO 10077-2 λeq); the glazing,
a panel of equivalent conductivity giving its U_g, runs GLAZING_LENGTH beyond the frame to an
adiabatic cut. ψ of the installation = L2D − U_wall·l_wall − U_f·b_f − U_g·l_g with U_f given
(e.g. from the frame's own calibration-panel evaluation, `psi.frame`).

Invented but plausible dimensions; no manufacturer's profile. Simplifications: the glazing
butts the frame (no rebate, gasket or spacer: see ``glazing_edge``), the frame sits directly
against the reveal (no installation joint), and Rsi is 0.13 everywhere (ISO 10077-2 takes 0.20
in re-entrant corners [from memory]).
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
    choice,
    cutoff_distance,
    flanking,
    invalid,
    length,
    material,
    rect,
    region,
    request,
    wall_insulation,
    wall_structure,
)
from coldseam.templates.frame_profile import CHAMBER_AIR, frame_regions

#: Visible glazing modelled beyond the frame, mm (ISO 10077-2 asks for at least 190 mm
#: [recalled from memory]).
GLAZING_LENGTH = 190.0

INFO = TemplateInfo(
    id="window_installation",
    title="Window installation (frame in a wall)",
    description="Plan section through a window jamb: a multi-chamber frame (air chambers as "
    "ISO 10077-2 cavities) in the opening of an externally insulated wall, glazing as a panel "
    "of its U-value.",
    parameters=(
        *wall_structure(150, 300),
        *wall_insulation(low=60, high=300),
        length("frame_depth", 70, 60, 90, "Depth of the frame profile through the wall"),
        length("frame_width", 110, 80, 140, "Visible (projected) width of the frame"),
        choice("chambers", ("3", "4", "5"), "Air chambers across the frame depth"),
        material("frame_material", "pvc_rigid", "Frame profile material"),
        length("frame_offset", 80, 0, 120, "Distance from the outer face of the wall "
               "insulation to the outer face of the frame"),
        Parameter("frame_u_value", "W/(m²·K)", 1.3, "U_f of the frame for ψ (from its own "
                  "calibration-panel evaluation)", "number", 0.5, 5.0),
        Parameter("glazing_u_value", "W/(m²·K)", 1.1, "Centre-of-glass U_g of the glazing",
                  "number", 0.5, 3.0),
        length("glazing_thickness", 24, 16, 44, "Thickness of the glazing unit"),
    ),
)


def glazing_conductivity(u_value: float, thickness_mm: float) -> float:
    """λ of a panel `thickness_mm` thick whose 1D U between Rse and Rsi is `u_value`, W/(m·K)."""
    return thickness_mm / 1000 / (1 / u_value - RSE - RSI_HORIZONTAL)


def build(p: dict[str, Any]) -> dict[str, Any]:
    ti, t = p["insulation_thickness"], p["insulation_thickness"] + p["wall_thickness"]
    xf, df, bf, tg = p["frame_offset"], p["frame_depth"], p["frame_width"], p["glazing_thickness"]
    _check_alignment(xf, df, (0.0, ti, t))
    lw, yg = cutoff_distance(t), -bf - GLAZING_LENGTH
    xg0 = xf + (df - tg) / 2
    xg1 = xg0 + tg
    regions = [region("insulation", rect(0, 0, ti, lw)), region("wall", rect(ti, 0, t, lw)),
               *frame_regions(xf, -bf, xf + df, 0, int(p["chambers"])),
               region("glazing", rect(xg0, yg, xg1, -bf))]
    materials = {"wall": p["wall_material"], "insulation": p["insulation_material"],
                 "frame": p["frame_material"],
                 "glazing": MaterialChoice(glazing_conductivity(p["glazing_u_value"], tg))}
    boundaries = [
        boundary("outside", RSE, [(0, lw), (0, 0), (xf, 0), (xf, -bf), (xg0, -bf), (xg0, yg)]),
        boundary("inside", RSI_HORIZONTAL, [(t, lw), (t, 0), (xf + df, 0)]),
        boundary("inside", RSI_HORIZONTAL, [(xf + df, 0), (xf + df, -bf), (xg1, -bf), (xg1, yg)],
                 condensation_resistance=RSI_CONDENSATION_FRAME),
    ]
    flank = [flanking("wall", lw, (0, lw - CUT_INSET), (t, lw - CUT_INSET)),
             {"id": "frame", "length": bf, "u_value": p["frame_u_value"]},
             flanking("glazing", GLAZING_LENGTH, (xg0, yg + CUT_INSET), (xg1, yg + CUT_INSET))]
    data = request(f"Window installation, {p['chambers']}-chamber frame {df:g} × {bf:g} mm at "
                   f"{xf:g} mm", "Template window_installation. Frame chambers are air "
                   "cavities (ISO 10077-2 λeq); the glazing is a panel of its U-value; U_f is "
                   "given.", materials, regions, boundaries, flank, None)
    data["section"]["materials"].append(dict(CHAMBER_AIR, cavity=dict(CHAMBER_AIR["cavity"])))
    return data


#: A frame face this close to a wall layer joint (mm) but not on it would leave a sliver.
ALIGNMENT = 1.0


def _check_alignment(xf: float, df: float, joints: tuple[float, ...]) -> None:
    for face in (xf, xf + df):
        for joint in joints:
            if 0 < abs(face - joint) < ALIGNMENT:
                raise invalid("frame_offset", f"a face of the frame (at {face:g} mm) lies "
                              f"{abs(face - joint):.3g} mm from a joint of the wall layers "
                              f"(at {joint:g} mm): put it on the joint or at least "
                              f"{ALIGNMENT:g} mm away")
