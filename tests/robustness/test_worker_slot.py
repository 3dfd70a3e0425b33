"""The worker slot when starting a worker process fails (out of processes or memory)."""

from __future__ import annotations

import multiprocessing

import pytest
from robust_support import wall_request

from coldseam.api.slot import Job, WorkerSlot
from coldseam.schema import parse_request


class FlakyContext:
    """A spawn context whose first ``fail`` process starts raise OSError (as fork/exec do
    when the machine is out of processes or memory)."""

    def __init__(self, fail: int) -> None:
        self._real = multiprocessing.get_context("spawn")
        self.fail = fail

    def Pipe(self):  # noqa: N802 (the multiprocessing name)
        return self._real.Pipe()

    def Process(self, **kwargs):  # noqa: N802
        process = self._real.Process(**kwargs)
        if self.fail > 0:
            self.fail -= 1

            def refuse() -> None:
                raise OSError(11, "Resource temporarily unavailable")

            process.start = refuse
        return process


def _job() -> Job:
    request = parse_request(wall_request()).model_dump(mode="json")
    return Job(key="k", request=request, on_start=lambda job: None,
               on_progress=lambda job, stage, fraction: None, on_finish=lambda job, o: None)


def test_a_worker_that_cannot_start_fails_the_job_and_the_next_start_works():
    # Found by the fault tests: a failed Process.start() left the never-started process in
    # the slot; the next job's kill() then raised AssertionError ("can only join a started
    # process") in the pool's runner thread, which died, and every later job waited forever.
    slot = WorkerSlot(FlakyContext(fail=1), "coldseam.thermal.evaluate:evaluate", "w-test")
    with pytest.raises(OSError):
        slot.start()
    assert slot.process is None
    first = slot.run(_job(), timeout=120)
    try:
        assert first.ok, first.error
        assert first.result["mesh"]["nodes"] > 0
    finally:
        slot.stop()


def test_a_failed_start_inside_run_is_answered_not_raised():
    slot = WorkerSlot(FlakyContext(fail=1), "coldseam.thermal.evaluate:evaluate", "w-test")
    outcome = slot.run(_job(), timeout=120)
    assert outcome.error["kind"] == "WorkerCrashed"
    assert "no evaluation worker could be started" in outcome.error["message"]
    again = slot.run(_job(), timeout=120)
    try:
        assert again.ok, again.error
    finally:
        slot.stop()
