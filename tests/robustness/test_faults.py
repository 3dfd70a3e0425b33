"""Faults of one evaluation, with real worker processes: a worker killed or crashing inside
gmsh, an evaluation over the memory or wall-time limit, a full queue. That request fails with
a clear message, the worker is replaced, the next request succeeds."""

from __future__ import annotations

import os
import signal
import time

import pytest
from robust_support import big_request, request_of, wall_request

# ISO 6946: U = 1 / (Rse + Σ d/λ + Rsi) of the example wall, over its 1 m height.
WALL_U = 1 / (0.04 + 0.100 / 0.035 + 0.200 / 1.0 + 0.13)
CRASHING = "robust_engines:crashing_mesher"
GREEDY = "robust_engines:greedy"


def _until(condition, timeout: float = 60.0, step: float = 0.05):
    deadline = time.monotonic() + timeout
    while time.monotonic() < deadline:
        value = condition()
        if value:
            return value
        time.sleep(step)
    raise AssertionError("condition not met in time")


def _next_request_succeeds(client) -> None:
    after = client.post("/api/v1/evaluations", json=wall_request())
    assert after.status_code == 200, after.text
    assert after.json()["L2D"] == pytest.approx(WALL_U, rel=1e-6)


def test_a_worker_killed_while_solving_fails_that_evaluation_only(client_for):
    with client_for() as client:
        accepted = client.post("/api/v1/evaluations", params={"wait": "false"},
                               json=big_request())
        location = accepted.headers["location"]
        _until(lambda: client.get(location).json().get("stage") == "solving")
        pool = client.app.state.evaluations.pool
        (pid,) = pool.worker_pids()
        os.kill(pid, signal.SIGKILL)
        failed = _until(lambda: (body := client.get(location).json())["status"] == "failed"
                        and body)
        error = failed["error"]
        assert error["status"] == 500 and error["kind"] == "WorkerCrashed"
        assert "stopped unexpectedly during solving (killed by SIGKILL)" in error["message"]
        assert "may be sent again" in error["message"]
        assert pool.worker_pids() != [pid]
        _next_request_succeeds(client)


def test_a_crash_inside_gmsh_fails_that_evaluation_only(client_for):
    with client_for(engine=CRASHING) as client:
        request = wall_request()
        request["section"]["description"] = "gmsh-segfault"
        crashed = client.post("/api/v1/evaluations", json=request)
        assert crashed.status_code == 500
        body = crashed.json()
        assert body["kind"] == "WorkerCrashed"
        assert "during meshing (killed by SIGSEGV)" in body["detail"]
        assert body["request_id"] in body["detail"]
        _next_request_succeeds(client)


def test_an_evaluation_over_the_memory_limit_is_stopped(client_for):
    # The singular corner refines towards a million nodes; at 400 MiB it is stopped.
    with client_for(worker_memory_mb=400, evaluation_timeout=120) as client:
        started = time.monotonic()
        response = client.post("/api/v1/evaluations", json=big_request())
        assert time.monotonic() - started < 60
        assert response.status_code == 413, response.text
        body = response.json()
        assert body["kind"] == "LimitExceeded" and body["field"] == "/options/max_nodes"
        assert "more than the 400 MiB memory limit of a worker" in body["detail"]
        assert "stopped during solving" in body["detail"]
        stored = client.get("/api/v1/evaluations?limit=1").json()["items"][0]
        assert stored["status"] == "failed"
        _next_request_succeeds(client)


def test_one_huge_allocation_fails_at_once_under_the_address_space_cap(client_for):
    # 3 GiB at once is past the cap (limit + 1 GiB): MemoryError in the worker, answered as
    # over the limit; the worker then ends and a fresh one takes the next request.
    with client_for(engine=GREEDY, worker_memory_mb=300) as client:
        request = wall_request()
        request["section"]["description"] = "alloc=3072"
        response = client.post("/api/v1/evaluations", json=request)
        assert response.status_code == 413, response.text
        assert "300 MiB memory limit" in response.json()["detail"]
        _next_request_succeeds(client)


def test_an_evaluation_over_the_wall_time_limit_is_stopped(client_for):
    with client_for(evaluation_timeout=2.0) as client:
        started = time.monotonic()
        response = client.post("/api/v1/evaluations", json=big_request())
        assert time.monotonic() - started < 15
        assert response.status_code == 504, response.text
        assert "longer than the 2 s limit and was stopped during solving" in \
            response.json()["detail"]
        _next_request_succeeds(client)


def test_a_full_queue_answers_429_with_retry_after(client_for):
    with client_for(engine=GREEDY, queue_size=1) as client:
        slow = [wall_request() for _ in range(3)]
        for k, request in enumerate(slow):
            request["section"]["description"] = f"sleep={1.5 + k * 0.001}"
        running = client.post("/api/v1/evaluations", params={"wait": "false"}, json=slow[0])
        _until(lambda: client.get(running.headers["location"]).json()["status"] == "running")
        queued = client.post("/api/v1/evaluations", params={"wait": "false"}, json=slow[1])
        assert queued.status_code == 202
        refused = client.post("/api/v1/evaluations", json=slow[2])
        assert refused.status_code == 429
        assert int(refused.headers["retry-after"]) >= 1
        assert refused.json()["kind"] == "QueueFull"
        assert f"try again in {refused.headers['retry-after']} s" in refused.json()["detail"]
        _until(lambda: client.get(queued.headers["location"]).json()["status"] == "done",
               timeout=30)
        assert client.post("/api/v1/evaluations", json=slow[2]).status_code == 200


def test_a_mesh_over_the_servers_node_limit_is_refused_before_meshing(client_for):
    from test_node_estimate import foil_wall

    # level 0 of a 0.05 mm foil has about 600 nodes
    with client_for(max_nodes=300) as client:
        started = time.monotonic()
        response = client.post("/api/v1/evaluations",
                               json={"section": foil_wall(0.05), "options": {"max_levels": 3}})
        assert response.status_code == 413, response.text
        assert "estimated before meshing" in response.json()["detail"]
        assert "limit of 300" in response.json()["detail"]
        assert time.monotonic() - started < 10
        asked = client.post("/api/v1/evaluations",
                            json=request_of(foil_wall(0.05), max_nodes=10_000))
        assert asked.status_code == 413
        assert "above this server's limit of 300" in asked.json()["detail"]
