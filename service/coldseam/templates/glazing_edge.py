"""Glazing edge: a double-glazed unit with its spacer and edge seal, set against a
multi-chamber frame; ψ_g = L2D − U_f·b_f − U_g·l_g (ISO 10077-2, with U_f given).

The frame fills x from 0 to its depth and y from −frame width to 0; its edge at y = 0 (where it
would meet the wall) is adiabatic, as in a frame evaluation. The glazing unit, two 4 mm panes
and a gas gap of the λ that gives U_g, runs GLAZING_LENGTH beyond the frame to an adiabatic
cut. At its edge the gap holds the secondary seal (polysulfide) and a hollow spacer (metal or
plastic walls around desiccant). Invented but plausible dimensions; no manufacturer's profile.
The glazing butts the frame (no rebate or gaskets), Rsi is 0.13 everywhere.
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
    flanking,
    length,
    material,
    rect,
    region,
    request,
)
from coldseam.templates.frame_profile import CHAMBER_AIR, frame_regions
from coldseam.templates.window_installation import GLAZING_LENGTH

PANE = 4.0  # mm, float glass
SEAL = 4.0  # mm, secondary seal depth
SPACER_HEIGHT = 7.0  # mm
#: Spacer kinds: (wall material, wall λ W/(m·K), wall thickness mm). Aluminium and stainless
#: steel: EN 12524 / ISO 10456 λ; the composite "warm edge" wall λ 0.16 is a typical
#: declared value (common practice). Wall thicknesses invented but plausible.
SPACERS = {"aluminium": ("aluminium_alloy", None, 0.4),
           "stainless_steel": ("stainless_steel", None, 0.2),
           "warm_edge": (None, 0.16, 1.0)}
#: Desiccant-filled core of the spacer, λ W/(m·K) (common practice, typical value).
DESICCANT = 0.13

INFO = TemplateInfo(
    id="glazing_edge",
    title="Glazing edge (spacer)",
    description="Section through the edge of a double-glazed unit in a multi-chamber frame "
    "(air chambers as ISO 10077-2 cavities): the spacer's ψ_g.",
    parameters=(
        length("frame_depth", 70, 60, 90, "Depth of the frame profile"),
        length("frame_width", 110, 80, 140, "Visible (projected) width of the frame"),
        choice("chambers", ("3", "4", "5"), "Air chambers across the frame depth"),
        material("frame_material", "pvc_rigid", "Frame profile material"),
        Parameter("frame_u_value", "W/(m²·K)", 1.3, "U_f of the frame for ψ_g (from its own "
                  "calibration-panel evaluation)", "number", 0.5, 5.0),
        Parameter("glazing_u_value", "W/(m²·K)", 1.1, "Centre-of-glass U_g", "number",
                  0.5, 3.0),
        length("glazing_thickness", 24, 20, 44, "Thickness of the glazing unit"),
        choice("spacer", tuple(SPACERS), "Spacer kind"),
    ),
)


def gap_conductivity(u_value: float, thickness_mm: float) -> float:
    """λ of the gas gap that gives the unit a 1D U of ``u_value`` between Rse and Rsi."""
    gap = (thickness_mm - 2 * PANE) / 1000
    return gap / (1 / u_value - RSE - RSI_HORIZONTAL - 2 * PANE / 1000 / 1.0)


def build(p: dict[str, Any]) -> dict[str, Any]:
    df, bf, tg = p["frame_depth"], p["frame_width"], p["glazing_thickness"]
    yg, xg0 = -bf - GLAZING_LENGTH, (df - tg) / 2
    xg1 = xg0 + tg
    library, lam, wall = SPACERS[p["spacer"]]
    spacer = MaterialChoice(17.0, library) if library else MaterialChoice(lam)
    regions = [*frame_regions(0, -bf, df, 0, int(p["chambers"])),
               region("glass", rect(xg0, yg, xg1, -bf)),
               region("gas", rect(xg0 + PANE, yg, xg1 - PANE, -bf)),
               region("seal", rect(xg0 + PANE, -bf - SEAL, xg1 - PANE, -bf)),
               region("spacer", rect(xg0 + PANE, -bf - SEAL - SPACER_HEIGHT, xg1 - PANE,
                                     -bf - SEAL)),
               region("desiccant", rect(xg0 + PANE + wall, -bf - SEAL - SPACER_HEIGHT + wall,
                                        xg1 - PANE - wall, -bf - SEAL - wall))]
    materials = {"frame": p["frame_material"], "glass": MaterialChoice(1.0, "glass_soda_lime"),
                 "gas": MaterialChoice(gap_conductivity(p["glazing_u_value"], tg)),
                 "seal": MaterialChoice(0.40, "polysulfide"), "spacer": spacer,
                 "desiccant": MaterialChoice(DESICCANT)}
    boundaries = [
        boundary("outside", RSE, [(0, 0), (0, -bf), (xg0, -bf), (xg0, yg)]),
        boundary("inside", RSI_HORIZONTAL, [(df, 0), (df, -bf), (xg1, -bf), (xg1, yg)],
                 condensation_resistance=RSI_CONDENSATION_FRAME),
    ]
    flank = [{"id": "frame", "length": bf, "u_value": p["frame_u_value"]},
             flanking("glazing", GLAZING_LENGTH, (xg0, yg + CUT_INSET), (xg1, yg + CUT_INSET))]
    data = request(f"Glazing edge, {p['spacer'].replace('_', ' ')} spacer, {tg:g} mm unit",
                   "Template glazing_edge. Frame chambers are air cavities (ISO 10077-2 "
                   "λeq); the gas gap is a solid of the λ that gives U_g; U_f is given.",
                   materials, regions, boundaries, flank, None)
    data["section"]["materials"].append(dict(CHAMBER_AIR, cavity=dict(CHAMBER_AIR["cavity"])))
    return data
