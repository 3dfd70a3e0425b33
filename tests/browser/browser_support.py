"""Helpers of the browser tests: screenshots, direct API calls, page problem filtering."""

from __future__ import annotations

import json
import urllib.request
from pathlib import Path

ARTIFACTS = Path(__file__).parent / "artifacts"
#: The access key of the keyed server (invented for the tests).
TEST_KEY = "harrowgate-site-office-7f3a"


def shot(page, name: str) -> Path:
    """Save a full-page screenshot under artifacts/."""
    ARTIFACTS.mkdir(exist_ok=True)
    path = ARTIFACTS / f"{name}.png"
    page.screenshot(path=str(path), full_page=True)
    return path


def api_json(url: str, method: str = "GET", body: object | None = None) -> dict:
    """Call the API directly (to set up or cross-check what the page shows)."""
    data = None if body is None else json.dumps(body).encode()
    request = urllib.request.Request(url, data=data, method=method,
                                     headers={"Content-Type": "application/json"})
    with urllib.request.urlopen(request, timeout=120) as answer:
        return json.loads(answer.read())


def clean_problems(page) -> list[str]:
    """The page's problems, less the 4xx answers a test provoked on purpose."""
    return [p for p in page.problems if "status of 4" not in p]



def shown(value: float, decimals: int) -> str:
    """A number as the page prints it (fixed decimals, typographic minus)."""
    text = f"{value:.{decimals}f}"
    if text.startswith("-") and float(text) != 0:
        return "\u2212" + text[1:]
    return text.lstrip("-")


def wall_request(name: str = "Larkfield Row depot, east wall (invented)") -> dict:
    """A plain two-layer wall with one flanking element given by its U-value."""
    return {
        "section": {
            "name": name, "unit": "mm",
            "materials": [{"id": "mineral_wool", "conductivity": 0.035},
                          {"id": "masonry", "conductivity": 1.0}],
            "regions": [
                {"material": "mineral_wool", "polygon": [[0, 0], [100, 0], [100, 1000], [0, 1000]]},
                {"material": "masonry", "polygon": [[100, 0], [300, 0], [300, 1000], [100, 1000]]},
            ],
            "environments": [{"id": "inside", "temperature": 20, "side": "interior"},
                             {"id": "outside", "temperature": -5, "side": "exterior"}],
            "boundaries": [
                {"environment": "outside", "surface_resistance": 0.04, "path": [[0, 0], [0, 1000]]},
                {"environment": "inside", "surface_resistance": 0.13, "path": [[300, 0], [300, 1000]]},
            ],
            "probes": [{"id": "interface", "point": [100, 500]}],
        },
        "psi": {"flanking": [{"id": "wall", "length": 1000, "u_value": 0.3}]},
    }
