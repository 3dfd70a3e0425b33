"""POST/GET of evaluations: the real engine round trip, stored results, paging, wait=false."""

from __future__ import annotations

import time

import pytest
from api_support import REAL_WITH_HOOK, WALL_1D, fake, wall

from coldseam.schema.evaluation import parse_request, request_digest

# ISO 6946: U = 1 / (Rsi + Σ d/λ + Rse); here Rsi 0.13, 100 mm at 0.035, 200 mm at 1.0, Rse 0.04.
WALL_U = 1 / (0.13 + 0.100 / 0.035 + 0.200 / 1.0 + 0.04)


def test_real_engine_round_trip(client_for):
    with client_for(engine=REAL_WITH_HOOK) as client:
        posted = client.post("/api/v1/evaluations", json=WALL_1D)
        assert posted.status_code == 200, posted.text
        body = posted.json()
        assert body["id"] == request_digest(parse_request(WALL_1D))
        assert body["status"] == "done"
        # 1D layered wall, source: ISO 6946 formula (above); L2D = U · 1 m of wall height.
        assert body["L2D"] == pytest.approx(WALL_U * 1.0, rel=1e-6)
        assert body["heat_flows"]["inside"] == pytest.approx(WALL_U * 25, rel=1e-6)
        assert body["request"] == WALL_1D
        assert "competent person" in body["caution"]

        fetched = client.get(f"/api/v1/evaluations/{body['id']}")
        assert fetched.status_code == 200
        assert fetched.json() == body


def test_same_request_again_answers_the_stored_result(client):
    first = client.post("/api/v1/evaluations", json=fake())
    runs = client.app.state.evaluations.pool.completed
    again = client.post("/api/v1/evaluations", json=fake())
    assert again.status_code == 200
    assert again.json() == first.json()
    assert client.app.state.evaluations.pool.completed == runs == 1


def test_a_bare_section_is_accepted_and_echoed(client):
    section = fake()["section"]
    response = client.post("/api/v1/evaluations", json=section)
    assert response.status_code == 200
    assert response.json()["request"] == section
    assert response.json()["id"] == request_digest(parse_request({"section": section}))


def test_field_is_compact_json_of_the_engine_field(client):
    evaluation_id = client.post("/api/v1/evaluations", json=fake()).json()["id"]
    response = client.get(f"/api/v1/evaluations/{evaluation_id}/field")
    assert response.status_code == 200
    assert response.headers["content-type"] == "application/json"
    assert b" " not in response.content
    assert response.json()["triangles"] == [[0, 1, 2]]


def test_unknown_id_is_404(client):
    for path in ("", "/field", "/picture.svg", "/report"):
        response = client.get(f"/api/v1/evaluations/{'0' * 32}{path}")
        assert response.status_code == 404, path
        assert "no evaluation" in response.json()["detail"]


def test_list_pages_newest_first(client):
    names = ["first wall", "second wall", "third wall"]
    for name in names:
        assert client.post("/api/v1/evaluations", json=fake(name=name)).status_code == 200
        time.sleep(0.01)
    page = client.get("/api/v1/evaluations", params={"limit": 2}).json()
    assert page["total"] == 3
    assert [item["name"] for item in page["items"]] == ["third wall", "second wall"]
    rest = client.get("/api/v1/evaluations", params={"limit": 2, "offset": 2}).json()
    assert [item["name"] for item in rest["items"]] == ["first wall"]
    assert rest["items"][0]["status"] == "done"


def test_wait_false_reports_progress_then_the_result(client):
    accepted = client.post("/api/v1/evaluations", params={"wait": "false"},
                           json=fake("sleep=1.5"))
    assert accepted.status_code == 202
    evaluation_id = accepted.json()["id"]
    assert accepted.headers["location"] == f"/api/v1/evaluations/{evaluation_id}"
    seen = _poll(client, evaluation_id)
    running = [s for s in seen if s["status"] == "running" and s["stage"] == "solving"]
    assert running, seen
    assert all(0 <= s["progress"] <= 1 for s in running)
    assert seen[-1]["status"] == "done"
    assert seen[-1]["regions"] == 2


def test_field_of_an_unfinished_evaluation_is_409(client):
    evaluation_id = client.post("/api/v1/evaluations", params={"wait": "false"},
                                json=fake("sleep=1")).json()["id"]
    response = client.get(f"/api/v1/evaluations/{evaluation_id}/field")
    assert response.status_code == 409
    assert "not done" in response.json()["detail"]
    _poll(client, evaluation_id)


def test_results_survive_a_restart(client_for):
    with client_for() as client:
        body = client.post("/api/v1/evaluations", json=wall(name="kept")).json()
    with client_for() as client:
        again = client.get(f"/api/v1/evaluations/{body['id']}")
        assert again.status_code == 200
        assert again.json() == body
        assert client.get(f"/api/v1/evaluations/{body['id']}/field").status_code == 200


def _poll(client, evaluation_id: str, timeout: float = 20.0) -> list[dict]:
    seen, deadline = [], time.monotonic() + timeout
    while time.monotonic() < deadline:
        state = client.get(f"/api/v1/evaluations/{evaluation_id}").json()
        seen.append(state)
        if state["status"] in ("done", "failed"):
            return seen
        time.sleep(0.05)
    raise AssertionError(f"evaluation {evaluation_id} did not finish: {seen[-1]}")
