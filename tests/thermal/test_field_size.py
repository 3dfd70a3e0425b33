"""The field document of a large P2 level is drawn on its vertex triangles."""

import numpy as np

from coldseam.schema import parse_request
from coldseam.thermal import field
from coldseam.thermal.evaluate import evaluate
from tests.sections import layered_wall

WALL = layered_wall([("brick", 0.8, 240.0), ("insulation", 0.035, 100.0)])


def _field(element: str) -> dict:
    return evaluate(parse_request({"section": WALL, "options": {"element": element}})).field


def test_p2_fields_are_split_in_four_up_to_the_limit_then_drawn_on_vertices(monkeypatch):
    split = _field("P2")
    monkeypatch.setattr(field, "DRAWN_TRIANGLES", 0)
    vertices = _field("P2")
    assert len(split["triangles"]) == 4 * len(vertices["triangles"])
    assert len(vertices["temperature"]) == len(vertices["points"]) < len(split["points"])
    assert max(max(t) for t in vertices["triangles"]) == len(vertices["points"]) - 1
    # the vertices keep their P2 temperatures, so the drawn values are nodal values
    n = len(vertices["points"])
    assert np.array_equal(split["points"][:n], vertices["points"])
    assert np.array_equal(split["temperature"][:n], vertices["temperature"])
    assert split["heat_flux"][::4] == vertices["heat_flux"]


def test_p1_fields_are_unchanged_by_the_limit(monkeypatch):
    before = _field("P1")
    monkeypatch.setattr(field, "DRAWN_TRIANGLES", 0)
    assert _field("P1") == before
