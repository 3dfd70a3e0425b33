"""POST /api/v1/imports/dxf: multipart upload to a section, errors naming the field."""

from __future__ import annotations

import io
import json

import ezdxf
import pytest

LAYER_MAP = {
    "MASONRY": {"material": "masonry", "conductivity": 1.0},
    "INSIDE": {"environment": "inside", "temperature": 20, "side": "interior",
               "surface_resistance": 0.13},
    "OUTSIDE": {"environment": "outside", "temperature": -5, "side": "exterior",
                "surface_resistance": 0.04},
}


def _drawing() -> bytes:
    doc = ezdxf.new(units=4)  # $INSUNITS 4: millimetres
    space = doc.modelspace()
    space.add_lwpolyline([(0, 0), (300, 0), (300, 1000), (0, 1000)], close=True,
                         dxfattribs={"layer": "MASONRY"})
    space.add_line((300, 0), (300, 1000), dxfattribs={"layer": "INSIDE"})
    space.add_line((0, 0), (0, 1000), dxfattribs={"layer": "OUTSIDE"})
    text = io.StringIO()
    doc.write(text)
    return text.getvalue().encode()


def _post(client, data: bytes, **form: str):
    return client.post("/api/v1/imports/dxf", files={"file": ("wall.dxf", data)}, data=form)


def test_drawing_with_a_layer_map_becomes_a_section(client):
    response = _post(client, _drawing(), layer_map=json.dumps(LAYER_MAP))
    assert response.status_code == 200, response.text
    section = response.json()["section"]
    assert section["unit"] == "mm"
    assert [r["material"] for r in section["regions"]] == ["masonry"]
    evaluated = client.post("/api/v1/evaluations", json={"section": section})
    assert evaluated.status_code == 200


def test_drawing_without_a_layer_map_lists_its_layers(client):
    response = _post(client, _drawing())
    assert response.status_code == 200
    body = response.json()
    assert body["needs_mapping"] is True
    assert len(body["layers"]) == 3


@pytest.mark.parametrize(("data", "form", "field"), [
    (b"0\nSECTION\n2\nNOT A DRAWING", {}, "/file"),
    (b"", {}, "/file"),
    (None, {"layer_map": "{MASONRY: masonry"}, "/layer_map"),
    (None, {"layer_map": "[1, 2]"}, "/layer_map"),
])
def test_bad_uploads_are_422_naming_the_field(client, data, form, field):
    response = _post(client, _drawing() if data is None else data, **form)
    assert response.status_code == 422, response.text
    assert response.json()["field"] == field


def test_missing_file_is_422(client):
    response = client.post("/api/v1/imports/dxf", data={"unit": "mm"})
    assert response.status_code == 422
    assert response.json()["field"] == "/body/file"


def test_upload_over_the_body_limit_is_413(client_for):
    with client_for(max_body_bytes=5_000) as client:
        response = _post(client, _drawing() + b"\n" * 10_000)
        assert response.status_code == 413
