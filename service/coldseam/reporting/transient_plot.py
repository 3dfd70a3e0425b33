"""The transient response of an evaluation as a picture (SVG or PNG): the lowest surface
temperature of each interior environment over the run with the air temperatures, the dew
point when a condensation check was asked for, and the heat flows below. Built on
``matplotlib.figure.Figure`` with its own canvas (no pyplot), like ``picture``."""

from __future__ import annotations

import io
import textwrap
from typing import Any

import matplotlib
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure

from coldseam import CAUTION
from coldseam.reporting.picture import _SVG_LOCK, PNG_DPI
from coldseam.reporting.picture_marks import escape_math


def transient_of(result: dict[str, Any]) -> dict[str, Any] | None:
    block = (result.get("dynamics") or {}).get("transient")
    return block if isinstance(block, dict) and block.get("times_hours") else None


def render_transient_svg(result: dict[str, Any]) -> str:
    figure = draw_transient(result)
    buffer = io.StringIO()
    with _SVG_LOCK, matplotlib.rc_context({"svg.fonttype": "none", "svg.hashsalt": "coldseam"}):
        figure.savefig(buffer, format="svg", metadata={"Date": None})
    return buffer.getvalue()


def render_transient_png(result: dict[str, Any]) -> bytes:
    figure = draw_transient(result)
    buffer = io.BytesIO()
    figure.savefig(buffer, format="png", dpi=PNG_DPI, metadata={"Software": None})
    return buffer.getvalue()


def _interior(result: dict[str, Any], block: dict[str, Any]) -> list[str]:
    sides = {env: (surface or {}).get("side") for env, surface in
             (result.get("surfaces") or {}).items()}
    ids = list(block.get("min_surface_temperature") or {})
    inner = [env for env in ids if sides.get(env) == "interior"]
    return inner or ids[:1]


def draw_transient(result: dict[str, Any]) -> Figure:
    """Two panels over the run's hours: temperatures (°C) and heat flows (W/m)."""
    block = transient_of(result)
    if block is None:
        raise ValueError("the evaluation has no transient run to draw")
    hours = block["times_hours"]
    figure = Figure(figsize=(8.0, 6.4))
    FigureCanvasAgg(figure)
    top = figure.add_axes((0.1, 0.47, 0.62, 0.43))
    bottom = figure.add_axes((0.1, 0.13, 0.62, 0.27), sharex=top)
    surfaces = block.get("condensation_min_surface_temperature") or block["min_surface_temperature"]
    run = "fRsi run" if block.get("condensation_min_surface_temperature") else "heat-flow run"
    for env in _interior(result, block):
        top.plot(hours, surfaces[env], lw=2.2, label=escape_math(f"lowest surface, {env} ({run})"))
    for env, series in (block.get("air_temperatures") or {}).items():
        top.plot(hours, series, lw=1.2, ls="--", label=escape_math(f"air, {env}"))
    dew = (result.get("condensation") or {}).get("dew_point")
    if isinstance(dew, int | float):
        top.axhline(dew, color="#b00020", lw=1.4, ls=":", label=f"dew point {dew:.1f} °C")
    top.set_ylabel("temperature (°C)")
    title = f"Transient response: {result.get('name') or 'section'}"
    top.set_title(escape_math("\n".join(textwrap.wrap(title, 80))), loc="left", fontsize=10)
    for env, series in block["heat_flows"].items():
        bottom.plot(hours, series, lw=1.6, label=escape_math(f"into the section from {env}"))
    bottom.axhline(0.0, color="0.6", lw=0.8)
    bottom.set_ylabel("heat flow (W/m)")
    bottom.set_xlabel("time (h)")
    for ax in (top, bottom):
        ax.grid(True, color="0.88", lw=0.6)
        ax.legend(loc="upper left", bbox_to_anchor=(1.01, 1.0), fontsize=8, frameon=False)
    figure.text(0.1, 0.02, "\n".join(textwrap.wrap(escape_math(CAUTION), 110)), fontsize=7,
                color="0.3")
    return figure
