"""Evaluations on a real Dask cluster (a scheduler and two ``dask worker`` processes) through
real ``coldseam serve`` processes on one PostgreSQL database."""

from __future__ import annotations

import os
import signal

import pytest
from conftest import ENGINE
from scaleout_support import serve, wait_for
from test_shared_database import _all_done, _if, request

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
        here = wait_for(lambda: _if(ca.get(location).json(),
                                    lambda s: s["stage"] == "solving"), 30, "progress on a")
        there = wait_for(lambda: _if(cb.get(location).json(),
                                     lambda s: s["stage"] == "solving"), 10, "progress on b")
        assert here["status"] == there["status"] == "running"
        assert 0 < there["progress"] < 1
        done = wait_for(lambda: _if(cb.get(location).json(),
                                    lambda s: s["status"] == "done"), 30, "the result")
        # the engine ran in a child of a Dask worker process, not of either server
        assert parent_of(done["pid"]) in cluster.worker_pids()
        assert ca.get(location).json() == done


def test_the_limits_of_one_evaluation_hold_on_the_cluster(database_url, cluster, tmp_path):
    settings = {"database_url": database_url, "cluster": cluster.address, "engine": ENGINE,
                "evaluation_timeout": "2", "worker_memory_mb": "300"}
    with serve(tmp_path / "a.log", "a", **settings) as a, a.client() as ca:
        slow = ca.post("/api/v1/evaluations", json=request("sleep=20", name="slow"))
        assert slow.status_code == 504 and slow.json()["kind"] == "Timeout", slow.text
        hog = ca.post("/api/v1/evaluations", json=request("hog=800", name="hog"))
        assert hog.status_code == 413 and hog.json()["kind"] == "LimitExceeded", hog.text
        assert hog.json()["field"] == "/options/max_nodes" and "300 MiB" in hog.json()["detail"]
        typed = ca.post("/api/v1/evaluations", json=request("limit", name="typed"))
        assert typed.status_code == 413 and typed.json()["field"] == "/options/max_nodes"
        fine = ca.post("/api/v1/evaluations", json=request(name="fine after"))
        assert fine.status_code == 200 and fine.json()["engine"] == "scaleout-test"


def test_a_dask_worker_killed_during_a_batch_loses_nothing(database_url, cluster, tmp_path):
    settings = {"database_url": database_url, "cluster": cluster.address, "engine": ENGINE,
                "queue_size": "20"}
    names = [f"variant {i}" for i in range(8)]
    with serve(tmp_path / "a.log", "a", **settings) as a, a.client() as ca:
        locations = [ca.post("/api/v1/evaluations", params={"wait": "false"},
                             json=request("sleep=2", name=name)).json()["location"]
                     for name in names]
        wait_for(lambda: any(ca.get(x).json()["stage"] == "solving" for x in locations), 30,
                 "an evaluation solving")
        before = cluster.worker_pids()
        victim = before[0]
        os.kill(victim, signal.SIGKILL)
        states = wait_for(lambda: _all_done(ca, locations), 90, "every evaluation done")
        assert [s["name"] for s in states] == names
        assert all(s["engine"] == "scaleout-test" for s in states)
        # the nanny has replaced the killed worker
        wait_for(lambda: len(cluster.worker_pids()) == 2, 30, "the worker replaced")
        assert victim not in cluster.worker_pids()
