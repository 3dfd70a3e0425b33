"""Pictures of a temperature field: a synthetic field made here (a square split into triangles
with a linear temperature), checked for what an engineer must find in the picture."""

from __future__ import annotations

import doctest
import struct
import threading
import xml.etree.ElementTree as ET

import matplotlib
import numpy as np
import pytest

from coldseam import CAUTION
from coldseam.reporting import picture, picture_marks
from coldseam.reporting.picture import render_png, render_svg

PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"  # PNG specification (ISO/IEC 15948), section 5.2


def square_field(n: int = 8, side: float = 0.3, env_in: str = "inside") -> dict:
    """A side × side square (metres) on an n × n grid, two triangles per cell, θ = 20 °C on
    the right edge falling linearly to 0 °C on the left; EPS left half, concrete right half."""
    xs = np.linspace(0.0, side, n + 1)
    x, y = np.meshgrid(xs, xs)
    points = np.column_stack([x.ravel(), y.ravel()])
    k = np.arange(n * (n + 1)).reshape(n, n + 1)[:, :n].ravel()
    lower = np.column_stack([k, k + 1, k + n + 2])
    upper = np.column_stack([k, k + n + 2, k + n + 1])
    triangles = np.vstack([lower, upper])
    half = side / 2
    return {
        "unit": "m",
        "points": points.tolist(),
        "triangles": triangles.tolist(),
        "temperature": (20.0 * points[:, 0] / side).tolist(),
        "heat_flux": [1.0] * len(triangles),
        "material": [0] * len(triangles),
        "materials": [{"id": "eps", "conductivity": [0.035, 0.035]}],
        "pieces": [
            {"material": "eps", "polygon": [[0, 0], [half, 0], [half, side], [0, side]],
             "holes": []},
            {"material": "concrete", "polygon": [[half, 0], [side, 0], [side, side],
                                                 [half, side]], "holes": []},
        ],
        "boundaries": [
            {"environment": "outside", "side": "exterior", "surface_resistance": 0.04,
             "segments": [[[0, 0], [0, side]]]},
            {"environment": env_in, "side": "interior", "surface_resistance": 0.13,
             "segments": [[[side, 0], [side, side]]]},
        ],
        "adiabatic": [[[0, 0], [side, 0]], [[0, side], [side, side]]],
        "min_surface": {env_in: {"temperature": 20.0, "at": [side, 0.0]},
                        "outside": {"temperature": 0.0, "at": [0.0, 0.0]}},
        "condensation_min": {"temperature": 19.1, "at": [side, side / 2]},
    }


RESULT = {
    "id": "abc123",
    "name": "Test square",
    "L2D": 0.4745,
    "psi": {"value": 0.061, "L2D": 0.4745, "sum_UL": 0.4135},
    "condensation": {"fRsi": 0.955, "verdict": "pass", "interior_surface_resistance": 0.25},
}


def png_size(data: bytes) -> tuple[int, int]:
    # IHDR is the first chunk: width and height as big-endian 32-bit integers (PNG spec 11.2.2)
    return struct.unpack(">II", data[16:24])


def svg_texts(svg: str) -> str:
    root = ET.fromstring(svg)  # raises if the SVG is not well-formed XML
    return " ".join("".join(el.itertext()) for el in root.iter("{http://www.w3.org/2000/svg}text"))


def test_svg_is_xml_with_colour_bar_label_minimum_marker_and_caution():
    svg = render_svg(square_field(), RESULT)
    texts = svg_texts(svg)
    assert "Temperature θ (°C)" in texts
    assert "θsi,min 20.00 °C (design run)" in texts
    assert "θsi,min 19.10 °C at Rsi 0.25, fRsi 0.955" in texts
    assert "ψ = 0.061 W/(m·K)" in texts and "L2D = 0.4745" in texts
    assert " ".join(texts.split()) .count("competent person") == 1
    assert CAUTION.split()[0] in texts


def test_svg_labels_isotherms_every_two_kelvin_for_a_twenty_kelvin_range():
    texts = svg_texts(render_svg(square_field(), RESULT))
    for value in (2, 4, 10, 18):
        assert f"{value} °C" in texts


def test_exterior_minimum_is_not_marked():
    texts = svg_texts(render_svg(square_field(), RESULT))
    assert "θsi,min 0.00" not in texts


def test_png_has_the_signature_and_a_sane_size():
    data = render_png(square_field(), RESULT)
    assert data.startswith(PNG_SIGNATURE)
    width, height = png_size(data)
    assert 700 <= width <= 1200 and 500 <= height <= 1400


def test_hostile_names_are_shown_as_text_not_markup_or_mathtext():
    result = {**RESULT, "name": "<script>alert(1)</script> $\\frac{$ 5 $"}
    svg = render_svg(square_field(env_in="<b>in</b>"), result)
    assert "<script>" not in svg and "<b>" not in svg
    assert "&lt;script&gt;" in svg
    texts = svg_texts(svg)
    assert "$\\frac{$ 5 $" in texts  # the dollar signs stay literal
    assert render_png(square_field(), result).startswith(PNG_SIGNATURE)


def test_missing_optional_blocks_and_a_uniform_field_still_draw():
    field = square_field()
    field["temperature"] = [12.5] * len(field["points"])
    for key in ("min_surface", "condensation_min", "pieces", "adiabatic", "boundaries"):
        field.pop(key)
    texts = svg_texts(render_svg(field, {}))
    assert "Section" in texts and "θsi,min" not in texts


def test_field_without_triangles_is_refused():
    field = square_field()
    field["triangles"] = []
    with pytest.raises(ValueError, match="no temperature field"):
        render_png(field, RESULT)


def test_large_section_has_axes_in_metres():
    texts = svg_texts(render_svg(square_field(side=8.0), RESULT))
    assert "x (m)" in texts and "x (mm)" not in texts
    assert "x (mm)" in svg_texts(render_svg(square_field(side=0.3), RESULT))


def test_rendering_in_threads_leaves_no_global_state_behind():
    before = matplotlib.rcParams["svg.fonttype"]
    outputs: list = []

    def work(kind: str) -> None:
        render = render_svg if kind == "svg" else render_png
        outputs.append(render(square_field(), RESULT))

    threads = [threading.Thread(target=work, args=(k,)) for k in ("svg", "png") * 3]
    for t in threads:
        t.start()
    for t in threads:
        t.join()
    assert len(outputs) == 6
    assert all(o.startswith(PNG_SIGNATURE) if isinstance(o, bytes) else "θsi,min" in o
               for o in outputs)
    assert matplotlib.rcParams["svg.fonttype"] == before
    from matplotlib._pylab_helpers import Gcf
    assert Gcf.get_num_fig_managers() == 0  # nothing was registered with pyplot


def test_twenty_thousand_triangles_are_drawn_as_an_image_not_as_paths():
    # Speed is measured by the benchmark, not asserted here; what keeps a large field cheap to
    # draw is checkable: the bands are one embedded image, not 20 000 paths.
    field = square_field(n=100, side=1.0)  # 20 000 triangles
    assert len(field["triangles"]) == 20_000
    assert render_png(field, RESULT).startswith(b"\x89PNG")
    assert len(render_svg(field, RESULT)) < 400_000


def test_module_examples_run():
    for module in (picture, picture_marks):
        outcome = doctest.testmod(module)
        assert outcome.attempted > 0 and outcome.failed == 0
