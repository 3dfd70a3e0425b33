"""A server killed (SIGKILL) in the middle of a batch: after the restart the items done
before the kill are kept as they were, the unfinished ones are sent again, and the batch
finishes with every item done."""

from __future__ import annotations

import os
import signal
import time

import httpx
import pytest
from robust_server import children, identities, reap, serve

GRID = {"name": "restart", "grid": {"template": "floor_slab", "length": 3.0, "parameters": {
    "insulation_thickness": list(range(60, 260, 5))}}}  # 40 items


def _batch(base: str, batch_id: str) -> dict:
    return httpx.get(f"{base}/api/v1/batches/{batch_id}", timeout=30).json()


def _wait(base: str, batch_id: str, done: int, timeout: float = 120) -> dict:
    deadline = time.monotonic() + timeout
    while time.monotonic() < deadline:
        body = _batch(base, batch_id)
        if body["counts"]["done"] >= done or body["status"] in ("done", "failed"):
            return body
        time.sleep(0.02)
    raise AssertionError(f"batch stuck at {body['counts']}")


@pytest.mark.slow
def test_a_batch_killed_midway_resumes_after_restart_with_nothing_done_lost(tmp_path):
    data, log = tmp_path / "data", tmp_path / "server.log"
    with serve(data, log, workers=2) as server:
        answer = httpx.post(f"{server.base}/api/v1/batches", json=GRID, timeout=60)
        assert answer.status_code == 202, answer.text
        batch_id = answer.json()["id"]
        before = _wait(server.base, batch_id, done=8)
        workers = identities(children(server.process.pid))
        os.kill(server.process.pid, signal.SIGKILL)
        server.process.wait()
        assert reap(workers) == [], "workers outlived their killed server"
    assert before["counts"]["done"] < 40, "the batch finished before the kill"
    done_before = {i["id"]: i for i in before["items"] if i["status"] == "done"}
    with serve(data, log, workers=2) as server:
        after = _wait(server.base, batch_id, done=40)
        assert after["status"] == "done", after["counts"]
        assert after["counts"] == {"queued": 0, "running": 0, "done": 40, "failed": 0}
        by_id = {i["id"]: i for i in after["items"]}
        for item_id, item in done_before.items():
            assert by_id[item_id] == item  # kept exactly as answered before the kill
        for item in after["items"]:
            evaluation = httpx.get(f"{server.base}/api/v1/evaluations/"
                                   f"{item['evaluation_id']}", timeout=30).json()
            assert evaluation["psi"]["value"] == item["psi"]
        assert after["sum_psi_l"] == pytest.approx(sum(i["psi_l"] for i in after["items"]),
                                                   rel=1e-12)
    assert "unfinished batch items of an earlier run sent again" in log.read_text()
