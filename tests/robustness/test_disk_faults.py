"""Disk faults under the result store, on a small tmpfs of its own: a full disk answers 507
and a read-only data folder 503 (typed, with a clear message), an evaluation whose result
cannot be stored ends failed (so polling ends), the server stays up, and once space returns
nothing stored is corrupt. The tests mount tmpfs themselves (CI runs as root)."""

from __future__ import annotations

import errno
import os
import sqlite3
import subprocess
import sys
import time
from collections.abc import Iterator
from pathlib import Path

import pytest
from robust_support import wall_request

SIZE = "2m"


@pytest.fixture
def small_disk(tmp_path: Path) -> Iterator[Path]:
    folder = tmp_path / "disk"
    folder.mkdir()
    mounted = subprocess.run(["mount", "-t", "tmpfs", "-o", f"size={SIZE}", "tmpfs",
                              str(folder)], capture_output=True, text=True)
    if mounted.returncode != 0:
        pytest.fail(f"these tests mount a {SIZE} tmpfs and need root to do it (CI runs as "
                    f"root): mount said {mounted.stderr.strip()!r}")
    try:
        yield folder
    finally:
        subprocess.run(["umount", "-l", str(folder)], check=False)


def fill(folder: Path) -> Path:
    """Fill the disk of ``folder`` to the last byte with one file; returns that file."""
    filler = folder / "filler"
    chunk = b"\0" * 4096
    with open(filler, "wb", buffering=0) as out:
        try:
            while True:
                out.write(chunk)
        except OSError as exc:
            assert exc.errno == errno.ENOSPC
    with open(filler, "ab", buffering=0) as out:  # the last partial block
        try:
            while True:
                out.write(b"\0")
        except OSError:
            pass
    return filler


def _until(condition, timeout: float = 60.0):
    deadline = time.monotonic() + timeout
    while time.monotonic() < deadline:
        if value := condition():
            return value
        time.sleep(0.05)
    raise AssertionError("condition not met in time")


def _intact(data_dir: Path) -> None:
    with sqlite3.connect(data_dir / "coldseam.sqlite3") as conn:
        assert conn.execute("PRAGMA integrity_check").fetchone()[0] == "ok"
        statuses = dict(conn.execute("SELECT status, COUNT(*) FROM evaluations "
                                     "GROUP BY status").fetchall())
    assert set(statuses) <= {"done", "failed"}, statuses


def _described(k: int) -> dict:
    request = wall_request()
    request["section"]["description"] = f"disk fault {k}"
    return request


def test_a_full_disk_answers_507_and_nothing_is_corrupt_after(small_disk, client_for):
    data_dir = small_disk / "data"
    with client_for(data_dir=data_dir) as client:
        assert client.post("/api/v1/evaluations", json=_described(0)).status_code == 200
        filler = fill(small_disk)
        full = client.post("/api/v1/evaluations", json=_described(1))
        assert full.status_code == 507, full.text
        body = full.json()
        assert body["kind"] == "StoreFull" and "disk holding results is full" in body["detail"]
        accepted = client.post("/api/v1/evaluations", params={"wait": "false"},
                               json=_described(2))
        if accepted.status_code == 202:  # queued in space the database had: the result fails
            location = accepted.headers["location"]
            failed = _until(lambda: (b := client.get(location).json())["status"] == "failed"
                            and b)
            assert failed["error"]["status"] == 507
        else:
            assert accepted.status_code == 507, accepted.text
        assert client.get("/healthz").status_code == 200
        assert client.get("/api/v1/evaluations").status_code == 200
        filler.unlink()
        again = client.post("/api/v1/evaluations", json=_described(1))
        assert again.status_code == 200, again.text
        assert client.get(f"/api/v1/evaluations/{again.json()['id']}").json()["status"] \
            == "done"
    _intact(data_dir)


def test_a_result_that_cannot_be_stored_ends_failed_for_the_poller(small_disk, client_for):
    data_dir = small_disk / "data"
    with client_for(data_dir=data_dir) as client:
        request = _described(3)
        request["options"]["max_levels"] = 5  # long enough to fill the disk meanwhile
        accepted = client.post("/api/v1/evaluations", params={"wait": "false"}, json=request)
        assert accepted.status_code == 202, accepted.text
        filler = fill(small_disk)
        location = accepted.headers["location"]
        ended = _until(lambda: (b := client.get(location).json())["status"]
                       in ("failed", "done") and b)
        if ended["status"] == "done":
            pytest.fail("the result was stored although the disk was filled before it ended "
                        "(the database had room left): the test did not fill the disk")
        assert ended["error"]["kind"] == "StoreFull", ended
        assert "could not be stored" in ended["error"]["detail"]
        filler.unlink()
    _intact(data_dir)


@pytest.fixture
def read_only_view(small_disk: Path) -> Iterator[Path]:
    """The small disk again, mounted read-only at another place (a bind mount)."""
    view = small_disk.parent / "read-only"
    view.mkdir()
    subprocess.run(["mount", "--bind", str(small_disk), str(view)], check=True)
    try:
        subprocess.run(["mount", "-o", "remount,bind,ro", str(view)], check=True)
        yield view
    finally:
        subprocess.run(["umount", "-l", str(view)], check=False)


def test_a_store_that_turned_read_only_answers_503(small_disk, read_only_view, client_for):
    # The server's database handle is swapped for one on the read-only view of the same
    # file: every write is refused by the file system, as when the disk is remounted
    # read-only under a running server (which a test cannot do while the file is open).
    data_dir = small_disk / "data"
    with client_for(data_dir=data_dir) as client:
        assert client.post("/api/v1/evaluations", json=_described(0)).status_code == 200
        store = client.app.state.evaluations.store
        writable = store._conn
        store._conn = sqlite3.connect(read_only_view / "data" / "coldseam.sqlite3",
                                      check_same_thread=False, isolation_level=None)
        try:
            refused = client.post("/api/v1/evaluations", json=_described(4))
            assert refused.status_code == 503, refused.text
            assert refused.json()["kind"] == "StoreUnavailable"
            assert "cannot be written" in refused.json()["detail"]
            assert client.get("/healthz").status_code == 200
            stored = client.get("/api/v1/evaluations")  # reading still works
            assert stored.status_code == 200 and stored.json()["total"] == 1
        finally:
            store._conn.close()
            store._conn = writable
        assert client.post("/api/v1/evaluations", json=_described(4)).status_code == 200
    _intact(data_dir)


def test_serve_on_a_read_only_data_folder_refuses_to_start_with_a_message(small_disk):
    subprocess.run(["mount", "-o", "remount,ro", str(small_disk)], check=True)
    environment = {k: v for k, v in os.environ.items() if not k.startswith("COLDSEAM_")}
    done = subprocess.run([sys.executable, "-m", "coldseam.cli", "serve", "--port", "1",
                           "--data-dir", str(small_disk / "data")], capture_output=True,
                          text=True, timeout=60, env=environment)
    assert done.returncode == 2, done.stderr
    assert "Traceback" not in done.stderr
    assert "cannot be written (Read-only file system)" in done.stderr
