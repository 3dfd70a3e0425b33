"""A section's size implausible for its declared unit is warned about; result locations come
in metres (``at``, as the contract has it) and in the section's unit (``at_section``)."""

from __future__ import annotations

import copy
import json
from pathlib import Path

import pytest

from coldseam.schema.evaluation import parse_request
from coldseam.thermal.evaluate import evaluate
from coldseam.thermal.units import PLAUSIBLE_EXTENT_M, plausibility_warnings

WALL = json.loads((Path(__file__).resolve().parents[2] / "examples" / "wall-1d.json")
                  .read_text())


def _scaled(unit: str, factor: float) -> dict:
    request = copy.deepcopy(WALL)
    section = request["section"]
    section["unit"] = unit
    for region in section["regions"]:
        region["polygon"] = [[x * factor, y * factor] for x, y in region["polygon"]]
    for boundary in section["boundaries"]:
        boundary["path"] = [[x * factor, y * factor] for x, y in boundary["path"]]
    for probe in section.get("probes", []):
        probe["point"] = [v * factor for v in probe["point"]]
    for element in request.get("psi", {}).get("flanking", []):
        element["length"] *= factor
        if "cut" in element:
            element["cut"] = [[x * factor, y * factor] for x, y in element["cut"]]
    return request


def test_a_mm_drawing_declared_in_metres_is_warned_about():
    result = evaluate(parse_request(_scaled("m", 1.0))).result  # 300 m thick, 1000 m high
    first = result["warnings"][0]
    assert "1000 m across" in first and 'declare "unit": "mm"' in first
    assert first.endswith("(/section/unit)")


def test_a_metre_drawing_declared_in_mm_is_warned_about():
    section = parse_request(_scaled("mm", 0.001)).section  # 0.3 by 1 "mm"
    (warning,) = plausibility_warnings(section)
    assert "1 mm across (0.001 m)" in warning and 'declare "unit": "m"' in warning


@pytest.mark.parametrize(("unit", "factor"), [("mm", 1.0), ("m", 0.001)])
def test_a_plausible_section_has_no_such_warning(unit, factor):
    result = evaluate(parse_request(_scaled(unit, factor))).result
    assert not any("/section/unit" in w for w in result["warnings"])
    assert PLAUSIBLE_EXTENT_M[0] < 1.0 < PLAUSIBLE_EXTENT_M[1]


@pytest.mark.parametrize(("unit", "factor"), [("mm", 1.0), ("m", 0.001)])
def test_locations_come_in_metres_and_in_the_section_unit(unit, factor):
    result = evaluate(parse_request(_scaled(unit, factor))).result
    assert result["section_unit"] == unit
    scale = 0.001 if unit == "mm" else 1.0
    blocks = [result["condensation"], *result["surfaces"].values()]
    for block in blocks:
        assert block["at_section"] == pytest.approx([v / scale for v in block["at"]])
    # the interior surface of the wall is at x = 300 mm = 0.3 m, whatever the unit
    assert result["condensation"]["at"][0] == pytest.approx(0.3)
