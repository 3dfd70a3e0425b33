"""Air cavities in the picture: each cavity hatched over the temperature field (Coldseam's
cavity hatch: fine diagonal lines, dark with a light outline), one legend entry for all."""

from __future__ import annotations

from typing import Any

import numpy as np
from matplotlib.patches import Patch, PathPatch
from matplotlib.path import Path

HATCH = "////"
HATCH_COLOUR = "#1b2a33"


def draw_cavities(ax, field: dict[str, Any], scale: float) -> list:
    """Hatch every cavity of the field document; the legend handle (none without cavities)."""
    cavities = [c for c in field.get("cavities") or [] if c.get("rings")]
    for cavity in cavities:
        vertices, codes = [], []
        for ring in cavity["rings"]:
            xy = np.asarray(ring, dtype=float) * scale
            if len(xy) < 3:
                continue
            vertices.extend(xy.tolist())
            codes.extend([Path.MOVETO] + [Path.LINETO] * (len(xy) - 2) + [Path.CLOSEPOLY])
        if vertices:
            ax.add_patch(PathPatch(Path(vertices, codes), facecolor="none", hatch=HATCH,
                                   edgecolor=HATCH_COLOUR, linewidth=0.0, zorder=2.5))
    if not cavities:
        return []
    return [Patch(facecolor="none", edgecolor=HATCH_COLOUR, hatch=HATCH,
                  label="air cavity (λeq per cavity, see the report)")]
