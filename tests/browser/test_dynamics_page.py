"""A dynamic evaluation in the page (Debian chromium against a live service): the uploaded
request with a dynamics block shows the periodic figures in a table and the server-drawn
transient picture, and the report carries both."""

from __future__ import annotations

import json
import urllib.error
import urllib.request
from pathlib import Path

import pytest
from browser_support import api_json, clean_problems, shot
from test_page import result_of, wait_results

pytestmark = pytest.mark.browser
EXAMPLE = Path(__file__).resolve().parents[2] / "examples" / "dynamics-slab-edge.json"


def test_dynamic_request_shows_periodic_table_and_transient_plot(server, page_factory):
    page = page_factory(1280)
    page.goto(f"{server}/#/upload")
    page.get_by_test_id("upload-input").set_input_files(str(EXAMPLE))
    page.get_by_test_id("section-preview").wait_for()
    page.get_by_test_id("evaluate").click()
    wait_results(page)
    result = result_of(server, page)
    periodic = result["dynamics"]["periodic"]
    rows = page.locator("[data-testid=periodic-table] tbody tr")
    expected = (len(periodic["coupling"]) + len(periodic["decrement_factor"])
                + len(periodic["admittance"]) + len(periodic["heat_capacity"]))
    assert rows.count() == expected
    first = rows.first.inner_text()
    assert "Periodic coupling" in first
    assert f"{periodic['coupling']['inside|outside']['modulus']:.4f}" in first
    plot = page.get_by_test_id("transient-plot")
    plot.scroll_into_view_if_needed()
    page.wait_for_function(
        "() => { const i = document.querySelector('[data-testid=transient-plot]');"
        " return i && i.complete && i.naturalWidth > 0; }", timeout=60_000)
    assert plot.get_attribute("src").endswith(f"/evaluations/{result['id']}/transient.svg")
    taus = page.get_by_test_id("time-constants").inner_text()
    assert f"{result['dynamics']['time_constants_hours'][0]:.2f}" in taus
    answer = page.request.get(f"{server}/api/v1/evaluations/{result['id']}/report")
    html = answer.text()
    assert answer.status == 200 and "Dynamic behaviour" in html and "Periodic coupling" in html
    assert "Transient surface temperatures" in html  # the picture's alt text
    shot(page, "dynamics-1280")
    assert clean_problems(page) == []


def test_transient_picture_is_404_without_a_transient_run(server):
    request = json.loads(EXAMPLE.read_text())
    del request["dynamics"]["transient"]
    created = api_json(f"{server}/api/v1/evaluations", "POST", request)
    with pytest.raises(urllib.error.HTTPError) as info:
        urllib.request.urlopen(f"{server}/api/v1/evaluations/{created['id']}/transient.svg")
    assert info.value.code == 404
