"""A generic multi-chamber window frame profile for the window templates (invented, plausible
dimensions; no manufacturer's profile).

The profile is a rectangle of frame material (PVC by default) with ``chambers`` air chambers
across its depth and two rows across its width, separated by webs; every chamber is an air
cavity (material ``frame_air``) whose λeq the engine computes (ISO 10077-2). Lengths in mm.
"""

from __future__ import annotations

from typing import Any

from coldseam.templates.base import rect, region

#: Outer wall and inner web thickness of the profile, mm (typical of PVC frames [P]).
OUTER_WALL = 3.0
WEB = 2.5
ROWS = 2
#: The material entry of the chambers: unventilated, ε = 0.9 (ISO 10077-2 defaults).
CHAMBER_AIR = {"id": "frame_air", "cavity": {"ventilation": "unventilated", "emissivity": 0.9}}


def frame_regions(x0: float, y0: float, x1: float, y1: float, chambers: int,
                  material_id: str = "frame") -> list[dict[str, Any]]:
    """The profile filling the rectangle (x0, y0)-(x1, y1): chambers across x (the depth),
    ROWS rows across y; the block first, the chambers drawn over it."""
    depth, width = x1 - x0, y1 - y0
    cx = (depth - 2 * OUTER_WALL - (chambers - 1) * WEB) / chambers
    cy = (width - 2 * OUTER_WALL - (ROWS - 1) * WEB) / ROWS
    regions = [region(material_id, rect(x0, y0, x1, y1))]
    for i in range(chambers):
        for j in range(ROWS):
            ax = x0 + OUTER_WALL + i * (cx + WEB)
            ay = y0 + OUTER_WALL + j * (cy + WEB)
            regions.append(region("frame_air", rect(ax, ay, ax + cx, ay + cy)))
    return regions
