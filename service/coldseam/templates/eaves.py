"""Eaves: a flat or pitched roof meeting an externally insulated wall (vertical section).

The roof is a layered strip (structure below, insulation above) rising at the pitch from the
wall's inner top corner (x = wall thickness, y = 0) towards the room; its structure bears on
the wall structure and the wall insulation runs up to meet the roof insulation. The roof ends
in a cut-off plane normal to its layers, max(1 m, 3 × roof thickness) along the slope from
the inner corner.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from coldseam.templates.base import (
    CUT_INSET,
    RSE,
    RSI_HORIZONTAL,
    RSI_UPWARD,
    Parameter,
    TemplateInfo,
    boundary,
    cutoff_distance,
    dimensions,
    flanking,
    length,
    material,
    region,
    request,
    wall_insulation,
    wall_structure,
)

INFO = TemplateInfo(
    id="eaves",
    title="Eaves, flat or pitched roof",
    description="Vertical section where a flat or pitched roof meets an externally insulated "
    "wall, the wall insulation running up to the roof insulation.",
    parameters=(
        *wall_structure(),
        *wall_insulation("wall_", "Wall insulation"),
        Parameter("roof_pitch", "°", 0, "Roof pitch (0: flat)", "number", 0, 55),
        length("roof_structure_thickness", 200, 20, 400, "Thickness of the roof structure"),
        material("roof_structure_material", "reinforced_concrete_1pct", "Roof structure"),
        length("roof_insulation_thickness", 200, 20, 500, "Thickness of the roof insulation"),
        material("roof_insulation_material", "pir_022", "Roof insulation"),
        dimensions("wall and roof"),
    ),
)


@dataclass(frozen=True)
class _Eaves:
    """Geometry in mm: wall thickness t (insulation ti), roof layers dr + tr at pitch alpha."""

    t: float
    ti: float
    h: float
    dr: float
    d: float
    alpha: float

    @property
    def slope(self) -> float:
        """Length of the roof along the slope from the inner corner to its cut-off plane."""
        return cutoff_distance(self.d)

    @property
    def along(self) -> tuple[float, float]:
        return (math.cos(self.alpha), math.sin(self.alpha))

    @property
    def normal(self) -> tuple[float, float]:
        return (-math.sin(self.alpha), math.cos(self.alpha))

    def underside(self, x: float) -> float:
        """Height of the roof underside (ceiling line) at x; 0 at the wall's inner face."""
        return (x - self.t) * math.tan(self.alpha)

    def structure_top(self, x: float) -> float:
        return self.underside(x) + self.dr / math.cos(self.alpha)

    def top(self, x: float) -> float:
        return self.underside(x) + self.d / math.cos(self.alpha)

    def end(self, depth: float = 0.0) -> tuple[float, float]:
        """The point ``depth`` above the roof underside on the roof's cut-off plane."""
        foot = _offset((self.t, 0.0), self.along, self.slope)
        return _offset(foot, self.normal, depth)


def build(p: dict[str, Any]) -> dict[str, Any]:
    e = _Eaves(t=p["wall_insulation_thickness"] + p["wall_thickness"],
               ti=p["wall_insulation_thickness"],
               h=cutoff_distance(p["wall_insulation_thickness"] + p["wall_thickness"]),
               dr=p["roof_structure_thickness"],
               d=p["roof_structure_thickness"] + p["roof_insulation_thickness"],
               alpha=math.radians(p["roof_pitch"]))
    t, h, ti = e.t, e.h, e.ti
    regions = [
        region("wall_insulation", [(0, -h), (ti, -h), (ti, e.structure_top(ti)),
                                   (0, e.structure_top(0))]),
        region("wall", [(ti, -h), (t, -h), (t, 0), (ti, e.underside(ti))]),
        # Shared vertices are repeated in both neighbours so that the edges coincide exactly.
        region("roof_structure", [(ti, e.underside(ti)), (t, 0), e.end(), e.end(e.dr),
                                  (ti, e.structure_top(ti))]),
        region("roof_insulation", [(0, e.structure_top(0)), (ti, e.structure_top(ti)),
                                   e.end(e.dr), e.end(e.d), (0, e.top(0))]),
    ]
    boundaries = [
        boundary("outside", RSE, [(0, -h), (0, e.top(0)), e.end(e.d)]),
        boundary("inside", RSI_HORIZONTAL, [(t, -h), (t, 0)]),
        boundary("inside", RSI_UPWARD, [(t, 0), e.end()]),
    ]
    materials = {"wall": p["wall_material"], "wall_insulation": p["wall_insulation_material"],
                 "roof_structure": p["roof_structure_material"],
                 "roof_insulation": p["roof_insulation_material"]}
    return request(f"Eaves, roof pitch {p['roof_pitch']:g}°", "Template eaves.", materials,
                   regions, boundaries, _flanking(e, p["dimensions"]), p["dimensions"])


def _offset(point: tuple, direction: tuple, distance: float) -> tuple[float, float]:
    return (point[0] + distance * direction[0], point[1] + distance * direction[1])


def _flanking(e: _Eaves, dimensions: str) -> list[dict[str, Any]]:
    """Wall and roof; external lengths run on the outer faces up to their meeting point."""
    cut_foot = _offset(e.end(), e.along, -CUT_INSET)
    roof_cut = (cut_foot, _offset(cut_foot, e.normal, e.d))
    if dimensions == "external":
        top = e.end(e.d)
        wall_length = e.h + e.top(0)
        roof_length = math.hypot(top[0], top[1] - e.top(0))
    else:
        wall_length, roof_length = e.h, e.slope
    wall_cut = -e.h + CUT_INSET
    return [flanking("wall", wall_length, (0, wall_cut), (e.t, wall_cut)),
            flanking("roof", roof_length, *roof_cut)]
