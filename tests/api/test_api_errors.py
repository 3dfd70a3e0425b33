"""Bad input never gets a 500: every error names the field and says what is wrong."""

from __future__ import annotations

import time

import pytest
from api_support import fake, wall

from coldseam.api.store import Store


def _error(response, status: int) -> dict:
    assert response.status_code == status, response.text
    body = response.json()
    assert body["detail"] and body["request_id"]
    return body


@pytest.mark.parametrize(("body", "field", "words"), [
    (b"{\"section\": ", "", "not valid JSON"),
    (b"[1, 2, 3]", "", "valid dictionary"),
    (b"\xff\xfe\x00", "", "not UTF-8"),
])
def test_malformed_bodies_are_422(client, body, field, words):
    response = client.post("/api/v1/evaluations", content=body,
                           headers={"content-type": "application/json"})
    error = _error(response, 422)
    assert error["field"] == field
    assert words in error["detail"]


def _without_unit() -> dict:
    request = wall()
    del request["section"]["unit"]
    return request


def _text_conductivity() -> dict:
    request = wall()
    request["section"]["materials"][0]["conductivity"] = "low"
    return request


def _unknown_material() -> dict:
    request = wall()
    request["section"]["regions"][1]["material"] = "brick"
    return request


def _misspelt_field() -> dict:
    request = wall()
    request["section"]["boundaries"][0]["surface_resistence"] = 0.04
    return request


@pytest.mark.parametrize(("make", "field", "words"), [
    (_without_unit, "/section/unit", "'unit' is required"),
    (_text_conductivity, "/section/materials/0/conductivity", "number"),
    (_unknown_material, "/section/regions/1/material", "not among the materials"),
    (_misspelt_field, "/section/boundaries/0/surface_resistence", "misspelt"),
])
def test_invalid_requests_name_the_field(client, make, field, words):
    error = _error(client.post("/api/v1/evaluations", json=make()), 422)
    assert error["field"] == field
    assert words in error["message"]
    assert error["detail"].startswith(field + ": ")


@pytest.mark.parametrize(("command", "status", "kind", "field"), [
    ("meshing-failed", 422, "MeshingFailed", "/section/regions/0/polygon"),
    ("limit", 413, "LimitExceeded", "/options/max_nodes"),
    ("solve-failed", 500, "SolveFailed", ""),
])
def test_engine_errors_map_to_statuses(client, command, status, kind, field):
    response = client.post("/api/v1/evaluations", json=fake(command))
    error = _error(response, status)
    assert (error["kind"], error["field"]) == (kind, field)
    if status == 500:
        assert error["request_id"] in error["detail"]
    stored = client.get(f"/api/v1/evaluations/{_id_of(client, command)}").json()
    assert stored["status"] == "failed"
    assert stored["error"]["status"] == status
    assert stored["request"] == fake(command)


def _id_of(client, command: str) -> str:
    from coldseam.schema.evaluation import parse_request, request_digest

    return request_digest(parse_request(fake(command)))


def test_body_over_the_limit_is_413(client_for):
    with client_for(max_body_bytes=2_000) as client:
        big = wall(description="x" * 1_900)
        error = _error(client.post("/api/v1/evaluations", json=big), 413)
        assert "2000 byte limit" in error["detail"]

        def chunks():
            yield b'{"section": {"description": "'
            yield b"y" * 3_000
            yield b'"}}'

        streamed = client.post("/api/v1/evaluations", content=chunks(),
                               headers={"content-type": "application/json"})
        _error(streamed, 413)


def test_region_vertex_and_node_limits_are_413(client_for):
    with client_for(max_regions=1, max_vertices=12, max_nodes=1_000) as client:
        error = _error(client.post("/api/v1/evaluations", json=wall()), 413)
        assert error["field"] == "/section/regions"
        single = wall(regions=[wall()["section"]["regions"][0]],
                      materials=[wall()["section"]["materials"][0]])
        single["section"]["regions"][0]["polygon"] += [[50, 1000], [20, 1000]] * 3
        error = _error(client.post("/api/v1/evaluations", json=single), 413)
        assert error["field"] == "/section"
        assert "vertices" in error["message"]
    with client_for(max_nodes=1_000) as client:
        request = wall()
        request["options"] = {"max_nodes": 5_000}
        error = _error(client.post("/api/v1/evaluations", json=request), 413)
        assert error["field"] == "/options/max_nodes"


def test_wrong_query_types_are_422(client):
    error = _error(client.get("/api/v1/evaluations", params={"limit": "ten"}), 422)
    assert error["field"] == "/query/limit"
    error = _error(client.post("/api/v1/evaluations", params={"wait": "perhaps"},
                               json=fake()), 422)
    assert error["field"] == "/query/wait"


def test_unexpected_failure_is_logged_with_request_id(client_for, monkeypatch, caplog):
    def broken_page(self, owner, limit, offset):
        raise RuntimeError("disk on fire")

    monkeypatch.setattr(Store, "page", broken_page)
    with client_for(raise_server_exceptions=False) as client:
        response = client.get("/api/v1/evaluations", headers={"x-request-id": "probe-42"})
    assert response.status_code == 500
    assert "probe-42" in response.json()["detail"]
    assert "disk on fire" not in response.text
    assert any("probe-42" in r.getMessage() and r.exc_info for r in caplog.records)


def test_a_full_queue_answers_429_with_retry_after(client_for):
    with client_for(workers=1, queue_size=1) as client:
        running = client.post("/api/v1/evaluations", params={"wait": "false"},
                              json=fake("sleep=3", name="running"))
        _wait_for_status(client, running.json()["id"], "running")
        queued = client.post("/api/v1/evaluations", params={"wait": "false"},
                             json=fake("sleep=0", name="queued"))
        assert queued.status_code == 202
        refused = client.post("/api/v1/evaluations", json=fake(name="refused"))
        error = _error(refused, 429)
        assert int(refused.headers["retry-after"]) >= 1
        assert "queue is full" in error["detail"]
        listed = [item["name"] for item in client.get("/api/v1/evaluations").json()["items"]]
        assert "refused" not in listed


def _wait_for_status(client, evaluation_id: str, status: str) -> None:
    deadline = time.monotonic() + 20
    while time.monotonic() < deadline:
        if client.get(f"/api/v1/evaluations/{evaluation_id}").json()["status"] == status:
            return
        time.sleep(0.05)
    raise AssertionError(f"{evaluation_id} never became {status}")


def test_malformed_multipart_is_a_422_naming_the_file(client):
    response = client.post(
        "/api/v1/imports/dxf", content=b"--b\r\n[]--b",
        headers={"Content-Type": "multipart/form-data; boundary=b"})
    assert response.status_code == 422, response.text
    assert response.json()["field"] == "/file"
    assert "multipart" in response.json()["detail"]
