"""Picture and report of a real evaluation: the demo parapet drawing imported from DXF,
evaluated by the engine, drawn and reported. The figures checked are the engine's own; the
test checks that picture and report show them, not what they should be."""

from __future__ import annotations

import json
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest

from coldseam import CAUTION
from coldseam.imports.dxf import import_dxf
from coldseam.reporting.picture import render_png, render_svg
from coldseam.reporting.report import render_report
from coldseam.schema import parse_request
from coldseam.thermal.evaluate import evaluate

EXAMPLES = Path(__file__).resolve().parents[2] / "examples"


@pytest.fixture(scope="module")
def evaluation():
    imported = import_dxf((EXAMPLES / "demo-parapet.dxf").read_bytes(),
                          json.loads((EXAMPLES / "demo-parapet-layers.json").read_text()),
                          None, name="Harrowgate Lane Library, parapet junction")
    request = parse_request({
        "section": imported["section"],
        "psi": {"flanking": [{"id": "wall", "length": 1987, "u_value": 0.22},
                             {"id": "roof", "length": 1332, "u_value": 0.13}],
                "dimensions": "internal"},
    })
    done = evaluate(request)
    return {"id": "demo", **done.result}, done.field, request.model_dump(mode="json")


def test_picture_of_a_real_evaluation(evaluation, tmp_path):
    result, field, _ = evaluation
    png = render_png(field, result)
    assert png.startswith(b"\x89PNG\r\n\x1a\n")
    (tmp_path / "parapet.png").write_bytes(png)
    root = ET.fromstring(render_svg(field, result))
    texts = " ".join("".join(t.itertext()) for t in root.iter("{http://www.w3.org/2000/svg}text"))
    assert f"ψ = {result['psi']['value']:.3f} W/(m·K)" in texts
    assert f"θsi,min {field['condensation_min']['temperature']:.2f} °C at Rsi 0.25" in texts
    assert "Harrowgate Lane Library" in texts


def test_report_of_a_real_evaluation(evaluation):
    result, field, request = evaluation
    html = render_report(result, request, render_svg(field, result))
    assert f"{result['psi']['value']:.4f} W/(m·K)" in html
    assert f"{result['condensation']['fRsi']:.3f}" in html
    assert html.count("<tr>") > 20 and CAUTION in html
    for material in result["materials"]:
        assert material["id"] in html


def test_report_of_iso_10211_case_1_is_a_temperature_check():
    request = parse_request(json.loads((EXAMPLES / "iso10211-case1.json").read_text()))
    done = evaluate(request)
    result = {"id": "case1", **done.result}
    html = render_report(result, request.model_dump(mode="json"), render_svg(done.field, result))
    assert "NOT converged" not in html and "FAIL" not in html and "0.000" not in html
    assert "temperatures converged" in html
    assert "Not assessed: the interior surface of &#x27;hot&#x27; meets" in html
    assert "not given: the heat flow is unbounded" in html
