"""Results survive the server being killed (SIGKILL) while it writes them: on restart the
database is intact and every result answered 200 before the kill reads back the same."""

from __future__ import annotations

import os
import signal
import sqlite3
import threading
import time

import httpx
import pytest
from robust_server import children, identities, reap, serve
from robust_support import wall_request

from coldseam.api.store import Store

CLIENTS = 8


def varied_wall(n: int) -> dict:
    """The example wall with its masonry λ nudged: a distinct request (and id) per n."""
    request = wall_request()
    request["section"]["materials"][1]["conductivity"] = round(1.0 + n * 1e-4, 6)
    return request


def _hammer(base: str, start: int, answered: dict, stop: threading.Event) -> None:
    with httpx.Client(base_url=base, timeout=60) as http:
        for n in range(start, start + 10_000):
            if stop.is_set():
                return
            try:
                response = http.post("/api/v1/evaluations", json=varied_wall(n))
            except httpx.TransportError:
                return  # the server is gone
            if response.status_code == 200:
                answered[response.json()["id"]] = response.json()


def _kill_while_writing(server, answered: dict, first: int, wanted: int) -> None:
    """Keep CLIENTS posting until ``wanted`` more results are answered, then SIGKILL."""
    workers = identities(children(server.process.pid))
    before, stop = len(answered), threading.Event()
    threads = [threading.Thread(target=_hammer, args=(server.base, first + k * 10_000,
                                                      answered, stop)) for k in range(CLIENTS)]
    for thread in threads:
        thread.start()
    deadline = time.monotonic() + 90
    while len(answered) < before + wanted and time.monotonic() < deadline:
        time.sleep(0.02)
    os.kill(server.process.pid, signal.SIGKILL)
    server.process.wait()
    stop.set()
    for thread in threads:
        thread.join(60)
    assert len(answered) >= before + wanted, "too few results before the kill"
    # The workers notice their server is gone and end by themselves.
    assert reap(workers) == [], "workers outlived their killed server"


@pytest.mark.slow
def test_results_answered_before_a_sigkill_are_all_there_after_restart(tmp_path):
    data, log = tmp_path / "data", tmp_path / "server.log"
    answered: dict[str, dict] = {}
    for cycle in range(2):
        with serve(data, log, workers=2) as server:
            if cycle:
                _check_all_readable(server.base, answered)
            _kill_while_writing(server, answered, cycle * 1_000_000, wanted=25)
    with serve(data, log, workers=1) as server:
        _check_all_readable(server.base, answered)
    with sqlite3.connect(data / "coldseam.sqlite3") as db:
        assert db.execute("PRAGMA integrity_check").fetchone() == ("ok",)
        states = dict(db.execute("SELECT status, COUNT(*) FROM evaluations GROUP BY status"))
        errors = [row[0] for row in db.execute(
            "SELECT error FROM evaluations WHERE status = 'failed'")]
    assert set(states) <= {"done", "failed"}, states  # nothing left half-way
    assert states["done"] >= len(answered)
    assert all('"Interrupted"' in error for error in errors), errors


def _check_all_readable(base: str, answered: dict) -> None:
    with httpx.Client(base_url=base, timeout=30) as http:
        for evaluation_id, body in answered.items():
            again = http.get(f"/api/v1/evaluations/{evaluation_id}")
            assert again.status_code == 200, (evaluation_id, again.text)
            assert again.json() == body


def test_the_store_writes_in_wal_mode_and_syncs_every_result(tmp_path):
    store = Store(tmp_path / "results.sqlite3")
    try:
        connection = store._conn  # the store's own connection: these settings are per connection
        assert connection.execute("PRAGMA journal_mode").fetchone() == ("wal",)
        assert connection.execute("PRAGMA synchronous").fetchone() == (2,)  # FULL
    finally:
        store.close()
