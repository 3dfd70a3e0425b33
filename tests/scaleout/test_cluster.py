"""Evaluations on a real Dask cluster (a scheduler and two ``dask worker`` processes) through
real ``coldseam serve`` processes on one PostgreSQL database."""

from __future__ import annotations

import os
import signal

import pytest
from scaleout_support import (
    ENGINE,
    batch_finished,
    batch_of,
    request,
    serve,
    wait_for,
    when,
)

pytestmark = pytest.mark.slow


def parent_of(pid: int) -> int:
    with open(f"/proc/{pid}/stat") as stat:
        return int(stat.read().rsplit(")", 1)[1].split()[1])


def test_evaluations_run_on_the_cluster_and_progress_reaches_both_servers(
        database_url, cluster, tmp_path):
    settings = {"database_url": database_url, "cluster": cluster.address, "engine": ENGINE}
    with serve(tmp_path / "a.log", "a", **settings) as a, \
         serve(tmp_path / "b.log", "b", **settings) as b, a.client() as ca, b.client() as cb:
        location = ca.post("/api/v1/evaluations", params={"wait": "false"},
                           json=request("sleep=3")).json()["location"]
        here = wait_for(lambda: when(ca.get(location).json(),
                                    lambda s: s["stage"] == "solving"), 30, "progress on a")
        there = wait_for(lambda: when(cb.get(location).json(),
                                     lambda s: s["stage"] == "solving"), 10, "progress on b")
        assert here["status"] == there["status"] == "running"
        assert 0 < there["progress"] < 1
        done = wait_for(lambda: when(cb.get(location).json(),
                                    lambda s: s["status"] == "done"), 30, "the result")
        # the engine ran in a child of a Dask worker process, not of either server
        assert parent_of(done["pid"]) in cluster.worker_pids()
        assert ca.get(location).json() == done
        # the field, packed on the worker, reads back as the engine made it, on both servers
        field = cb.get(f"{location}/field")
        assert field.status_code == 200 and field.content == ca.get(f"{location}/field").content
        assert field.json()["temperature"] == [20.0, 0.0, 10.0]


def test_the_limits_of_one_evaluation_hold_on_the_cluster(database_url, cluster, tmp_path):
    settings = {"database_url": database_url, "cluster": cluster.address, "engine": ENGINE,
                "evaluation_timeout": "8", "worker_memory_mb": "300", "max_nodes": "2000"}
    with serve(tmp_path / "a.log", "a", **settings) as a, a.client() as ca:
        many = request(name="many nodes")
        many["options"] = {"max_nodes": 50_000}
        nodes = ca.post("/api/v1/evaluations", json=many)
        assert nodes.status_code == 413 and nodes.json()["field"] == "/options/max_nodes"
        hog = ca.post("/api/v1/evaluations", json=request("hog=800", name="hog"))
        assert hog.status_code == 413 and hog.json()["kind"] == "LimitExceeded", hog.text
        assert hog.json()["field"] == "/options/max_nodes" and "300 MiB" in hog.json()["detail"]
        slow = ca.post("/api/v1/evaluations", json=request("sleep=60", name="slow"))
        assert slow.status_code == 504 and slow.json()["kind"] == "Timeout", slow.text
        assert "8 s limit" in slow.json()["detail"]
        typed = ca.post("/api/v1/evaluations", json=request("limit", name="typed"))
        assert typed.status_code == 413 and typed.json()["field"] == "/options/max_nodes"
        fine = ca.post("/api/v1/evaluations", json=request(name="fine after"))
        assert fine.status_code == 200 and fine.json()["engine"] == "scaleout-test"


def test_a_dask_worker_killed_during_a_batch_loses_nothing(database_url, cluster, tmp_path):
    settings = {"database_url": database_url, "cluster": cluster.address, "engine": ENGINE}
    names = [f"variant {i}" for i in range(8)]
    with serve(tmp_path / "a.log", "a", **settings) as a, a.client() as ca:
        posted = ca.post("/api/v1/batches", json=batch_of(names, "sleep=2"))
        assert posted.status_code == 202, posted.text
        location = posted.headers["Location"]
        wait_for(lambda: ca.get(location).json()["counts"]["running"] >= 2, 30,
                 "batch items running on both workers")
        victim = cluster.worker_pids()[0]
        os.kill(victim, signal.SIGKILL)
        batch = wait_for(lambda: batch_finished(ca, location), 90, "the batch finished")
        assert batch["status"] == "done", batch
        assert batch["counts"] == {"queued": 0, "running": 0, "done": 8, "failed": 0}
        assert [item["id"] for item in batch["items"]] == names
        for item in batch["items"]:
            result = ca.get(f"/api/v1/evaluations/{item['evaluation_id']}").json()
            assert result["status"] == "done" and result["name"] == item["id"]
        # the nanny has replaced the killed worker
        wait_for(lambda: len(cluster.worker_pids()) == 2, 30, "the worker replaced")
        assert victim not in cluster.worker_pids()


def test_the_database_restarted_during_a_batch_is_503_meanwhile_and_loses_nothing(
        database_url, cluster, tmp_path, pg):
    settings = {"database_url": database_url, "cluster": cluster.address, "engine": ENGINE}
    names = [f"item {i}" for i in range(6)]
    with serve(tmp_path / "a.log", "a", **settings) as a, a.client() as ca:
        location = ca.post("/api/v1/batches", json=batch_of(names, "sleep=2")
                           ).headers["Location"]
        wait_for(lambda: ca.get(location).json()["counts"]["running"] >= 1, 30, "running")
        pg.stop()
        try:
            away = ca.get(location)
            assert away.status_code == 503 and away.json()["kind"] == "StoreUnavailable"
            assert ca.post("/api/v1/batches", json=batch_of(["late"], "")).status_code == 503
            wait_for(lambda: a.log_has("waits for the database"), 30,
                     "a finished result waiting for the database")
        finally:
            pg.start()
        batch = wait_for(lambda: batch_finished(ca, location), 90, "the batch finished")
        assert batch["counts"] == {"queued": 0, "running": 0, "done": 6, "failed": 0}
        assert [item["id"] for item in batch["items"]] == names
