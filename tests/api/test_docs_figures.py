"""The figures docs/api.md shows are what the code gives: each value-endpoint call of its
examples is made against a real engine and must answer the text printed under it, and the
wall example's figures must be the evaluation's, rounded as printed."""

from __future__ import annotations

import json
import re
from urllib.parse import urlsplit

import pytest
from api_support import REPO

from coldseam import DEFAULT_ENGINE

DOC = REPO / "docs" / "api.md"
VALUE_CALL = re.compile(r"^\$ curl -s '(http://127\.0\.0\.1:8000(/api/v1/templates/[^']*/value"
                        r"[^']*))'$")


def _value_examples() -> list[tuple[str, str]]:
    """(path with query, the answer printed under it) for every value-endpoint call."""
    lines = DOC.read_text(encoding="utf-8").splitlines()
    out = []
    for i, line in enumerate(lines):
        match = VALUE_CALL.match(line)
        if not match:
            continue
        answer = []
        for following in lines[i + 1:]:
            if following.startswith("$") or not following.strip() or following == "```":
                break
            answer.append(following)
        out.append((match.group(2), "\n".join(answer)))
    return out


def test_the_doc_has_value_examples():
    assert len(_value_examples()) >= 3


@pytest.mark.parametrize(("path", "printed"), _value_examples())
def test_each_value_example_answers_what_the_doc_prints(client_for, path, printed):
    with client_for(engine=DEFAULT_ENGINE) as client:
        split = urlsplit(path)
        answer = client.get(split.path + "?" + split.query)
    assert answer.text.strip() == printed.strip(), f"docs/api.md shows for {path}:\n{printed}"


def test_the_wall_example_figures_are_the_evaluations(client_for):
    text = DOC.read_text(encoding="utf-8")
    shown = text[text.index("--data @examples/wall-1d.json"):]
    shown = shown[:shown.index("\n\n")]
    request = json.loads((REPO / "examples" / "wall-1d.json").read_text())
    with client_for(engine=DEFAULT_ENGINE) as client:
        result = client.post("/api/v1/evaluations", json=request).json()
    figures = {'"inside":': result["heat_flows"]["inside"],
               '"L2D":': result["L2D"],
               '"fRsi":': result["condensation"]["fRsi"]}
    for label, value in figures.items():
        match = re.search(re.escape(label) + r'(-?[0-9.]+)', shown)
        assert match, f"docs/api.md no longer shows {label}"
        printed = match.group(1)
        decimals = len(printed.split(".")[1]) if "." in printed else 0
        assert float(printed) == pytest.approx(round(value, decimals), abs=1e-12), (
            f"docs/api.md shows {label}{printed}; the evaluation gives {value}")
