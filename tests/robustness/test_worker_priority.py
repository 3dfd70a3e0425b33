"""Engine processes run nicer than the server, and an upload never makes the server import
the drawing reader's libraries: the server's event loop keeps the CPU it needs to answer
/healthz at once under load (delays measured by ``bench/health_load.py``)."""

from __future__ import annotations

import multiprocessing
import os
import subprocess
import sys
from concurrent.futures import ThreadPoolExecutor
from contextlib import contextmanager

import pytest
from fastapi import HTTPException

import coldseam.api.reader as reader
from coldseam.api.slot import WorkerSlot
from coldseam.api.worker import NICENESS


def _expected() -> int:
    own = os.getpriority(os.PRIO_PROCESS, 0)
    if own + NICENESS > 19:
        pytest.skip(f"this test runs at niceness {own}: no room to be nicer")
    return own + NICENESS


def own_niceness(data, mapping, unit) -> int:
    """A stand-in for the DXF importer: the niceness of the process it runs in."""
    return os.getpriority(os.PRIO_PROCESS, 0)


@contextmanager
def started_slot():
    """A worker slot of the real engine, started, stopped afterwards."""
    slot = WorkerSlot(multiprocessing.get_context("spawn"),
                      "coldseam.thermal.evaluate:evaluate", "coldseam-worker-nice")
    slot.start()
    try:
        yield slot
    finally:
        slot.stop()


def test_evaluation_workers_run_nicer_than_the_server():
    expected = _expected()
    with started_slot() as slot:
        assert os.getpriority(os.PRIO_PROCESS, slot.process.pid) == expected


def test_a_replaced_worker_runs_nicer_too():
    expected = _expected()
    with started_slot() as slot:
        first = slot.process.pid
        slot.kill()
        slot.start()
        assert slot.process.pid != first
        assert os.getpriority(os.PRIO_PROCESS, slot.process.pid) == expected


def test_the_drawing_reader_runs_nicer_than_the_server():
    expected = _expected()
    drawings = reader.DrawingReader(0, function=own_niceness)
    try:
        # on a thread of its own: the synchronous read runs its own event loop, and a test
        # before this one may leave a loop running on the main thread
        with ThreadPoolExecutor(1) as thread:
            assert thread.submit(drawings.read, b"", None, None).result(60) == expected
    finally:
        drawings.close()


def test_checking_for_the_importer_does_not_import_it():
    code = ("import sys; from coldseam.api.reader import check_importer; check_importer(); "
            "print(sorted(m for m in sys.modules if m == 'ezdxf' or m.startswith('coldseam.imports.')))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True,
                         env={**os.environ, "PYTHONPATH": os.pathsep.join(sys.path)})
    assert out.stdout.strip() == "[]", out.stdout


def test_a_missing_importer_is_501(monkeypatch):
    monkeypatch.setattr(reader, "IMPORTER", "coldseam.imports.not_installed")
    with pytest.raises(HTTPException) as missing:
        reader.check_importer()
    assert missing.value.status_code == 501
