"""The demo project's junction schedule builds valid requests, and its stored sections are
the ones the templates build today (so the examples never drift from the code)."""

import csv
import json
from pathlib import Path

import pytest

from coldseam.schema import parse_request
from coldseam.templates import build

DEMO = Path(__file__).resolve().parents[2] / "examples" / "harrowgate"
ROWS = list(csv.DictReader(open(DEMO / "schedule.csv", newline="")))


@pytest.mark.parametrize("row", ROWS, ids=[r["junction"] for r in ROWS])
def test_schedule_rows_build_valid_requests(row):
    request = build(row["template"], json.loads(row["parameters"]))
    parse_request(request)
    name = row["junction"].split()[0].lower() + "-" + row["template"].replace("_", "-") + ".json"
    stored = json.loads((DEMO / "sections" / name).read_text())
    assert stored == json.loads(json.dumps(request))
    assert float(row["length_m"]) > 0


def test_glazing_edge_section_is_the_template_build():
    """The demo's glazing edge (not a schedule row: ψ_g belongs in U_w) is today's build."""
    stored = json.loads((DEMO / "sections" / "w1-glazing-edge.json").read_text())
    request = build("glazing_edge", {"spacer": "warm_edge"})
    parse_request(request)
    assert stored == json.loads(json.dumps(request))
