"""The temperature field of an evaluation as a picture (SVG or PNG).

Filled temperature bands in Coldseam's thermal colour map (the page's, see
``coldseam.reporting.colours``: lightness rising from deep blue-violet for cold to pale straw
for warm, readable in grey), isotherms every 1, 2, 5 or 10 K labelled where they find room
(``picture_labels``), material outlines, exposed surfaces marked by environment, the minimum
interior surface temperatures marked and labelled, a colour bar in °C and the caution.

Figures are built on ``matplotlib.figure.Figure`` with their own canvas: no pyplot, no global
figure state, safe to call from several threads.
"""

from __future__ import annotations

import io
import logging
import textwrap
import threading
from dataclasses import dataclass
from typing import Any

import matplotlib
import numpy as np
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure
from matplotlib.tri import Triangulation

from coldseam import CAUTION
from coldseam.reporting.colours import thermal_colour_map
from coldseam.reporting.picture_cavities import draw_cavities
from coldseam.reporting.picture_labels import label_isotherms, occupied_for
from coldseam.reporting.picture_marks import (
    draw_boundaries,
    draw_minima,
    draw_outlines,
    escape_math,
)

logger = logging.getLogger(__name__)

#: Isotherm steps in K; the smallest giving at most MAX_ISOTHERMS lines is used.
ISOTHERM_STEPS = (1.0, 2.0, 5.0, 10.0, 20.0, 50.0)
MAX_ISOTHERMS = 14
#: Filled bands per isotherm step.
BANDS_PER_STEP = 5
FIGURE_WIDTH = 8.0
MIN_FIGURE_WIDTH = 6.0
MAX_PLOT_HEIGHT = 7.5
#: Sections up to this size (m) are drawn with axes in mm.
MM_AXES_UP_TO = 5.0
PNG_DPI = 130
#: Resolution of the temperature bands, embedded as an image in the SVG.
SVG_RASTER_DPI = 150
#: rcParams are process-wide: SVG text settings are applied under this lock only.
_SVG_LOCK = threading.Lock()


def render_svg(field: dict[str, Any], result: dict[str, Any]) -> str:
    """The picture as an SVG document (text kept as text, no dates: same input, same bytes)."""
    figure = draw(field, result)
    buffer = io.StringIO()
    with _SVG_LOCK, matplotlib.rc_context({"svg.fonttype": "none", "svg.hashsalt": "coldseam"}):
        figure.savefig(buffer, format="svg", dpi=SVG_RASTER_DPI, metadata={"Date": None})
    return buffer.getvalue()


def render_png(field: dict[str, Any], result: dict[str, Any]) -> bytes:
    """The picture as PNG bytes."""
    figure = draw(field, result)
    buffer = io.BytesIO()
    figure.savefig(buffer, format="png", dpi=PNG_DPI, metadata={"Software": None})
    return buffer.getvalue()


def draw(field: dict[str, Any], result: dict[str, Any]) -> Figure:
    """The figure: temperature field, marks, colour bar, title and caution."""
    points = np.asarray(field.get("points") or [], dtype=float).reshape(-1, 2)
    triangles = np.asarray(field.get("triangles") or [], dtype=int).reshape(-1, 3)
    theta = np.asarray(field.get("temperature") or [], dtype=float)
    if len(triangles) == 0 or len(theta) != len(points):
        raise ValueError("the evaluation has no temperature field to draw")
    low, high = points.min(axis=0), points.max(axis=0)
    scale, unit = (1000.0, "mm") if (high - low).max() <= MM_AXES_UP_TO else (1.0, "m")
    title = _wrapped_title(result, (high - low) * scale)
    layout = Layout.for_extent((high - low) * scale, title.count("\n") + 1)
    figure = Figure(figsize=layout.size)
    FigureCanvasAgg(figure)  # its own canvas: nothing registered with pyplot
    ax = figure.add_axes(layout.axes)
    tri = Triangulation(points[:, 0] * scale, points[:, 1] * scale, triangles)
    isotherms = _draw_temperature(figure.add_axes(layout.colour_bar), ax, tri, theta)
    draw_outlines(ax, field, scale)
    handles = draw_boundaries(ax, field, scale) + draw_cavities(ax, field, scale)
    _frame(ax, unit, low * scale, high * scale)
    renderer = figure.canvas.get_renderer()
    occupied = occupied_for(ax, renderer)
    handles += draw_minima(ax, field, result, scale, occupied, renderer)
    if isotherms is not None:
        label_isotherms(ax, isotherms, occupied, renderer)
    _texts(figure, layout, title, handles)
    logger.debug("drew %d triangles", len(triangles))
    return figure


@dataclass(frozen=True)
class Layout:
    """Figure size (in) and axes rectangles (figure fractions), fixed in advance: faster
    than a layout engine and exact for an equal-aspect plot."""

    size: tuple[float, float]
    axes: tuple[float, float, float, float]
    colour_bar: tuple[float, float, float, float]

    @classmethod
    def for_extent(cls, extent: np.ndarray, title_lines: int = 2) -> Layout:
        left, right, bottom = 0.85, 1.25, 1.3  # inches around the plot
        top = 0.35 + 0.2 * max(title_lines, 2)
        aspect = float(extent[1] / extent[0]) if extent[0] > 0 else 1.0
        width = FIGURE_WIDTH - left - right
        height = width * aspect
        if height > MAX_PLOT_HEIGHT:
            height, width = MAX_PLOT_HEIGHT, MAX_PLOT_HEIGHT / aspect
        height = max(height, 1.5)
        fig_w, fig_h = max(left + width + right, MIN_FIGURE_WIDTH), height + top + bottom
        axes = (left / fig_w, bottom / fig_h, width / fig_w, height / fig_h)
        bar_h = min(height, 5.0)
        bar = ((left + width + 0.3) / fig_w, (bottom + (height - bar_h) / 2) / fig_h,
               0.18 / fig_w, bar_h / fig_h)
        return cls((fig_w, fig_h), axes, bar)


def _draw_temperature(bar_ax, ax, tri: Triangulation, theta: np.ndarray):
    """Bands and colour bar; the isotherms' contour set (labelled later), or None."""
    low, high = float(theta.min()), float(theta.max())
    cmap = thermal_colour_map()
    if high - low < 1e-9:
        shaded = ax.tripcolor(tri, theta, cmap=cmap, vmin=low - 0.5, vmax=high + 0.5)
        bar_ax.figure.colorbar(shaded, cax=bar_ax).set_label("Temperature θ (°C)")
        return None
    step = isotherm_step(low, high)
    bands = np.linspace(low, high, max(2, int(np.ceil((high - low) / step * BANDS_PER_STEP))) + 1)
    filled = ax.tricontourf(tri, theta, levels=bands, cmap=cmap)
    filled.set_rasterized(True)  # a vector SVG of the bands would be megabytes
    lines = np.arange(np.ceil(low / step) * step, high + 1e-9, step)
    lines = lines[(lines > low + 1e-6) & (lines < high - 1e-6)]
    isotherms = None
    if len(lines):
        isotherms = ax.tricontour(tri, theta, levels=lines, colors="k", linewidths=0.5,
                                  alpha=0.7)
    bar = bar_ax.figure.colorbar(filled, cax=bar_ax, ticks=_ticks(low, high, step))
    bar.set_label("Temperature θ (°C)", fontsize=8)
    bar.ax.tick_params(labelsize=7)
    return isotherms


def isotherm_step(low: float, high: float) -> float:
    """The isotherm spacing in K for a temperature range.

    >>> isotherm_step(-5.0, 20.0), isotherm_step(0.0, 20.0), isotherm_step(18.0, 20.0)
    (2.0, 2.0, 1.0)
    """
    for step in ISOTHERM_STEPS:
        if (high - low) / step <= MAX_ISOTHERMS:
            return step
    return ISOTHERM_STEPS[-1]


def _ticks(low: float, high: float, step: float) -> np.ndarray:
    ticks = np.arange(np.ceil(low / step) * step, high + 1e-9, step)
    return ticks if len(ticks) >= 2 else np.array([low, high])


def _frame(ax, unit: str, low: np.ndarray, high: np.ndarray) -> None:
    pad = 0.02 * (high - low).max()
    ax.set_xlim(low[0] - pad, high[0] + pad)
    ax.set_ylim(low[1] - pad, high[1] + pad)
    ax.set_aspect("equal", adjustable="box")
    ax.set_xlabel(f"x ({unit})", fontsize=8)
    ax.set_ylabel(f"y ({unit})", fontsize=8)
    ax.tick_params(labelsize=7)


def _wrapped_title(result: dict[str, Any], extent: np.ndarray) -> str:
    width = Layout.for_extent(extent).size[0]
    return "\n".join(textwrap.fill(line, int(width * 11)) for line in _title(result).split("\n"))


def _texts(figure: Figure, layout: Layout, title: str, handles: list) -> None:
    height = layout.size[1]
    figure.text(0.02, 1 - 0.12 / height, title, fontsize=10, ha="left", va="top")
    if handles:
        figure.legend(handles=handles, fontsize=6.5, ncols=2, frameon=False, loc="upper left",
                      bbox_to_anchor=(layout.axes[0] - 0.05, layout.axes[1] - 0.42 / height))
    caution = "\n".join(textwrap.wrap(CAUTION, int(layout.size[0] * 16)))
    figure.text(0.02, 0.08 / height, escape_math(caution), fontsize=6, color="0.25",
                ha="left", va="bottom")


def _title(result: dict[str, Any]) -> str:
    name = escape_math(str(result.get("name") or "Section")[:120])
    figures = []
    if _is_number(result.get("L2D")):
        figures.append(f"L2D = {result['L2D']:.4f} W/(m·K)")
    psi = result.get("psi")
    if isinstance(psi, dict) and _is_number(psi.get("value")):
        figures.append(f"ψ = {psi['value']:.3f} W/(m·K)")
    condensation = result.get("condensation")
    if isinstance(condensation, dict) and _is_number(condensation.get("fRsi")):
        verdict = condensation.get("verdict")
        tail = f" ({escape_math(str(verdict))})" if isinstance(verdict, str) else ""
        figures.append(f"fRsi = {condensation['fRsi']:.3f}{tail}")
    mesh = result.get("mesh") if isinstance(result.get("mesh"), dict) else {}
    if mesh.get("certified_on") == "temperatures":
        figures.append("Temperature check: known surface temperatures meet at a corner, so "
                       "the heat flow is unbounded and not given; mesh certified on temperatures")
    return name + ("\n" + "   ".join(figures) if figures else "")


def _is_number(value: Any) -> bool:
    return isinstance(value, int | float) and not isinstance(value, bool) and np.isfinite(value)

