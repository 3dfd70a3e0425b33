"""Air cavities on the page: every cavity of the evaluation is drawn hatched, and pointing at
one shows its λeq as the API computed it."""

from __future__ import annotations

import pytest
from browser_support import api_json, clean_problems, shot
from sections import cavity_frame

pytestmark = pytest.mark.browser


def test_cavities_hatched_with_lambda_on_hover(server, page_factory):
    request = {"section": cavity_frame(3, 2), "psi": {"flanking": [
        {"id": "frame", "length": 44, "u_value": 1.0}]}}
    created = api_json(f"{server}/api/v1/evaluations?wait=true", "POST", request)
    cavities = created["cavities"]
    assert len(cavities) == 6
    page = page_factory(1280)
    page.goto(f"{server}/#/evaluations/{created['id']}")
    page.get_by_test_id("psi-value").wait_for(timeout=90_000)
    page.get_by_test_id("field-canvas").wait_for(timeout=30_000)
    drawn = page.locator("[data-testid=field-cavities] path.cavity")
    drawn.first.wait_for(timeout=30_000)
    assert drawn.count() == len(cavities)
    assert page.locator("[data-testid=field-cavities] pattern line").count() == 1
    assert drawn.first.get_attribute("fill").startswith("url(#")
    box = drawn.first.bounding_box()
    page.mouse.move(box["x"] + box["width"] / 2, box["y"] + box["height"] / 2)
    region = int(drawn.first.get_attribute("data-region"))
    entry = next(c for c in cavities if c["region"] == region)
    readout = page.get_by_test_id("field-readout").inner_text()
    assert f"λeq {entry['equivalent_conductivity']:.4g}" in readout, readout
    assert f"(region {region})" in readout
    rows = page.locator("[data-testid=cavity-table] tbody tr")
    assert rows.count() == len(cavities)
    assert f"{cavities[0]['equivalent_conductivity']:.4g}" in rows.first.inner_text()
    shot(page, "cavities-1280")
    assert clean_problems(page) == []
