"""The Coldseam page in Debian chromium against a live service: the template flow, uploads of
a section JSON and of a DXF drawing with its layer mapping, invalid uploads, a stored result
opened by its address, and the downloads. Figures on the page are checked against the API's own
answer for the same evaluation (the page must show what the service computed)."""

from __future__ import annotations

import csv
import io
import json

import pytest
from browser_support import api_json, clean_problems, shot, shown, wall_request

pytestmark = pytest.mark.browser

EVALUATION_TIMEOUT = 90_000  # ms


def result_of(server: str, page) -> dict:
    evaluation_id = page.url.rsplit("/", 1)[-1]
    return api_json(f"{server}/api/v1/evaluations/{evaluation_id}")


def wait_results(page) -> None:
    page.get_by_test_id("psi-value").wait_for(timeout=EVALUATION_TIMEOUT)
    page.get_by_test_id("field-canvas").wait_for(timeout=30_000)
    page.wait_for_timeout(300)


def painted_pixels(page) -> int:
    return page.evaluate("""() => {
        const c = document.querySelector('[data-testid=field-canvas]');
        const d = c.getContext('2d').getImageData(0, 0, c.width, c.height).data;
        let n = 0; for (let i = 3; i < d.length; i += 4) if (d[i] > 0) n++; return n; }""")


def check_figures(page, result: dict) -> None:
    """ψ, fRsi and the verdict on the page are the API's figures."""
    if result.get("psi"):
        assert page.get_by_test_id("psi-value").inner_text() == shown(result["psi"]["value"], 4)
    condensation = result["condensation"]
    assert page.get_by_test_id("frsi-value").inner_text() == shown(condensation["fRsi"], 3)
    badge = page.get_by_test_id("verdict").inner_text()
    assert ("Pass" if condensation["verdict"] == "pass" else "Fail") in badge


def test_template_flow_end_to_end(server, page_factory):
    page = page_factory(1280)
    page.goto(f"{server}/")
    picker = page.get_by_test_id("template-picker")
    templates = api_json(f"{server}/api/v1/templates")["templates"]
    assert picker.locator("option").count() == len(templates)
    picker.select_option("floor_slab")
    page.get_by_test_id("section-preview").wait_for()
    thickness = page.get_by_test_id("param-insulation_thickness")
    thickness.fill("900")
    error = page.locator("[data-testid=field-error][data-field=insulation_thickness]")
    assert "At most 400 mm" in error.inner_text()
    page.wait_for_timeout(500)
    assert page.get_by_test_id("evaluate").is_disabled()
    with page.expect_response(lambda r: "/templates/floor_slab/section" in r.url):
        thickness.fill("120")
    assert error.is_hidden()
    page.wait_for_function("() => !document.querySelector('[data-testid=evaluate]').disabled")
    page.get_by_test_id("section-preview").hover()
    shot(page, "template-1280")
    page.get_by_test_id("evaluate").click()
    wait_results(page)
    result = result_of(server, page)
    assert result["request"]["section"]["name"] == page.locator("h1").inner_text()
    check_figures(page, result)
    assert painted_pixels(page) > 10_000
    assert "°C" in page.get_by_test_id("min-surface-label").first.text_content()
    box = page.get_by_test_id("field-overlay").bounding_box()
    page.mouse.move(box["x"] + box["width"] / 2, box["y"] + box["height"] / 2)
    readout = page.get_by_test_id("field-readout").inner_text()
    assert "θ" in readout or "Outside" in readout
    assert page.get_by_test_id("caution").inner_text() == result["caution"]
    shot(page, "results-template-1280")
    assert clean_problems(page) == []


def test_results_at_tablet_width(server, page_factory):
    created = api_json(f"{server}/api/v1/evaluations", "POST", wall_request("Tablet check wall"))
    page = page_factory(768, 1024)
    page.goto(f"{server}/#/evaluations/{created['id']}")
    wait_results(page)
    check_figures(page, created)
    overflow = page.evaluate("() => document.documentElement.scrollWidth")
    assert overflow <= 768, f"the page is {overflow} px wide at a 768 px viewport"
    shot(page, "results-768")
    page.goto(f"{server}/#/template/balcony")
    page.get_by_test_id("section-preview").wait_for()
    assert page.evaluate("() => document.documentElement.scrollWidth") <= 768
    shot(page, "template-768")
    assert clean_problems(page) == []


def test_json_upload(server, page_factory, tmp_path):
    path = tmp_path / "east-wall.json"
    path.write_text(json.dumps(wall_request()))
    page = page_factory(1280)
    page.goto(f"{server}/#/upload")
    page.get_by_test_id("upload-input").set_input_files(str(path))
    page.get_by_test_id("section-preview").wait_for()
    assert page.get_by_test_id("flank-row").count() == 1
    page.get_by_test_id("evaluate").click()
    wait_results(page)
    check_figures(page, result_of(server, page))
    assert page.locator("[data-testid=psi-terms] tbody tr").count() == 1
    assert clean_problems(page) == []


def make_dxf(path) -> None:
    """A two-layer wall drawn in millimetres without a declared unit ($INSUNITS 0)."""
    import ezdxf

    doc = ezdxf.new()
    doc.header["$INSUNITS"] = 0
    msp = doc.modelspace()
    for name in ("CONCRETE", "EPS", "INSIDE", "OUTSIDE"):
        doc.layers.add(name)
    msp.add_lwpolyline([(0, 0), (100, 0), (100, 1000), (0, 1000)], close=True,
                       dxfattribs={"layer": "EPS"})
    msp.add_lwpolyline([(100, 0), (300, 0), (300, 1000), (100, 1000)], close=True,
                       dxfattribs={"layer": "CONCRETE"})
    msp.add_line((0, 0), (0, 1000), dxfattribs={"layer": "OUTSIDE"})
    msp.add_line((300, 0), (300, 1000), dxfattribs={"layer": "INSIDE"})
    doc.saveas(path)


def test_dxf_upload_with_layer_mapping(server, page_factory, tmp_path):
    path = tmp_path / "wall.dxf"
    make_dxf(path)
    page = page_factory(1280)
    page.goto(f"{server}/#/upload")
    page.get_by_test_id("upload-input").set_input_files(str(path))
    table = page.get_by_test_id("layer-mapping")
    table.wait_for()
    assert table.locator("tbody tr").count() == 4
    row = lambda name: table.locator(f"tr[data-layer={name}]")  # noqa: E731
    assert row("EPS").get_by_test_id("layer-role").input_value() == "material"
    assert row("INSIDE").get_by_test_id("layer-side").input_value() == "interior"
    assert row("OUTSIDE").get_by_test_id("layer-side").input_value() == "exterior"
    row("EPS").get_by_test_id("layer-library").select_option("")
    page.get_by_test_id("build-section").click()
    assert "Enter λ" in row("EPS").get_by_test_id("field-error").inner_text()
    assert page.locator("[data-testid=field-error][data-field=unit]").is_visible()
    row("EPS").get_by_test_id("layer-lambda").fill("0.035")
    row("OUTSIDE").get_by_test_id("layer-temperature").fill("-5")
    page.get_by_test_id("dxf-unit").select_option("mm")
    shot(page, "dxf-mapping-1280")
    page.set_viewport_size({"width": 768, "height": 1024})
    assert page.evaluate("() => document.documentElement.scrollWidth") <= 768
    shot(page, "dxf-mapping-768")
    page.set_viewport_size({"width": 1280, "height": 800})
    page.get_by_test_id("build-section").click()
    page.get_by_test_id("section-preview").wait_for()
    page.get_by_test_id("add-flanking").click()
    flank = page.get_by_test_id("flank-row")
    flank.get_by_test_id("flank-length").fill("1000")
    flank.get_by_test_id("flank-source").select_option("cut")
    for name, value in (("x1", "0"), ("y1", "500"), ("x2", "300"), ("y2", "500")):
        flank.get_by_test_id(f"flank-cut-{name}").fill(value)
    shot(page, "dxf-preview-1280")
    page.get_by_test_id("evaluate").click()
    wait_results(page)
    result = result_of(server, page)
    sent = result["request"]
    assert sent["section"]["unit"] == "mm"
    assert {m["id"]: m.get("conductivity") for m in sent["section"]["materials"]}["eps"] == 0.035
    assert sent["psi"]["flanking"][0]["cut"] == [[0, 500], [300, 500]]
    check_figures(page, result)
    shot(page, "results-dxf-1280")
    assert clean_problems(page) == []


def test_invalid_uploads_show_their_message(server, page_factory, tmp_path):
    page = page_factory(1280)
    page.goto(f"{server}/#/upload")
    upload = page.get_by_test_id("upload-input")
    broken = tmp_path / "broken.json"
    broken.write_text('{"section": {"unit": "mm",')
    upload.set_input_files(str(broken))
    assert "not valid JSON" in page.get_by_test_id("error-message").inner_text()
    no_unit = wall_request()
    del no_unit["section"]["unit"]
    path = tmp_path / "no-unit.json"
    path.write_text(json.dumps(no_unit))
    upload.set_input_files(str(path))
    page.get_by_test_id("section-preview").wait_for()
    page.get_by_test_id("evaluate").click()
    message = page.get_by_test_id("error-message").first
    message.wait_for()
    assert "/section/unit" in message.inner_text() and "mm" in message.inner_text()
    assert "#/upload" in page.url
    shot(page, "invalid-json-1280")
    garbage = tmp_path / "garbage.dxf"
    garbage.write_text("this is not a drawing\n")
    upload.set_input_files(str(garbage))
    page.wait_for_function("() => document.querySelector('[data-testid=error-message]')"
                           "?.textContent.includes('DXF')")
    shot(page, "invalid-dxf-1280")


def test_stored_result_by_address_and_downloads(server, page_factory):
    created = api_json(f"{server}/api/v1/evaluations", "POST",
                       wall_request("Moss Street annex, stored wall (invented)"))
    page = page_factory(1280)
    page.goto(f"{server}/#/evaluations/{created['id']}")
    wait_results(page)
    check_figures(page, created)
    assert page.get_by_test_id("evaluation-id").inner_text() == created["id"]
    for tail, testid, kind in (("picture.svg", "download-svg", "svg"),
                               ("picture.png", "download-png", "png"),
                               ("report", "download-report", "html")):
        link = page.get_by_test_id(testid)
        assert link.get_attribute("href").endswith(f"/evaluations/{created['id']}/{tail}")
        answer = page.request.get(f"{server}/api/v1/evaluations/{created['id']}/{tail}")
        assert answer.status == 200 and kind in answer.headers["content-type"], tail
    with page.expect_download() as info:
        page.get_by_test_id("download-csv").click()
    rows = list(csv.reader(io.StringIO(open(info.value.path(), encoding="utf-8").read())))
    assert rows[0] == ["quantity", "value", "unit"]
    assert ["psi", repr(created["psi"]["value"]), "W/(m·K)"] in [r[:3] for r in rows] or \
        any(r[0] == "psi" and float(r[1]) == created["psi"]["value"] for r in rows)
    with page.expect_download() as info:
        page.get_by_test_id("download-json").click()
    assert json.loads(open(info.value.path(), encoding="utf-8").read())["id"] == created["id"]
    shot(page, "results-stored-1280")
    assert clean_problems(page) == []


def test_unknown_evaluation_says_so(server, page_factory):
    page = page_factory(1280)
    page.goto(f"{server}/#/evaluations/0000000000000000")
    assert "no evaluation" in page.get_by_test_id("error-message").inner_text()


def test_keyboard_reaches_the_inputs_and_zooms_the_drawing(server, page_factory):
    page = page_factory(1280)
    page.goto(f"{server}/#/template/wall_corner")
    page.get_by_test_id("section-preview").wait_for()
    page.wait_for_function("() => !document.querySelector('[data-testid=evaluate]').disabled")
    reached = set()
    for _ in range(60):
        page.keyboard.press("Tab")
        reached.add(page.evaluate("() => document.activeElement.dataset.testid || "
                                  "document.activeElement.getAttribute('aria-label') || ''"))
    assert {"template-picker", "evaluate", "Zoom in", "Fit to view"} <= reached
    outline = page.locator("[data-testid=section-preview] path.region").first
    before = outline.get_attribute("d")
    page.locator(".surface").first.focus()
    page.keyboard.press("+")
    page.wait_for_function("(d) => document.querySelector("
                           "'[data-testid=section-preview] path.region').getAttribute('d') !== d",
                           arg=before)
    page.keyboard.press("0")
    page.wait_for_function("(d) => document.querySelector("
                           "'[data-testid=section-preview] path.region').getAttribute('d') === d",
                           arg=before)
    assert clean_problems(page) == []


def test_template_error_from_the_api_sits_beside_its_input(server, page_factory):
    """A 422 naming /parameters/<name> is shown at that input (body built by the API's own
    error formatter, so the page is tested against the real format)."""
    from coldseam.api.errors import error_body

    message = "wall_thickness must be between 80 and 500 mm; got 600"
    body = error_body("InvalidSection", message, "/parameters/wall_thickness", "test")
    page = page_factory(1280)
    page.goto(f"{server}/#/template/wall_corner")
    page.get_by_test_id("section-preview").wait_for()
    page.route("**/api/v1/templates/wall_corner/section",
               lambda route: route.fulfill(status=422, content_type="application/json",
                                           body=json.dumps(body)))
    page.get_by_test_id("param-wall_thickness").fill("210")
    error = page.locator("[data-testid=field-error][data-field=wall_thickness]")
    error.wait_for()
    assert error.inner_text() == message
    assert page.get_by_test_id("evaluate").is_disabled()


def test_a_result_input_can_be_used_again(server, page_factory):
    created = api_json(f"{server}/api/v1/evaluations", "POST",
                       wall_request("Reused wall (invented)"))
    page = page_factory(1280)
    page.goto(f"{server}/#/evaluations/{created['id']}")
    page.get_by_test_id("reuse-input").click()
    page.get_by_test_id("section-preview").wait_for()
    assert "#/upload" in page.url
    assert page.get_by_test_id("flank-u").input_value() == "0.3"
    page.get_by_test_id("flank-u").fill("0.25")
    page.get_by_test_id("evaluate").click()
    wait_results(page)
    result = result_of(server, page)
    assert result["id"] != created["id"]
    assert result["request"]["psi"]["flanking"][0]["u_value"] == 0.25
    check_figures(page, result)
