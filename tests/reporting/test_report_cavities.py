"""Report and picture of an evaluation with air cavities and a frame U_f: the figures shown
are the engine's own (the test checks that they are shown, not what they should be)."""

from __future__ import annotations

import json
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest

from coldseam.reporting.picture import render_svg
from coldseam.reporting.report import render_report
from coldseam.schema import parse_request
from coldseam.thermal.evaluate import evaluate

EXAMPLE = Path(__file__).resolve().parents[2] / "examples" / "window-frame-uf" / "request.json"


@pytest.fixture(scope="module")
def evaluation():
    data = json.loads(EXAMPLE.read_text())
    done = evaluate(parse_request(data))
    return done.result, done.field, data


def test_report_lists_every_cavity_and_the_frame_u_value(evaluation):
    result, field, request = evaluation
    html = render_report(result, request, render_svg(field, result))
    assert 'id="cavities"' in html and 'id="frame"' in html
    cavities = html[html.index('id="cavities"'):]
    cavities = cavities[:cavities.index("</section>")]
    assert cavities.count("<tr>") == len(result["cavities"]) + 1  # header row
    assert f"{result['cavities'][0]['equivalent_conductivity']:.4f}" in cavities
    assert f"{result['psi']['frame']['u_frame']:.4f} W/(m²·K)" in html
    assert "air cavity: λeq per cavity" in html


def test_picture_hatches_the_cavities(evaluation):
    result, field, _ = evaluation
    assert len(field["cavities"]) == len(result["cavities"]) == 10
    svg = render_svg(field, result)
    root = ET.fromstring(svg)
    texts = " ".join("".join(t.itertext()) for t in root.iter("{http://www.w3.org/2000/svg}text"))
    assert "air cavity" in texts
    patterns = [p.get("id") for p in root.iter("{http://www.w3.org/2000/svg}pattern")]
    assert patterns and svg.count(f"url(#{patterns[0]})") >= len(result["cavities"])
