"""The printable HTML report: escaping of hostile input, the caution, missing blocks, more
than two environments. Values are made up here; the report only has to show them faithfully."""

from __future__ import annotations

import doctest
import re
from html.parser import HTMLParser

import pytest

from coldseam import CAUTION, ENGINE_VERSION
from coldseam.reporting import html_parts
from coldseam.reporting.report import render_report

EVIL = "<script>alert('x')</script>"
SVG = '<svg xmlns="http://www.w3.org/2000/svg" width="10" height="10"></svg>'


def request(material_id: str = "eps") -> dict:
    return {
        "section": {
            "name": "Slab edge", "unit": "mm",
            "materials": [{"id": material_id, "conductivity": 0.035},
                          {"id": "timber", "conductivity": [0.13, 0.29]},
                          {"id": "concrete", "library": "concrete-2400"}],
            "regions": [],
            "environments": [{"id": "inside", "temperature": 20, "side": "interior"},
                             {"id": "outside", "temperature": -5, "side": "exterior"}],
            "boundaries": [{"environment": "inside", "surface_resistance": 0.13,
                            "path": [[300, 0], [300, 1200]]},
                           {"environment": "outside", "surface_resistance": 0.04,
                            "path": [[0, 0], [0, 1200]]}],
        },
        "psi": {"flanking": [{"id": "wall", "length": 1200, "u_value": 0.28}],
                "dimensions": "internal"},
    }


def full_result(material_id: str = "eps") -> dict:
    return {
        "id": "e1d2c3", "name": "Slab edge", "engine_version": ENGINE_VERSION,
        "heat_flows": {"inside": 9.49, "outside": -9.49},
        "L2D": 0.3796,
        "psi": {"value": 0.0436, "L2D": 0.3796, "sum_UL": 0.336, "dimensions": "internal",
                "flanking": [{"id": "wall", "u_value": 0.28, "length": 1.2, "UL": 0.336,
                              "layers": [{"material": material_id, "thickness": 0.1,
                                          "conductivity": [0.035, 0.035]}]}]},
        "probes": {"P1": 19.2},
        "surfaces": {"inside": {"side": "interior", "min_temperature": 16.77, "at": [0.3, 0.0]}},
        "condensation": {"fRsi": 0.81, "min_temperature": 15.25, "at": [0.3, 0.0],
                         "fRsi_critical": 0.705, "verdict": "pass", "margin": 0.105},
        "mesh": {"nodes": 12000, "elements": 23500, "relative_change": 0.0004,
                 "converged": True, "element": "P2",
                 "levels": [{"nodes": 3000, "heat_flow": 9.51, "psi": 0.0452,
                             "min_temperature": 16.8, "relative_change": None},
                            {"nodes": 12000, "heat_flow": 9.49, "psi": 0.0436,
                             "min_temperature": 16.77, "relative_change": 0.0021}]},
        "sensitivities": [{"material": material_id, "dL2D_dlnlambda": 0.21,
                           "dpsi_dlnlambda": 0.02}],
        "materials": [{"id": material_id, "conductivity": [0.035, 0.035],
                       "source": "given in the request"},
                      {"id": "concrete", "conductivity": [2.0, 2.0],
                       "source": "library concrete-2400 (EN ISO 10456)"}],
        "warnings": ["cut-off plane closer than 1 m"],
    }


class _Balance(HTMLParser):
    """Tracks open elements: every non-void element must be closed in order."""

    VOID = {"meta", "img", "br", "hr", "link", "input"}

    def __init__(self) -> None:
        super().__init__()
        self.stack: list[str] = []
        self.tags: list[str] = []

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)
        if tag not in self.VOID:
            self.stack.append(tag)

    def handle_endtag(self, tag):
        assert self.stack and self.stack[-1] == tag, f"</{tag}> closes {self.stack[-1:]}"
        self.stack.pop()


def parse(html: str) -> _Balance:
    checker = _Balance()
    checker.feed(html)
    checker.close()
    assert checker.stack == []
    return checker


def test_full_report_shows_inputs_results_and_certificate():
    html = render_report(full_result(), request(), SVG)
    parse(html)
    for text in ("0.0436 W/(m·K)", "0.3796 W/(m·K)", "λx 0.1300 / λy 0.2900",
                 "library concrete-2400 (EN ISO 10456)", "PASS", "margin +0.105",
                 "0.210 %", "12000", "cut-off plane closer than 1 m", "(300, 0) mm",
                 "e1d2c3", ENGINE_VERSION, "9.490 W/m", "19.20 °C"):
        assert text in html, text


def test_hostile_strings_are_escaped_everywhere():
    result = full_result(EVIL)
    result["name"] = EVIL
    result["id"] = EVIL
    result["warnings"] = [EVIL]
    html = render_report(result, request(EVIL), SVG + EVIL)
    assert "<script" not in html.lower()
    assert html.count("&lt;script&gt;") >= 5
    parse(html)


def test_report_is_self_contained():
    html = render_report(full_result(), request(), SVG)
    tags = parse(html).tags
    assert "link" not in tags and "script" not in tags
    sources = re.findall(r'src="([^"]*)"', html)
    assert sources and all(s.startswith("data:image/svg+xml;base64,") for s in sources)
    assert "http://" not in html.replace(SVG, "") and "https://" not in html


def test_caution_is_prominent_and_repeated_at_the_end():
    html = render_report(full_result(), request(), SVG)
    assert html.count(CAUTION) == 2
    assert html.index('class="caution"') < html.index("Key figures")


@pytest.mark.parametrize("drop", ["psi", "condensation", "mesh", "sensitivities", "surfaces",
                                  "materials", "heat_flows", "L2D", "warnings", "probes"])
def test_a_missing_block_is_left_out(drop):
    result = full_result()
    result.pop(drop)
    html = render_report(result, request(), SVG)
    parse(html)
    titles = {"psi": "Linear thermal transmittance", "condensation": "ISO 13788",
              "mesh": "Mesh convergence", "sensitivities": "Sensitivity to conductivities"}
    if drop in titles:
        assert titles[drop] not in html
    assert CAUTION in html


def test_empty_inputs_and_no_picture_still_make_a_report():
    html = render_report({}, {}, "")
    parse(html)
    assert "No picture is available." in html and CAUTION in html


def test_three_environments_show_the_coupling_matrix_instead_of_l2d():
    result = full_result()
    result.pop("L2D")
    result["heat_flows"] = {"inside": 12.0, "outside": -10.0, "garage": -2.0}
    result["coupling_coefficients"] = {"environments": ["inside", "outside", "garage"],
                                       "matrix": [[0.0, 0.4, 0.1], [0.4, 0.0, 0.05],
                                                  [0.1, 0.05, 0.0]]}
    html = render_report(result, request(), SVG)
    parse(html)
    assert "Coupling coefficients (ISO 10211)" in html
    assert "L2D (thermal coupling coefficient)" not in html
    assert html.count("0.4000") == 2 and "garage" in html


def test_failed_verdict_and_unconverged_mesh_are_plain_to_see():
    result = full_result()
    result["condensation"].update(verdict="fail", margin=-0.04)
    result["mesh"]["converged"] = False
    html = render_report(result, request(), SVG)
    assert "FAIL" in html and "margin −0.040 on fRsi" in html
    assert "NOT converged" in html


def test_module_examples_run():
    outcome = doctest.testmod(html_parts)
    assert outcome.attempted > 0 and outcome.failed == 0


def test_title_block_shows_project_author_checker_and_date_escaped():
    details = {"project": "Harrowgate Lane library " + EVIL, "author": "A. Teller",
               "checked_by": None, "date": "2026-11-30"}
    html = render_report(full_result(), request(), SVG, details=details)
    parse(html)
    block = html[html.index('class="title-block"'):]
    block = block[:block.index("</dl>")]
    for text in ("Project", "Harrowgate Lane library &lt;script&gt;", "Prepared by", "A. Teller",
                 "Checked by", "Date", "2026-11-30"):
        assert text in block, text
    assert 'class="blank"' in block  # checked by: a line to sign by hand
    assert "<script" not in html.lower()


def test_humidity_is_a_percentage_in_every_table():
    req = request()
    req["condensation"] = {"interior_surface_resistance": 0.25,
                           "indoor": {"temperature": 20, "relative_humidity": 0.5}}
    result = full_result()
    result["condensation"]["indoor_relative_humidity"] = 0.5
    html = render_report(result, req, SVG)
    assert html.count("50 %") == 2
    assert "0.50" not in html


def test_words_wrap_at_spaces_only():
    from coldseam.reporting.report_style import CSS

    assert "anywhere" not in CSS and "hyphens: auto" not in CSS
    assert "hyphens: manual" in CSS


def test_sensitivities_name_what_was_computed():
    with_psi = render_report(full_result(), request(), SVG)
    assert "Sensitivity of ψ to the conductivities λ" in with_psi
    result = full_result()
    result["sensitivities"] = [{"material": "eps", "dL2D_dlnlambda": 0.21,
                                "dpsi_dlnlambda": None}]
    result["psi"] = None
    html = render_report(result, request(), SVG)
    assert "Sensitivity of L2D to the conductivities λ" in html
    assert "∂ψ" not in html and "ψ change" not in html
