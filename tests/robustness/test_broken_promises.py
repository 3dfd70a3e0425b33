"""Broken promises an independent probe of a served build found, each reproduced as found:
bad JSON at every JSON endpoint (500s before), duplicate keys and query parameters taken
silently, a back-and-forth boundary path crashing the worker, 500s without security headers,
HEAD answered 405, the frontend's README served, -0 and 0 giving two ids, cheap requests
holding a worker, a dead DXF reader blamed on the next upload."""

from __future__ import annotations

import json
import time

import pytest
from robust_support import REPO, wall_request

from coldseam.errors import InvalidSection, LimitExceeded
from coldseam.schema.jsonlimits import load_json

# ISO 6946: U = 1 / (Rse + Σ d/λ + Rsi) of the example wall, over its 1 m height.
WALL_U = 1 / (0.04 + 0.100 / 0.035 + 0.200 / 1.0 + 0.13)
DEEP_ARRAYS = "[" * 100_000 + "]" * 100_000
HUGE_INTEGER = '{"section": {"unit": "mm", "materials": [{"id": "a", "conductivity": ' \
    + "9" * 5000 + "}]}}"
LAYER_MAP = {"PART": {"material": "part", "conductivity": 1.0}}


def _deep_polygon(depth: int) -> str:
    request = json.dumps(wall_request())
    nested = '{"a":' * depth + "1" + "}" * depth
    return request.replace("[[0, 0], [100, 0]", f"[{nested}, [100, 0]", 1)


@pytest.mark.parametrize(("text", "status", "words"), [
    (DEEP_ARRAYS, 413, "deeper than this server reads"),
    ("[" * 40 + "]" * 40, 413, "more than 32 levels deep"),
    (HUGE_INTEGER, 422, "number written with 5000 characters"),
    ('{"a": "' + "x" * 30_000 + '"}', 413, "string in the body has 30000 characters"),
    ('{"a": "\\ud800"}', 422, "unpaired surrogate"),
])
def test_the_json_reader_refuses_with_a_plain_reason(text, status, words):
    error = LimitExceeded if status == 413 else InvalidSection
    with pytest.raises(error) as caught:
        load_json(text)
    assert words in caught.value.message


def test_a_duplicate_key_is_refused_naming_it():
    with pytest.raises(InvalidSection) as caught:
        load_json('{"section": {"unit": "mm", "regions": [], "unit": "m"}}')
    assert caught.value.field == "/section/unit"
    assert "'unit' is given twice" in caught.value.message


@pytest.mark.parametrize("case", ["deep arrays", "deep polygon", "huge integer", "duplicate"])
def test_bad_json_is_a_4xx_at_every_json_endpoint(client_for, case):
    with client_for() as client:
        bodies = {"deep arrays": DEEP_ARRAYS, "deep polygon": _deep_polygon(50_000),
                  "huge integer": HUGE_INTEGER,
                  "duplicate": json.dumps(wall_request())[:-1] + ', "options": {}}'}
        text = bodies[case]
        answers = [
            client.post("/api/v1/evaluations", content=text),
            client.post("/api/v1/templates/wall_corner/section", content=text),
            client.post("/api/v1/templates/wall_corner/evaluations", content=text),
            client.post("/api/v1/imports/dxf", files={"file": ("x.dxf", b"0\nEOF\n")},
                        data={"layer_map": text}),
        ]
        for response in answers:
            assert response.status_code in (413, 422), (case, response.text[:300])
            assert response.json()["detail"]


def test_the_cli_refuses_bad_json_without_a_traceback(tmp_path):
    import subprocess
    import sys

    for name, text in (("deep.json", DEEP_ARRAYS), ("digits.json", HUGE_INTEGER)):
        path = tmp_path / name
        path.write_text(text)
        done = subprocess.run([sys.executable, "-m", "coldseam.cli", "evaluate", str(path)],
                              capture_output=True, text=True, timeout=120)
        assert done.returncode == 2, done.stderr
        assert "Traceback" not in done.stderr and done.stderr.startswith("coldseam: ")


def test_a_unit_given_twice_is_not_taken_as_the_last(client_for):
    # Found: "unit":"mm","unit":"m" answered 200 for a section 1000 times larger.
    text = json.dumps(wall_request()).replace('"unit": "mm"', '"unit": "mm", "unit": "m"')
    with client_for() as client:
        response = client.post("/api/v1/evaluations", content=text)
        assert response.status_code == 422, response.text
        assert response.json()["field"] == "/section/unit"


def test_a_query_parameter_given_twice_is_refused(client_for):
    with client_for() as client:
        response = client.get("/api/v1/evaluations?limit=5&limit=50")
        assert response.status_code == 422
        assert response.json()["field"] == "/query/limit"
        value = client.get("/api/v1/templates/wall_corner/value"
                           "?insulation_thickness=100&insulation_thickness=200")
        assert value.status_code == 422 and "given twice" in value.text


def test_minus_zero_and_zero_are_one_evaluation():
    from coldseam.schema import parse_request
    from coldseam.schema.evaluation import request_digest

    plain = wall_request()
    signed = json.loads(json.dumps(plain).replace("[0, 0]", "[-0.0, -0]"))
    assert signed != plain or "-0" in json.dumps(signed)
    assert request_digest(parse_request(signed)) == request_digest(parse_request(plain))


def test_a_boundary_path_running_back_and_forth_is_evaluated(client_for):
    # Found: 600 points back and forth along the outline crashed the worker in GEOS
    # (std::bad_alloc while buffering the path): 500 WorkerCrashed on every such request.
    request = wall_request()
    request["section"]["boundaries"][0]["path"] = [[0, y] for y in [0, 1000] * 300]
    with client_for() as client:
        started = time.monotonic()
        response = client.post("/api/v1/evaluations", json=request)
        assert response.status_code == 200, response.text
        assert response.json()["L2D"] == pytest.approx(WALL_U, rel=1e-6)
        assert time.monotonic() - started < 60


def test_an_unexpected_failure_answers_500_with_the_security_headers(client_for, monkeypatch):
    from coldseam.api.jobs import Evaluations

    def broken(*args, **kwargs):
        raise RuntimeError("a bug")

    monkeypatch.setattr(Evaluations, "record", broken)
    with client_for() as client:
        response = client.get("/api/v1/evaluations/0123abcd")
        assert response.status_code == 500
        assert "internal error" in response.json()["detail"]
        for header in ("content-security-policy", "x-content-type-options",
                       "referrer-policy", "x-frame-options", "x-request-id"):
            assert header in response.headers, header


def test_head_is_answered_where_get_is(client_for):
    with client_for() as client:
        for path in ("/api/v1/templates/wall_corner/value", "/api/v1/evaluations",
                     "/healthz"):
            head = client.head(path)
            assert head.status_code == 200, (path, head.text)
            assert head.content == b""


def test_the_frontend_readme_is_not_served(client_for):
    assert (REPO / "frontend" / "README.md").exists()
    with client_for(frontend_dir=REPO / "frontend") as client:
        assert client.get("/README.md").status_code == 404
        assert client.get("/").status_code == 200


@pytest.mark.parametrize(("field", "count"), [("probes", 2000), ("environments", 2002),
                                              ("symmetry_lines", 500)])
def test_cheap_requests_over_the_counts_are_refused_at_once(client_for, field, count):
    request = wall_request()
    section = request["section"]
    if field == "probes":
        section["probes"] = [{"id": f"p{k}", "point": [150, k * 0.4]} for k in range(count)]
    elif field == "environments":
        section["environments"] += [{"id": f"e{k}", "temperature": 0, "side": "exterior"}
                                    for k in range(count - 2)]
    else:
        section["symmetry_lines"] = [[[0, 0], [300, 0]]] * count
    with client_for() as client:
        started = time.monotonic()
        response = client.post("/api/v1/evaluations", json=request)
        assert response.status_code == 422, response.text[:300]
        assert response.json()["field"] == f"/section/{field}"
        assert time.monotonic() - started < 5
