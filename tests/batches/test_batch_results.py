"""Results of a batch as CSV and XLSX hold the same rows (units in the header, Σ ψ·l, the
caution), and the printable schedule report shows every junction."""

from __future__ import annotations

import csv
import io

from batch_support import finished
from openpyxl import load_workbook

from coldseam import CAUTION
from coldseam.batches.tables import SUM_LABEL

BODY = {"name": "Results test", "items": [
    {"id": "J2", "template": "floor_slab", "parameters": {"insulation_thickness": 160},
     "length": 64},
    {"id": "J4", "template": "balcony", "parameters": {"connection": "thermal_break"},
     "length": 12},
    {"id": "J9", "template": "no_such_template", "length": 3},
    {"id": "J6", "template": "eaves"},
]}


def _batch(client) -> tuple[str, dict]:
    batch_id = client.post("/api/v1/batches", json=BODY).json()["id"]
    return batch_id, finished(client, batch_id)


def _csv_value(text: str, like):
    """A CSV cell read back as the type of the XLSX cell beside it."""
    if like is None:
        return None if text == "" else text
    if isinstance(like, int | float):
        return float(text)  # 64.0 written, 64 read back: the same number
    return text


def test_csv_and_xlsx_hold_the_same_rows(client):
    batch_id, body = _batch(client)
    csv_response = client.get(f"/api/v1/batches/{batch_id}/results.csv")
    xlsx_response = client.get(f"/api/v1/batches/{batch_id}/results.xlsx")
    assert csv_response.headers["content-type"].startswith("text/csv")
    assert "Results-test-results.xlsx" in xlsx_response.headers["content-disposition"]
    csv_rows = list(csv.reader(io.StringIO(csv_response.text)))
    sheet = load_workbook(io.BytesIO(xlsx_response.content)).active
    xlsx_rows = [list(row) for row in sheet.iter_rows(values_only=True)]
    assert len(csv_rows) == len(xlsx_rows) == 1 + 4 + 2
    for csv_row, xlsx_row in zip(csv_rows, xlsx_rows, strict=True):
        assert [_csv_value(t, x) for t, x in zip(csv_row, xlsx_row, strict=True)] == xlsx_row
    header = xlsx_rows[0]
    assert header[:6] == ["id", "template", "status", "length m", "ψ W/(m·K)", "ψ·l W/K"]
    assert "insulation_thickness mm" in header and "connection" in header
    by_id = {row[0]: row for row in xlsx_rows[1:5]}
    # both files keep 16 significant digits of the JSON's doubles
    assert by_id["J2"][4] == float(f"{body['items'][0]['psi']:.16g}")
    assert by_id["J2"][5] == float(f"{body['items'][0]['psi_l']:.16g}")
    assert by_id["J9"][2] == "failed" and "no template" in by_id["J9"][11]
    assert xlsx_rows[5][0] == SUM_LABEL
    assert xlsx_rows[5][5] == float(f"{body['sum_psi_l']:.16g}")
    assert xlsx_rows[6][0] == CAUTION


def test_the_schedule_report_shows_the_table_the_sum_and_every_junction(client):
    batch_id, body = _batch(client)
    response = client.get(f"/api/v1/batches/{batch_id}/report")
    assert response.status_code == 200
    html = response.text
    assert "Results test" in html and CAUTION in html
    assert f"Σ ψ·l = {body['sum_psi_l']:.2f} W/K" in html
    for item in body["items"]:
        assert item["id"] in html
    assert html.count('src="data:image/svg+xml;base64,') == 3  # the three done junctions
    assert "no template" in html  # the failed one carries its error


def test_user_text_in_the_report_is_escaped(client):
    body = {"name": "<script>alert(1)</script>",
            "items": [{"id": "<b>J1</b>", "template": "eaves"}]}
    batch_id = client.post("/api/v1/batches", json=body).json()["id"]
    finished(client, batch_id)
    html = client.get(f"/api/v1/batches/{batch_id}/report").text
    assert "<script>alert" not in html and "&lt;b&gt;J1&lt;/b&gt;" in html
