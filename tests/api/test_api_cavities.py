"""Cavity input errors through the service: 422 naming the field, never 500; a cavity
result comes back with its `cavities` list."""

from __future__ import annotations

import pytest
from sections import cavity_frame

ENGINE = "coldseam.thermal.evaluate:evaluate"


def _open_cavity() -> dict:
    frame = cavity_frame(1, 1)
    frame["regions"][1]["polygon"] = [[0, 4], [16, 4], [16, 20], [0, 20]]  # onto the outside
    return frame


@pytest.mark.parametrize(("change", "field", "words"), [
    (lambda s: s["materials"][1]["cavity"].update(emissivity=0), "/section/materials/1/cavity/"
     "emissivity", "(0, 1]"),
    (lambda s: s["materials"][1]["cavity"].update(emissivity=[0.9, 1.5]),
     "/section/materials/1/cavity/emissivity", "(0, 1]"),
    (lambda s: s["materials"][1]["cavity"].update(ventilation="draughty"),
     "/section/materials/1/cavity/ventilation", "unventilated"),
    (lambda s: s["materials"][1].update(conductivity=0.025), "/section/materials/1", "cavity"),
    (lambda s: s["regions"][1].update(polygon=[[4, 4], [10, 4], [20, 4]]),
     "/section/regions/1/polygon", "zero width"),
])
def test_bad_cavity_input_is_422(client_for, change, field, words):
    section = cavity_frame(1, 1)
    change(section)
    with client_for(engine=ENGINE) as client:
        response = client.post("/api/v1/evaluations", json={"section": section})
    assert response.status_code == 422, response.text
    body = response.json()
    assert body["field"] == field and words in body["detail"], body


def test_cavity_open_to_outside_is_422_naming_the_region(client_for):
    with client_for(engine=ENGINE) as client:
        response = client.post("/api/v1/evaluations", json={"section": _open_cavity()})
    assert response.status_code == 422, response.text
    body = response.json()
    assert body["field"] == "/section/regions/1" and "closed by solids" in body["detail"]


def test_cavities_in_the_stored_result(client_for):
    with client_for(engine=ENGINE) as client:
        created = client.post("/api/v1/evaluations", json={"section": cavity_frame(2, 1)})
        assert created.status_code == 200, created.text
        stored = client.get(f"/api/v1/evaluations/{created.json()['id']}").json()
    assert [c["region"] for c in stored["cavities"]] == [1, 2]
    assert all(c["equivalent_conductivity"] > 0 for c in stored["cavities"])
