"""Hostile DXF uploads through POST /api/v1/imports/dxf: refused within the limits with a
message naming the file, never a 500, never a hang."""

from __future__ import annotations

import io
import time

import ezdxf
import pytest
from hypothesis import HealthCheck, Phase, given, settings
from hypothesis import strategies as st

LAYERS = ('{"PART": {"material": "part", "conductivity": 1.0}, '
          '"IN": {"environment": "in", "temperature": 20, "side": "interior", '
          '"surface_resistance": 0.13}, '
          '"OUT": {"environment": "out", "temperature": 0, "side": "exterior", '
          '"surface_resistance": 0.04}}')


@pytest.fixture(scope="module")
def client(tmp_path_factory):
    from fastapi.testclient import TestClient

    from coldseam.api.main import create_app
    from coldseam.settings import Settings

    settings = Settings(data_dir=tmp_path_factory.mktemp("dxf"), frontend_dir=None,
                        prestart_workers=False, workers=1)  # uploads start no worker
    with TestClient(create_app(settings), raise_server_exceptions=False) as test_client:
        yield test_client


def upload(client, data: bytes, layer_map: str | None = LAYERS):
    form = {"layer_map": layer_map, "unit": "mm"} if layer_map else {}
    started = time.monotonic()
    response = client.post("/api/v1/imports/dxf", files={"file": ("x.dxf", data)}, data=form)
    return response, time.monotonic() - started


def drawing(build) -> bytes:
    doc = ezdxf.new()
    doc.header["$INSUNITS"] = 4
    build(doc.modelspace(), doc)
    text = io.StringIO()
    doc.write(text)
    return text.getvalue().encode()


def r12_lines(count: int, length: float = 0.01) -> bytes:
    """A plain R12 drawing of ``count`` touching segments ``length`` mm long on layer PART."""
    lines = "".join(f"0\nLINE\n8\nPART\n10\n{i * length:.3f}\n20\n0\n11\n"
                    f"{(i + 1) * length:.3f}\n21\n0\n" for i in range(count))
    return ("0\nSECTION\n2\nHEADER\n9\n$INSUNITS\n70\n4\n0\nENDSEC\n0\nSECTION\n2\nENTITIES\n"
            + lines + "0\nENDSEC\n0\nEOF\n").encode()


def _refused(response, status: int, words: str) -> None:
    assert response.status_code == status, response.text[:300]
    body = response.json()
    assert body["field"] == "/file" and words in body["detail"], body["detail"]


def test_more_entities_than_the_limit_are_refused(client):
    response, seconds = upload(client, r12_lines(20_001, length=1.0))
    _refused(response, 413, "more than 20000 entities")
    assert seconds < 30


def test_a_hundred_thousand_tiny_segments_are_refused(client):
    response, seconds = upload(client, r12_lines(100_000))  # 4.4 MB, under the body limit
    _refused(response, 413, "more than 20000 entities")
    assert seconds < 60


def test_one_polyline_of_a_hundred_thousand_tiny_segments_is_refused(client):
    response, seconds = upload(client, long_polyline(100_000))
    _refused(response, 413, "more than 50000 vertices")
    assert seconds < 30


def long_polyline(count: int) -> bytes:
    """A drawing whose one closed LWPOLYLINE zigzags through ``count`` vertices 0.01 mm apart
    (its vertices written as text: ezdxf takes minutes to add them one by one)."""
    marker = [(0.0, 0.0), (1.0, 0.0), (1.0, 1.0)]
    text = drawing(lambda msp, doc: msp.add_lwpolyline(marker, close=True,
                                                       dxfattribs={"layer": "PART"})).decode()
    short = " 90\n3\n 70\n1\n 10\n0.0\n 20\n0.0\n 10\n1.0\n 20\n0.0\n 10\n1.0\n 20\n1.0\n"
    assert text.count(short) == 1
    points = [(i * 0.01, (i % 2) * 0.01) for i in range(count)] + [(1000, -100), (0, -100)]
    long = f" 90\n{len(points)}\n 70\n1\n" + "".join(f" 10\n{x:.2f}\n 20\n{y:.2f}\n"
                                                    for x, y in points)
    return text.replace(short, long).encode()


def test_blocks_nested_deeply_or_referring_to_themselves_are_refused(client):
    def nested(msp, doc):
        doc.blocks.new("B0").add_line((0, 0), (1, 0), dxfattribs={"layer": "PART"})
        for level in range(1, 40):
            doc.blocks.new(f"B{level}").add_blockref(f"B{level - 1}", (0, 0))
        msp.add_blockref("B39", (0, 0))

    def looped(msp, doc):
        block = doc.blocks.new("LOOP")
        block.add_line((0, 0), (1, 0), dxfattribs={"layer": "PART"})
        block.add_blockref("LOOP", (1, 0))
        msp.add_blockref("LOOP", (0, 0))

    for build in (nested, looped):
        response, seconds = upload(client, drawing(build))
        _refused(response, 413, "nested more than")
        assert seconds < 10


def test_a_block_array_of_a_million_copies_is_refused_before_exploding(client):
    def array(msp, doc):
        doc.blocks.new("TILE").add_line((0, 0), (1, 0), dxfattribs={"layer": "PART"})
        msp.add_blockref("TILE", (0, 0)).grid(size=(1000, 1000), spacing=(1, 1))

    response, seconds = upload(client, drawing(array))
    assert response.status_code == 413, response.text[:300]
    assert seconds < 10


def test_a_degenerate_ellipse_is_a_422_naming_it(client):
    # Found here: an ellipse of axis ratio 1e-200 sent ezdxf's flattening into a
    # RecursionError, a 500.
    def ellipse(msp, doc):
        msp.add_ellipse((0, 0), major_axis=(1e200, 0), ratio=1e-200,
                        dxfattribs={"layer": "PART"})

    response, _ = upload(client, drawing(ellipse))
    _refused(response, 422, "ELLIPSE entity")


def test_coordinates_that_are_not_numbers_are_a_422(client):
    data = (b"0\nSECTION\n2\nENTITIES\n0\nLINE\n8\nPART\n10\nnan\n20\n0\n11\ninf\n21\n0\n"
            b"0\nENDSEC\n0\nEOF\n")
    response, _ = upload(client, data)
    _refused(response, 422, "not a finite number")


FUZZ = settings(max_examples=40, deadline=None, database=None, derandomize=True,
                phases=[Phase.explicit, Phase.generate],
                suppress_health_check=list(HealthCheck))


@FUZZ
@given(st.binary(max_size=4000))
def test_binary_garbage_is_refused_naming_the_file(client, data):
    response, seconds = upload(client, data, layer_map=None)
    assert response.status_code in (200, 413, 422), response.text[:300]
    assert seconds < 10
    if response.status_code != 200:
        assert response.json()["field"] == "/file" and response.json()["detail"]


def _good_drawing() -> bytes:
    def build(msp, doc):
        msp.add_lwpolyline([(0, 0), (300, 0), (300, 1000), (0, 1000)], close=True,
                           dxfattribs={"layer": "PART"})
        msp.add_line((0, 0), (0, 1000), dxfattribs={"layer": "OUT"})
        msp.add_line((300, 0), (300, 1000), dxfattribs={"layer": "IN"})

    return drawing(build)


GOOD = _good_drawing()


@FUZZ
@given(st.integers(0, len(GOOD)), st.lists(st.tuples(st.integers(0, len(GOOD) - 1),
                                                     st.integers(0, 255)), max_size=12))
def test_damaged_drawings_are_read_or_refused_never_a_500(client, cut, flips):
    data = bytearray(GOOD[:cut])
    for where, value in flips:
        if where < len(data):
            data[where] = value
    response, seconds = upload(client, bytes(data))
    assert response.status_code in (200, 413, 422), response.text[:300]
    assert seconds < 10
    if response.status_code != 200:
        assert response.json()["detail"]


def test_the_undamaged_drawing_imports(client):
    response, _ = upload(client, GOOD)
    assert response.status_code == 200, response.text
    assert len(response.json()["section"]["regions"]) == 1
