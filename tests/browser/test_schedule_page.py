"""The schedule view in Debian chromium against a live service: a pasted CSV schedule and a
grid, followed item by item, the table and Σ ψ·l the API's own figures, the ψ plot of the
grid, and the CSV/XLSX downloads holding the rows of the API's results."""

from __future__ import annotations

import io

import pytest
from browser_support import api_json, clean_problems, shot, shown

pytestmark = pytest.mark.browser

TIMEOUT = 120_000  # ms
SCHEDULE = ("id,template,length,insulation_thickness,connection\n"
            "J2 first-floor slab edge,floor_slab,64,160,\n"
            "J3 external corners,wall_corner,28.8,160,\n"
            "J4 roof terrace balcony,balcony,12,,thermal_break\n"
            "J8 misspelt,floor_slabb,3,,\n")


def _batch_of(server: str, page) -> dict:
    batch_id = page.url.rsplit("/", 1)[-1]
    return api_json(f"{server}/api/v1/batches/{batch_id}")


def _wait_finished(page) -> None:
    page.locator("[data-testid=batch][data-status=done], [data-testid=batch][data-status=failed]"
                 ).wait_for(timeout=TIMEOUT)


def test_a_pasted_schedule_runs_and_shows_the_api_figures(server, page_factory):
    page = page_factory(1280)
    page.goto(f"{server}/")
    page.get_by_test_id("nav-schedule").click()
    page.get_by_test_id("batch-name").fill("Harrowgate Lane schedule")
    page.get_by_test_id("schedule-csv").fill(SCHEDULE)
    page.get_by_test_id("schedule-run").click()
    page.get_by_test_id("batch").wait_for(timeout=30_000)
    _wait_finished(page)
    batch = _batch_of(server, page)
    assert batch["name"] == "Harrowgate Lane schedule" and batch["status"] == "failed"
    rows = page.get_by_test_id("batch-item")
    assert rows.count() == 4
    for n, item in enumerate(batch["items"][:3]):
        assert rows.nth(n).get_by_test_id("item-psi").inner_text() == shown(item["psi"], 4)
        assert rows.nth(n).get_by_test_id("item-psi-l").inner_text() == shown(item["psi_l"], 3)
    assert "did you mean floor_slab" in rows.nth(3).get_by_test_id("item-error").inner_text()
    assert page.get_by_test_id("sum-psi-l").inner_text() == shown(batch["sum_psi_l"], 2)
    assert "competent person" in page.get_by_test_id("caution").inner_text()
    assert page.get_by_test_id("batch-counts").inner_text() == \
        "4 of 4 finished · 1 failed · 0 running · failed"
    assert "over 3 of the 4 junctions with a length: the others failed" in \
        page.get_by_test_id("sum-partial").inner_text()
    with page.expect_download() as download:
        page.get_by_test_id("batch-csv").click()
    text = open(download.value.path(), encoding="utf-8").read()
    assert text.splitlines()[1].startswith("J2 first-floor slab edge,floor_slab,done")
    with page.expect_download() as download:
        page.get_by_test_id("batch-xlsx").click()
    from openpyxl import load_workbook

    sheet = load_workbook(io.BytesIO(open(download.value.path(), "rb").read())).active
    assert [row[0].value for row in sheet.iter_rows(min_row=2, max_row=5)] == [
        i["id"] for i in batch["items"]]
    shot(page, "schedule-csv")
    assert clean_problems(page) == []


def test_a_grid_is_plotted_against_its_varied_parameter(server, page_factory):
    page = page_factory(1280)
    page.goto(f"{server}/#/schedule")
    page.get_by_test_id("grid-template").select_option("floor_slab")
    page.get_by_test_id("grid-insulation_thickness").fill("100, 160, 220")
    page.get_by_test_id("grid-slab_thickness").fill("200, 250")
    assert page.get_by_test_id("grid-size").inner_text() == "6 evaluations"
    page.get_by_test_id("grid-length").fill("10")
    page.get_by_test_id("grid-run").click()
    page.get_by_test_id("batch").wait_for(timeout=30_000)
    _wait_finished(page)
    batch = _batch_of(server, page)
    assert batch["status"] == "done" and batch["total"] == 6
    plot = page.get_by_test_id("psi-plot")
    assert "insulation_thickness" in plot.get_attribute("aria-label")
    series = page.get_by_test_id("psi-series")
    assert series.count() == 2  # one line per slab thickness
    assert series.nth(0).locator("circle").count() == 3
    assert page.get_by_test_id("sum-psi-l").inner_text() == shown(batch["sum_psi_l"], 2)
    shot(page, "schedule-grid")
    assert clean_problems(page) == []


def test_a_bad_schedule_is_answered_beside_the_form(server, page_factory):
    page = page_factory(1280)
    page.goto(f"{server}/#/schedule")
    page.get_by_test_id("schedule-csv").fill("name,length\nJ1,3\n")
    page.get_by_test_id("schedule-run").click()
    message = page.get_by_test_id("error-message").first
    message.wait_for(timeout=10_000)
    assert "no 'id' column" in message.inner_text()
    assert "#/schedule" in page.url


def test_earlier_batches_are_listed_newest_first_and_open_from_the_list(server, page_factory):
    page = page_factory(1280)
    page.goto(f"{server}/#/schedule")
    page.get_by_test_id("batch-name").fill("Listed schedule")
    page.get_by_test_id("schedule-csv").fill("id,template,length\nJ3 corners,wall_corner,7.5\n")
    page.get_by_test_id("schedule-run").click()
    page.get_by_test_id("batch").wait_for(timeout=30_000)
    _wait_finished(page)
    batch = _batch_of(server, page)
    listed = api_json(f"{server}/api/v1/batches?limit=50")
    page.get_by_test_id("nav-schedule").click()
    rows = page.get_by_test_id("batch-row")
    rows.first.wait_for(timeout=10_000)
    assert rows.count() == min(listed["total"], 50)
    newest = rows.first
    assert newest.get_by_test_id("batch-link").inner_text() == "Listed schedule"
    assert newest.get_by_test_id("batch-row-sum").inner_text() == shown(batch["sum_psi_l"], 2)
    assert f"Earlier batches ({listed['total']})" in \
        page.get_by_test_id("batch-list").inner_text()
    shot(page, "schedule-list")
    newest.get_by_test_id("batch-link").click()
    page.get_by_test_id("batch").wait_for(timeout=10_000)
    assert page.url.endswith(f"#/batches/{batch['id']}")
    assert clean_problems(page) == []
