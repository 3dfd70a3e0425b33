"""The plain pip install (no CHOLMOD: QDLDL) evaluates exactly what the extras evaluate."""

import json
from pathlib import Path

import pytest

from coldseam.fem import solvers
from coldseam.schema import parse_request
from coldseam.thermal.evaluate import evaluate

EXAMPLES = Path(__file__).resolve().parents[2] / "examples"


def test_the_plain_path_gives_the_same_levels_and_figures(monkeypatch):
    if solvers._cholmod() is None:
        pytest.skip("scikit-sparse (CHOLMOD) is not installed: there is no other path to compare")
    request = parse_request(json.loads((EXAMPLES / "iso10211-case2.json").read_text()))
    extras = evaluate(request).result
    monkeypatch.setenv("COLDSEAM_CHOLMOD", "0")
    plain = evaluate(request).result
    assert [lv["nodes"] for lv in plain["mesh"]["levels"]] == [
        lv["nodes"] for lv in extras["mesh"]["levels"]]
    assert plain["heat_flows"]["warm"] == pytest.approx(extras["heat_flows"]["warm"], rel=1e-9)
    assert plain["condensation"]["min_temperature"] == pytest.approx(
        extras["condensation"]["min_temperature"], abs=1e-8)
    for probe, value in extras["probes"].items():
        assert plain["probes"][probe] == pytest.approx(value, abs=1e-8)
