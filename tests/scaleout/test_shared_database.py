"""Two real ``coldseam serve`` processes sharing one PostgreSQL database."""

from __future__ import annotations

import os
import signal

import pytest
from scaleout_support import ENGINE, WALL, all_done, request, serve, wait_for, when

pytestmark = pytest.mark.slow

KEY = "shared-test-key-1"
OTHER_KEY = "shared-test-key-2"


def auth(key: str = KEY) -> dict[str, str]:
    return {"Authorization": f"Bearer {key}"}


def test_an_evaluation_made_on_one_server_is_read_identically_on_the_other(database_url,
                                                                           tmp_path):
    # the real engine on server a; server b has no call to evaluate anything
    keys = f"{KEY},{OTHER_KEY}"
    with serve(tmp_path / "a.log", "a", database_url=database_url, api_keys=keys,
               workers="1") as a, \
         serve(tmp_path / "b.log", "b", database_url=database_url, api_keys=keys,
               workers="1", prestart_workers="false") as b, a.client() as ca, b.client() as cb:
        made = ca.post("/api/v1/evaluations", json=WALL, headers=auth())
        assert made.status_code == 200, made.text
        evaluation_id = made.json()["id"]
        assert made.json()["L2D"] > 0
        read = cb.get(f"/api/v1/evaluations/{evaluation_id}", headers=auth())
        assert read.status_code == 200
        assert read.json() == ca.get(f"/api/v1/evaluations/{evaluation_id}",
                                     headers=auth()).json()
        assert read.json()["L2D"] == made.json()["L2D"]
        field_a = ca.get(f"/api/v1/evaluations/{evaluation_id}/field", headers=auth())
        field_b = cb.get(f"/api/v1/evaluations/{evaluation_id}/field", headers=auth())
        assert field_b.status_code == 200 and field_b.content == field_a.content
        assert cb.get("/api/v1/evaluations", headers=auth()).json() == ca.get(
            "/api/v1/evaluations", headers=auth()).json()
        # the same request again on b is answered from the stored result, not evaluated
        again = cb.post("/api/v1/evaluations", json=WALL, headers=auth())
        assert again.json() == made.json()
        # another key sees nothing of it, on either server
        assert cb.get(f"/api/v1/evaluations/{evaluation_id}",
                      headers=auth(OTHER_KEY)).status_code == 404
        assert ca.get("/api/v1/evaluations", headers=auth(OTHER_KEY)).json()["total"] == 0


def test_the_other_server_sees_a_running_evaluation_and_leaves_it_alone(database_url,
                                                                        tmp_path):
    settings = {"database_url": database_url, "engine": ENGINE, "workers": "1"}
    with serve(tmp_path / "a.log", "a", **settings) as a, a.client() as ca:
        accepted = ca.post("/api/v1/evaluations", params={"wait": "false"},
                           json=request("sleep=60"))
        location = accepted.json()["location"]
        with serve(tmp_path / "b.log", "b", **settings) as b, b.client() as cb:
            running = wait_for(lambda: when(cb.get(location).json(),
                                            lambda s: s.get("stage") == "solving"),
                               30, "server b to see the evaluation solving")
            assert running["status"] == "running" and 0 < running["progress"] < 1
        # server b stopped, and started again: it marks nothing of server a's failed
        with serve(tmp_path / "b.log", "b", **settings) as b, b.client() as cb:
            later = cb.get(location).json()
            assert later["status"] == "running" and later["progress"] >= running["progress"]
            assert ca.get(location).json()["status"] == "running"


def test_a_restarted_server_interrupts_its_own_unfinished_work(database_url, tmp_path, pg):
    settings = {"database_url": database_url, "engine": ENGINE, "workers": "1"}
    with serve(tmp_path / "a.log", "a", **settings) as a, a.client() as ca:
        location = ca.post("/api/v1/evaluations", params={"wait": "false"},
                           json=request("sleep=30")).json()["location"]
        wait_for(lambda: ca.get(location).json()["status"] == "running", 30, "running")
        os.killpg(a.process.pid, signal.SIGKILL)  # server and its workers, no orderly stop
        a.process.wait()
    with serve(tmp_path / "a.log", "a", **settings) as a, a.client() as ca:
        state = ca.get(location).json()
        assert state["status"] == "failed" and state["error"]["kind"] == "Interrupted"
        assert state["error"]["status"] == 503


def test_the_database_away_is_503_and_service_resumes(database_url, tmp_path, pg):
    settings = {"database_url": database_url, "engine": ENGINE, "workers": "2",
                "queue_size": "20"}
    with serve(tmp_path / "a.log", "a", **settings) as a, a.client() as ca:
        locations = [ca.post("/api/v1/evaluations", params={"wait": "false"},
                             json=request("sleep=3", name=f"item {i}")).json()["location"]
                     for i in range(6)]
        pg.stop()
        try:
            away = ca.get(locations[0])
            assert away.status_code == 503, away.text
            assert away.json()["kind"] == "StoreUnavailable"
            assert "database" in away.json()["detail"] and away.headers["Retry-After"]
            refused = ca.post("/api/v1/evaluations", json=request(name="new"))
            assert refused.status_code == 503
            wait_for(lambda: a.log_has("waits for the database"), 30,
                     "a finished result waiting for the database")
        finally:
            pg.start()
        states = wait_for(lambda: all_done(ca, locations), 60, "every evaluation done")
        assert [s["name"] for s in states] == [f"item {i}" for i in range(6)]
        assert ca.post("/api/v1/evaluations", json=request(name="new")).status_code == 200
