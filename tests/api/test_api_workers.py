"""Worker processes: a crash or an overrun fails that request only; the next one succeeds."""

from __future__ import annotations

import os
import signal
import time

import pytest
from api_support import REAL_WITH_HOOK, WALL_1D, fake, wall

# ISO 6946: U = 1 / (Rsi + Σ d/λ + Rse) of the example wall (see examples/wall-1d.json).
WALL_U = 1 / (0.13 + 0.100 / 0.035 + 0.200 / 1.0 + 0.04)


def test_worker_exiting_mid_evaluation_fails_that_request_only(client_for):
    with client_for(engine=REAL_WITH_HOOK) as client:
        crashed = client.post("/api/v1/evaluations",
                              json=wall(description="exit-while-meshing"))
        assert crashed.status_code == 500
        error = crashed.json()
        assert error["kind"] == "WorkerCrashed"
        assert "stopped unexpectedly during meshing (exit code 9)" in error["detail"]
        assert error["request_id"] in error["detail"]

        after = client.post("/api/v1/evaluations", json=WALL_1D)
        assert after.status_code == 200, after.text
        assert after.json()["L2D"] == pytest.approx(WALL_U, rel=1e-6)
        assert client.get("/healthz").status_code == 200


def test_worker_killed_from_outside_is_replaced(client_for):
    with client_for() as client:
        evaluation_id = client.post("/api/v1/evaluations", params={"wait": "false"},
                                    json=fake("sleep=5")).json()["id"]
        pool = client.app.state.evaluations.pool
        # "running" is set before the worker has the job (or even a process): wait until the
        # worker reports progress on it, so its pid is known and the kill lands mid-evaluation.
        _until(lambda: client.get(f"/api/v1/evaluations/{evaluation_id}").json().get("stage")
               == "solving")
        (pid,) = pool.worker_pids()
        assert pid is not None
        os.kill(pid, signal.SIGKILL)
        _until(lambda: client.get(f"/api/v1/evaluations/{evaluation_id}").json()["status"]
               == "failed")
        error = client.get(f"/api/v1/evaluations/{evaluation_id}").json()["error"]
        assert "killed by SIGKILL" in error["message"]
        assert pool.worker_pids() != [pid]
        assert client.post("/api/v1/evaluations", json=fake()).status_code == 200


def test_an_evaluation_over_the_time_limit_is_stopped(client_for):
    with client_for(evaluation_timeout=1.0) as client:
        started = time.monotonic()
        response = client.post("/api/v1/evaluations", json=fake("sleep=20"))
        assert time.monotonic() - started < 10
        assert response.status_code == 504
        assert "longer than the 1 s limit and was stopped" in response.json()["detail"]
        assert client.post("/api/v1/evaluations", json=fake()).status_code == 200


def test_a_crashed_evaluation_can_be_sent_again(client_for):
    with client_for() as client:
        assert client.post("/api/v1/evaluations", json=fake("exit")).status_code == 500
        again = client.post("/api/v1/evaluations", json=fake("exit"))
        assert again.status_code == 500
        assert "exit code 3" in again.json()["detail"]
        assert client.app.state.evaluations.pool.completed == 2


def _until(condition, timeout: float = 20.0) -> None:
    deadline = time.monotonic() + timeout
    while time.monotonic() < deadline:
        if condition():
            return
        time.sleep(0.05)
    raise AssertionError("condition not met in time")


def test_a_client_hanging_up_does_not_cancel_the_evaluation(client):
    import asyncio

    from coldseam.schema.evaluation import parse_request

    submitted = client.app.state.evaluations.submit("", parse_request(fake("sleep=0.5")), "{}")

    async def hang_up() -> None:
        with pytest.raises(asyncio.TimeoutError):
            await asyncio.wait_for(asyncio.wrap_future(submitted.done), 0.05)

    asyncio.run(hang_up())
    assert submitted.done.result(timeout=20).ok
    stored = client.get(f"/api/v1/evaluations/{submitted.id}").json()
    assert stored["status"] == "done"
    assert client.post("/api/v1/evaluations", json=fake()).status_code == 200


def test_warm_up_evaluates_a_valid_junction_and_never_raises():
    """Workers of the default engine evaluate a small junction before they report ready; the
    request must be one the engine accepts, and a failing warm-up must not stop the worker."""
    from coldseam.api.worker import warm_up
    from coldseam.schema.evaluation import EvaluationRequest

    seen = []

    def recording(request, progress):
        assert isinstance(request, EvaluationRequest)
        seen.append(request.section.name)

    warm_up(recording)
    assert len(seen) == 1

    def failing(request, progress):
        raise RuntimeError("broken engine")

    warm_up(failing)  # logged, not raised


def test_the_pool_counts_the_workers_evaluating_and_not_the_outcomes_being_stored(client):
    from coldseam.schema.evaluation import parse_request

    pool = client.app.state.evaluations.pool
    assert pool.running == 0
    submitted = client.app.state.evaluations.submit("", parse_request(fake("sleep=1.0")), "{}")
    _until(lambda: pool.running == 1)
    assert submitted.done.result(timeout=20).ok
    _until(lambda: pool.running == 0)
