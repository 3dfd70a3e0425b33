"""Write request.json: the U_f evaluation of the templates' five-chamber frame (ISO 10077-2
calibration-panel method). Run from anywhere: ``python examples/window-frame-uf/make_request.py``.

The frame fills x 0..70 mm, y −110..0 mm (edge at y = 0 adiabatic, where it meets the wall);
an insulation panel (λ = 0.035 W/(m·K), 24 mm thick, 190 mm visible [ISO 10077-2 calibration
panel, recalled from memory]) replaces the glazing below it.
"""

from __future__ import annotations

import json
from pathlib import Path

from coldseam.templates.base import RSE, RSI_HORIZONTAL, boundary, rect, region
from coldseam.templates.frame_profile import CHAMBER_AIR, frame_regions

DEPTH, WIDTH, CHAMBERS = 70.0, 110.0, 5
PANEL_LAMBDA, PANEL_THICKNESS, PANEL_LENGTH = 0.035, 24.0, 190.0


def panel_u_value() -> float:
    """U_p = 1/(Rse + d/λ + Rsi), W/(m²·K) (ISO 6946 with Rsi 0.13, Rse 0.04)."""
    return 1 / (RSE + PANEL_THICKNESS / 1000 / PANEL_LAMBDA + RSI_HORIZONTAL)


def request() -> dict:
    x0 = (DEPTH - PANEL_THICKNESS) / 2
    x1, y_end = x0 + PANEL_THICKNESS, -WIDTH - PANEL_LENGTH
    return {
        "section": {
            "name": "Five-chamber frame with calibration panel", "unit": "mm",
            "materials": [{"id": "frame", "library": "pvc_rigid"},
                          {"id": "panel", "conductivity": PANEL_LAMBDA}, CHAMBER_AIR],
            "regions": [*frame_regions(0, -WIDTH, DEPTH, 0, CHAMBERS),
                        region("panel", rect(x0, y_end, x1, -WIDTH))],
            "environments": [{"id": "inside", "temperature": 20, "side": "interior"},
                             {"id": "outside", "temperature": 0, "side": "exterior"}],
            "boundaries": [
                boundary("outside", RSE, [(0, 0), (0, -WIDTH), (x0, -WIDTH), (x0, y_end)]),
                boundary("inside", RSI_HORIZONTAL,
                         [(DEPTH, 0), (DEPTH, -WIDTH), (x1, -WIDTH), (x1, y_end)])],
        },
        "psi": {"frame": {"panel": {"width": PANEL_LENGTH, "u_value": round(panel_u_value(), 6)},
                          "frame_width": WIDTH}},
    }


if __name__ == "__main__":
    out = Path(__file__).with_name("request.json")
    out.write_text(json.dumps(request(), indent=1) + "\n")
