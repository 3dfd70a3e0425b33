"""The page as a new user meets it: ISO 10211 Case 1 shown as the temperature check it is, the
page at a phone's width (390 px) without sideways scrolling or clipped labels, the list of the
key's evaluations to open, the report's title block, and sensitivities named for what was
computed. Figures are the API's own answer for the same evaluation."""

from __future__ import annotations

import json
import urllib.parse
from pathlib import Path

import pytest
from browser_support import api_json, clean_problems, shot, wall_request

pytestmark = pytest.mark.browser

EXAMPLES = Path(__file__).resolve().parents[2] / "examples"
EVALUATION_TIMEOUT = 90_000  # ms
PHONE = 390

#: Elements that must show their whole text (not cut off by their box) at phone width.
LABELS = "label, .tile-label, .card-title, .drawing-title, th, legend, .tile-note"


def open_result(server: str, page, request: dict) -> dict:
    created = api_json(f"{server}/api/v1/evaluations", "POST", request)
    page.goto(f"{server}/#/evaluations/{created['id']}")
    page.get_by_test_id("psi-value").wait_for(timeout=EVALUATION_TIMEOUT)
    page.get_by_test_id("field-canvas").wait_for(timeout=30_000)
    page.wait_for_timeout(300)
    return created


def sideways_overflow(page) -> int:
    """How far the page reaches past the viewport, px (0: no sideways scrolling)."""
    return page.evaluate(
        "() => document.scrollingElement.scrollWidth - window.innerWidth")


def clipped_labels(page) -> list[str]:
    """Labels whose text is cut off by their own box or reaches past the viewport."""
    return page.evaluate("""(selector) => [...document.querySelectorAll(selector)]
        .filter((el) => el.offsetParent !== null && !el.closest('.table-scroll'))
        .filter((el) => el.scrollWidth > el.clientWidth + 1
                || el.getBoundingClientRect().right > window.innerWidth + 0.5)
        .map((el) => el.textContent.trim().slice(0, 60))""", LABELS)


def balcony_request(server: str) -> dict:
    """The evaluation request the balcony template builds at its defaults."""
    return api_json(f"{server}/api/v1/templates/balcony/section", "POST", {"parameters": {}})


def case_1() -> dict:
    return json.loads((EXAMPLES / "iso10211-case1.json").read_text())


@pytest.mark.parametrize("width", [1280, PHONE])
def test_iso_10211_case_1_reads_as_a_converged_temperature_check(server, page_factory, width):
    page = page_factory(width, 900)
    created = open_result(server, page, case_1())
    assert created["mesh"]["certified_on"] == "temperatures"
    convergence = page.get_by_test_id("convergence").inner_text()
    assert "temperatures converged" in convergence and "NOT" not in convergence
    assert page.get_by_test_id("convergence").get_attribute("class") == "ok-line"
    assert page.get_by_test_id("frsi-value").inner_text() == "—"
    assert page.get_by_test_id("l2d-value").inner_text() == "—"
    assert "not assessed" in page.get_by_test_id("verdict").inner_text()
    assert "unbounded" in page.get_by_test_id("heat-flow-singular").inner_text()
    assert page.get_by_test_id("levels").locator("tbody tr").count() == len(
        created["mesh"]["levels"])
    body = page.locator("body").inner_text()
    assert "0.000" not in body and "Fail" not in body
    shot(page, f"case-1-{width}")
    assert sideways_overflow(page) <= 0
    assert clean_problems(page) == []


def test_balcony_result_fits_a_phone(server, page_factory):
    request = balcony_request(server)
    page = page_factory(PHONE, 844)
    open_result(server, page, request)
    shot(page, "results-balcony-390")
    assert sideways_overflow(page) <= 0, "the result page scrolls sideways at 390 px"
    assert clipped_labels(page) == []
    levels = page.get_by_test_id("levels")
    assert levels.locator("xpath=..").get_attribute("class") == "table-scroll"
    page.goto(f"{server}/#/template/balcony")
    page.get_by_test_id("section-preview").wait_for()
    page.wait_for_timeout(300)
    shot(page, "template-balcony-390")
    assert sideways_overflow(page) <= 0, "the template page scrolls sideways at 390 px"
    assert clipped_labels(page) == []
    drawing = page.get_by_test_id("section-preview").bounding_box()
    for k, label in enumerate(page.locator(".rs-label").all()):
        box = label.bounding_box()
        assert drawing["x"] <= box["x"] and box["x"] + box["width"] <= drawing["x"] + \
            drawing["width"] + 0.5, f"surface label {k} runs out of the drawing"
    assert clean_problems(page) == []


def test_balcony_result_at_desktop_width(server, page_factory):
    request = balcony_request(server)
    page = page_factory(1280, 900)
    open_result(server, page, request)
    labels = page.locator("[data-testid=min-surface-label], [data-testid=condensation-min-label]")
    boxes = [labels.nth(k).bounding_box() for k in range(labels.count())]
    for a in boxes:
        for b in boxes:
            if a is not b:
                apart = (a["x"] + a["width"] <= b["x"] or b["x"] + b["width"] <= a["x"] or
                         a["y"] + a["height"] <= b["y"] or b["y"] + b["height"] <= a["y"])
                assert apart, "the two θsi,min labels overlap"
    isotherms = page.locator(".isotherm-label").all_text_contents()
    assert isotherms and all(text.endswith(" °C") for text in isotherms)
    shot(page, "results-balcony-1280")
    assert clean_problems(page) == []


def test_open_lists_the_evaluations_to_click(server, page_factory):
    first = api_json(f"{server}/api/v1/evaluations", "POST",
                     wall_request("Harrowgate Lane library, listed wall A (invented)"))
    api_json(f"{server}/api/v1/evaluations", "POST",
             wall_request("Harrowgate Lane library, listed wall B (invented)"))
    page = page_factory(PHONE, 844)
    page.goto(f"{server}/#/open")
    links = page.get_by_test_id("evaluation-link")
    links.first.wait_for()
    names = links.all_inner_texts()
    assert "Harrowgate Lane library, listed wall A (invented)" in names
    assert page.get_by_test_id("open-id").is_visible()  # pasting an id still works
    shot(page, "open-390")
    assert sideways_overflow(page) <= 0
    page.get_by_text("Harrowgate Lane library, listed wall A (invented)").click()
    page.get_by_test_id("psi-value").wait_for(timeout=EVALUATION_TIMEOUT)
    assert page.url.endswith(first["id"])
    assert clean_problems(page) == []


def test_report_title_block_from_the_page(server, page_factory):
    created = api_json(f"{server}/api/v1/evaluations", "POST",
                       wall_request("Harrowgate Lane library, report wall (invented)"))
    page = page_factory(1280)
    page.goto(f"{server}/#/evaluations/{created['id']}")
    page.get_by_test_id("psi-value").wait_for(timeout=EVALUATION_TIMEOUT)
    page.get_by_test_id("report-project").fill("Harrowgate Lane library <east wing>")
    page.get_by_test_id("report-author").fill("A. Teller")
    page.get_by_test_id("report-checked_by").fill("B. Reeve")
    href = page.get_by_test_id("download-report").get_attribute("href")
    query = urllib.parse.parse_qs(urllib.parse.urlsplit(href).query)
    assert query == {"project": ["Harrowgate Lane library <east wing>"], "author": ["A. Teller"],
                     "checked_by": ["B. Reeve"]}
    html = page.request.get(f"{server}/{href}").text()
    assert "Harrowgate Lane library &lt;east wing&gt;" in html and "B. Reeve" in html
    assert clean_problems(page) == []


def test_sensitivities_without_psi_are_of_l2d(server, page_factory):
    request = wall_request("Harrowgate Lane library, wall without flanking (invented)")
    del request["psi"]
    page = page_factory(1280)
    open_result(server, page, request)
    titles = page.locator(".card-title").all_inner_texts()
    assert "Sensitivity of L2D to λ" in titles
    assert not any("ψ to λ" in title for title in titles)
