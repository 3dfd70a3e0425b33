"""First use of the page as a consultant would: the template's climate, the demo parapet DXF
through the layer mapping (saved and loaded maps), and a section with three environments."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from browser_support import api_json, clean_problems, shot, wall_request
from playwright.sync_api import expect

pytestmark = pytest.mark.browser

EXAMPLES = Path(__file__).resolve().parents[2] / "examples"
EVALUATION_TIMEOUT = 120_000


def _result(server: str, page) -> dict:
    page.wait_for_url("**/#/evaluations/*", timeout=30_000)
    page.get_by_test_id("frsi-value").wait_for(timeout=EVALUATION_TIMEOUT)
    page.wait_for_timeout(300)
    return api_json(f"{server}/api/v1/evaluations/{page.url.rsplit('/', 1)[-1]}")


def test_the_template_climate_reaches_the_evaluation(server, page_factory):
    page = page_factory(1280)
    page.goto(f"{server}/#/template/wall_corner")
    page.get_by_test_id("section-preview").wait_for()
    climate = page.get_by_test_id("climate-params")
    assert climate.get_by_test_id("param-outdoor_temperature").input_value() == "-5"
    assert climate.get_by_test_id("param-indoor_temperature").input_value() == "20"
    climate.get_by_test_id("param-outdoor_temperature").fill("-10")
    climate.get_by_test_id("param-humidity_class").fill("3")
    # the preview follows the parameters
    expect(page.locator(".workspace .stage")).to_contain_text("exterior, -10 °C", timeout=10_000)
    shot(page, "first-use-template-climate")
    page.get_by_test_id("evaluate").click()
    result = _result(server, page)
    sent = result["request"]
    temperatures = {e["side"]: e["temperature"] for e in sent["section"]["environments"]}
    assert temperatures == {"interior": 20, "exterior": -10}
    assert sent["condensation"]["indoor"] == {"humidity_class": 3}
    c = result["condensation"]
    assert c["min_temperature"] == pytest.approx(-10 + c["fRsi"] * 30, abs=1e-6)
    assert clean_problems(page) == []


def test_the_demo_parapet_through_the_layer_mapping(server, page_factory, tmp_path):
    page = page_factory(1280)
    page.goto(f"{server}/#/upload")
    page.get_by_test_id("upload-input").set_input_files(str(EXAMPLES / "demo-parapet.dxf"))
    table = page.get_by_test_id("layer-mapping")
    table.wait_for()
    # across the page, not squeezed into the left column
    assert table.bounding_box()["width"] > 1000
    row = lambda name: table.locator(f"tr[data-layer={name}]")  # noqa: E731
    ids = {name: row(name).get_by_test_id("layer-env-id").input_value()
           for name in ("SURF-EXT", "SURF-INT-WALL", "SURF-INT-CEILING")}
    assert ids == {"SURF-EXT": "outside", "SURF-INT-WALL": "inside",
                   "SURF-INT-CEILING": "inside"}  # one environment per side
    assert row("SURF-EXT").get_by_test_id("layer-temperature").input_value() == "-5"
    library = row("CONCRETE").get_by_test_id("layer-library")
    assert library.evaluate("el => el.scrollWidth <= el.clientWidth + 1")  # name not cut off
    page.get_by_test_id("load-layer-map").set_input_files(
        str(EXAMPLES / "demo-parapet-layers.json"))
    # the file is read asynchronously: wait for the rows to change
    expect(row("SURF-INT-WALL").get_by_test_id("layer-env-id")).to_have_value("library")
    assert row("PIR").get_by_test_id("layer-lambda").input_value() == "0.022"
    assert row("TIMBER").get_by_test_id("layer-role").input_value() == "material"
    assert row("NOTES").get_by_test_id("layer-role").input_value() == "ignore"
    assert page.get_by_test_id("layer-map-notes").is_hidden()
    shot(page, "first-use-dxf-mapping-1280")
    with page.expect_download() as download:
        page.get_by_test_id("save-layer-map").click()
    saved = tmp_path / "saved.json"
    download.value.save_as(saved)
    assert json.loads(saved.read_text()) == json.loads(
        (EXAMPLES / "demo-parapet-layers.json").read_text())
    page.get_by_test_id("build-section").click()
    page.get_by_test_id("section-preview").wait_for()
    page.get_by_test_id("select-humidity_class").select_option("2")
    page.get_by_test_id("param-interior_surface_resistance").fill("0.2")
    page.get_by_test_id("evaluate").click()
    result = _result(server, page)
    sent = result["request"]
    assert sorted(e["id"] for e in sent["section"]["environments"]) == ["library", "outside"]
    assert sent["condensation"]["indoor"] == {"humidity_class": 2}
    assert sent["condensation"]["interior_surface_resistance"] == 0.2
    assert page.get_by_test_id("l2d-value").inner_text() != "—"
    shot(page, "first-use-dxf-result-1280")
    assert clean_problems(page) == []


def test_a_loaded_map_says_what_did_not_fit(server, page_factory, tmp_path):
    page = page_factory(1280)
    page.goto(f"{server}/#/upload")
    page.get_by_test_id("upload-input").set_input_files(str(EXAMPLES / "demo-parapet.dxf"))
    page.get_by_test_id("layer-mapping").wait_for()
    other = tmp_path / "other.json"
    other.write_text(json.dumps({"pir": {"material": "pir", "conductivity": 0.025},
                                 "GLAZING": {"ignore": True}}))
    page.get_by_test_id("load-layer-map").set_input_files(str(other))
    notes = page.get_by_test_id("layer-map-notes")
    expect(notes).to_contain_text("Not in this drawing: GLAZING.")
    expect(notes).to_contain_text("Not in the saved map (first guesses kept): RENDER")
    pir = page.locator("tr[data-layer=PIR]")
    expect(pir.get_by_test_id("layer-lambda")).to_have_value("0.025")  # case-insensitive


def test_l2d_says_why_it_is_missing_with_three_environments(server, page_factory, tmp_path):
    request = wall_request("Larkfield Row depot, wall by the stair (invented)")
    section = request["section"]
    section["environments"].append({"id": "stair", "temperature": 10, "side": "interior"})
    section["boundaries"].append({"environment": "stair", "surface_resistance": 0.13,
                                  "path": [[100, 1000], [300, 1000]]})
    request.pop("psi", None)
    path = tmp_path / "three.json"
    path.write_text(json.dumps(request))
    page = page_factory(1280)
    page.goto(f"{server}/#/upload")
    page.get_by_test_id("upload-input").set_input_files(str(path))
    page.get_by_test_id("section-preview").wait_for()
    page.get_by_test_id("evaluate").click()
    result = _result(server, page)
    assert "L2D" not in result or result["L2D"] is None
    assert page.get_by_test_id("l2d-value").inner_text() == "—"
    note = page.get_by_test_id("l2d-note").inner_text()
    assert "3 environments" in note and "coupling coefficients" in note
    shot(page, "first-use-three-environments")
