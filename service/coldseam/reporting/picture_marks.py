"""What the picture draws over the temperature field: material outlines, exposed surfaces by
environment, adiabatic edges and the minimum interior surface temperatures."""

from __future__ import annotations

from typing import Any

import numpy as np
from matplotlib import patheffects
from matplotlib.collections import LineCollection
from matplotlib.lines import Line2D

from coldseam.reporting.colours import EXTERIOR_COLOURS, INTERIOR_COLOURS
from coldseam.reporting.picture_labels import Occupied, mark_point, place_mark_label

#: A white halo keeps the surface colours readable over both ends of the thermal map.
_HALO = [patheffects.withStroke(linewidth=4.0, foreground="white")]


def draw_outlines(ax, field: dict[str, Any], scale: float) -> None:
    """Material outlines and holes as thin dark lines."""
    rings = []
    for piece in field.get("pieces") or []:
        for ring in [piece.get("polygon") or []] + list(piece.get("holes") or []):
            if len(ring) >= 2:
                rings.append(np.asarray(ring, dtype=float) * scale)
    if rings:
        ax.add_collection(LineCollection(rings, colors="0.08", linewidths=0.6, alpha=0.85,
                                         zorder=3))


def draw_boundaries(ax, field: dict[str, Any], scale: float) -> list:
    """Exposed surfaces coloured by environment, adiabatic edges dotted; legend handles."""
    handles = []
    used = {"interior": 0, "exterior": 0}
    for env, (side, resistances, segments) in _by_environment(field).items():
        colour = _colour(side, used[side])
        used[side] += 1
        lines = LineCollection([np.asarray(s, dtype=float) * scale for s in segments],
                               colors=colour, linewidths=2.0, zorder=4,
                               linestyles="solid" if side == "interior" else (0, (4, 1.5)))
        lines.set_path_effects(_HALO)
        ax.add_collection(lines)
        rs = " / ".join(f"{r:g}" for r in resistances)
        given = "known surface temperature (Rs 0)" if resistances and not any(resistances) \
            else f"Rs {rs} m²·K/W"
        label = f"{escape_math(env[:60])}: {given}, {side}"
        handles.append(Line2D([], [], color=colour, linewidth=2.0, path_effects=_HALO,
                              linestyle="-" if side == "interior" else (0, (4, 1.5)),
                              label=label))
    adiabatic = [np.asarray(s, dtype=float) * scale for s in field.get("adiabatic") or []]
    if adiabatic:
        ax.add_collection(LineCollection(adiabatic, colors="0.3", linewidths=1.6,
                                         linestyles=(0, (1, 1.5)), zorder=4))
        handles.append(Line2D([], [], color="0.3", linewidth=1.6, linestyle=(0, (1, 1.5)),
                              label="adiabatic (cut-off plane or symmetry line)"))
    return handles


def _by_environment(field: dict[str, Any]) -> dict[str, tuple[str, list[float], list]]:
    grouped: dict[str, tuple[str, list[float], list]] = {}
    for boundary in field.get("boundaries") or []:
        env = str(boundary.get("environment", "?"))
        side = "interior" if boundary.get("side") == "interior" else "exterior"
        entry = grouped.setdefault(env, (side, [], []))
        rs = boundary.get("surface_resistance")
        if isinstance(rs, int | float) and rs not in entry[1]:
            entry[1].append(float(rs))
        entry[2].extend(s for s in boundary.get("segments") or [] if len(s) == 2)
    return grouped


def _colour(side: str, k: int) -> str:
    palette = INTERIOR_COLOURS if side == "interior" else EXTERIOR_COLOURS
    return palette[k % len(palette)]


def draw_minima(ax, field: dict[str, Any], result: dict[str, Any], scale: float,
                occupied: Occupied, renderer) -> list:
    """Mark and label θsi,min of the design run (circle) and of the fRsi run
    (diamond, with fRsi); one label where both fall on the same point, and no label over
    another (``picture_labels``). Legend handles."""
    marks = _minima(field, result)
    handles = []
    placed: list[tuple[np.ndarray, list[str]]] = []
    for at, text, marker in marks:
        point = np.asarray(at, dtype=float) * scale
        ax.plot(*point, marker=marker, markersize=7, markerfacecolor="white",
                markeredgecolor="black", markeredgewidth=1.2, zorder=6, linestyle="none")
        mark_point(ax, point, occupied)
        same = next((p for p in placed if np.allclose(p[0], point, atol=1e-9 * scale)), None)
        if same is not None:
            same[1].append(text)
        else:
            placed.append((point, [text]))
    for point, texts in placed:
        place_mark_label(ax, point, "\n".join(texts), occupied, renderer, fontsize=7.5,
                         zorder=7, bbox=LABEL_BOX, arrowprops=LABEL_ARROW)
    if any(m == "o" for _, _, m in marks):
        handles.append(Line2D([], [], marker="o", color="black", markerfacecolor="white",
                              linestyle="none", label="θsi,min, design run"))
    if any(m == "D" for _, _, m in marks):
        handles.append(Line2D([], [], marker="D", color="black", markerfacecolor="white",
                              linestyle="none", label="θsi,min, fRsi run"))
    return handles


def _minima(field: dict[str, Any], result: dict[str, Any]) -> list[tuple[list, str, str]]:
    sides = {str(b.get("environment")): b.get("side") for b in field.get("boundaries") or []}
    known = _known_temperature_surfaces(field)
    marks = []
    minima = {env: block for env, block in (field.get("min_surface") or {}).items()
              if sides.get(str(env), "interior") == "interior" and _valid(block)
              and str(env) not in known}
    for env, block in minima.items():
        name = f", {escape_math(str(env)[:40])}" if len(minima) > 1 else ""
        text = f"θsi,min {block['temperature']:.2f} °C (design run{name})"
        marks.append((block["at"], text, "o"))
    condensation = field.get("condensation_min")
    if _valid(condensation):
        block = result.get("condensation") if isinstance(result.get("condensation"), dict) else {}
        rsi = block.get("interior_surface_resistance")
        run = f"at Rsi {rsi:g}" if _num(rsi) else "(fRsi run)"
        text = f"θsi,min {condensation['temperature']:.2f} °C {run}"
        if _num(block.get("fRsi")):
            text += f", fRsi {block['fRsi']:.3f}"
        marks.append((condensation["at"], text, "D"))
    return marks


LABEL_BOX = {"boxstyle": "round,pad=0.3", "facecolor": "white", "alpha": 0.9,
             "edgecolor": "0.3", "linewidth": 0.6}
LABEL_ARROW = {"arrowstyle": "-", "color": "black", "linewidth": 0.8}


def _known_temperature_surfaces(field: dict[str, Any]) -> set[str]:
    """Environments all of whose surfaces have Rs = 0: their temperature is given, not found,
    so a minimum there marks nothing."""
    resistances: dict[str, list] = {}
    for b in field.get("boundaries") or []:
        resistances.setdefault(str(b.get("environment")), []).append(b.get("surface_resistance"))
    return {env for env, rs in resistances.items() if all(r == 0 for r in rs)}


def escape_math(text: str) -> str:
    """User text for matplotlib: a '$' would start mathtext (and can fail to parse).

    >>> escape_math("cost $5")
    'cost \\\\$5'
    """
    return text.replace("$", r"\$")


def _valid(block: Any) -> bool:
    if not isinstance(block, dict) or not _num(block.get("temperature")):
        return False
    at = block.get("at")
    return isinstance(at, list | tuple) and len(at) == 2 and all(_num(v) for v in at)


def _num(value: Any) -> bool:
    return isinstance(value, int | float) and not isinstance(value, bool) and np.isfinite(value)
