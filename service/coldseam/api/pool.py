"""A pool of evaluation worker processes, driven by one runner thread per worker.

Meshing and solving never run in the server's process: each worker is a separate process
(``spawn`` or ``forkserver`` start) in a ``WorkerSlot``, fed one request at a time. A crash or
an overrun fails that request only; the slot replaces its worker and the next request runs on
the new one. The server itself is never taken down.
"""

from __future__ import annotations

import logging
import multiprocessing
import queue
import threading
import time
from concurrent.futures import ThreadPoolExecutor

from coldseam.api.slot import STOP_GRACE, Job, Outcome, WorkerSlot, failure

log = logging.getLogger(__name__)


class QueueFull(Exception):
    """Every worker is busy and the waiting line is full."""

    def __init__(self, retry_after: int) -> None:
        super().__init__("the evaluation queue is full")
        self.retry_after = retry_after


class ClusterUnavailable(Exception):
    """The Dask scheduler of ``COLDSEAM_CLUSTER`` cannot be reached (answered 503)."""


class WorkerPool:
    """``workers`` processes taking jobs from a queue of at most ``queue_size`` waiting."""

    def __init__(self, workers: int, queue_size: int, engine_spec: str, timeout: float,
                 start_method: str = "spawn", prestart: bool = True,
                 memory_limit: int = 0) -> None:
        ctx = multiprocessing.get_context(start_method)
        self._slots = [WorkerSlot(ctx, engine_spec, f"coldseam-worker-{i}", memory_limit)
                       for i in range(workers)]
        self._queue: queue.Queue[Job | None] = queue.Queue()
        self._queue_size = queue_size
        self._lock = threading.Lock()
        self._timeout = timeout
        self._threads: list[threading.Thread] = []
        # One storing thread per worker: a finished outcome is stored (an fsync, the field
        # packed, a batch item recorded) while the worker already runs the next job.
        self._finishers = [ThreadPoolExecutor(1, thread_name_prefix=f"{slot.name}-store")
                           for slot in self._slots]
        self._mean_seconds = 5.0
        self._prestart = prestart
        self.stopping = False
        self.completed = 0  # evaluations run to an outcome, for the health page and tests
        self.running = 0  # workers evaluating right now (not counting outcomes being stored)

    def start(self) -> None:
        for slot, finisher in zip(self._slots, self._finishers, strict=True):
            thread = threading.Thread(target=self._runner, args=(slot, finisher), name=slot.name,
                                      daemon=True)
            thread.start()
            self._threads.append(thread)

    def submit(self, job: Job) -> None:
        """Queue ``job``; raise QueueFull when the waiting line is full."""
        with self._lock:
            if self.stopping or self._queue.qsize() >= self._queue_size:
                raise QueueFull(self.retry_after())
            self._queue.put(job)

    def capacity(self) -> int:
        """Evaluations that can run at once."""
        return len(self._slots)

    def retry_after(self) -> int:
        """Seconds after which a place in the queue is likely free."""
        waiting = self._queue.qsize() + len(self._slots)
        return max(1, round(self._mean_seconds * waiting / len(self._slots)))

    def shutdown(self) -> None:
        self.stopping = True
        for _ in self._threads:
            self._queue.put(None)
        for slot in self._slots:
            slot.closed = True
            slot.interrupt()
        for thread in self._threads:
            thread.join(2 * STOP_GRACE)
        for finisher in self._finishers:
            finisher.shutdown(wait=True)  # every outcome received is stored before the end
        for slot in self._slots:
            slot.kill()

    def worker_pids(self) -> list[int | None]:
        """Process ids of the workers (None where none is running)."""
        return [slot.process.pid if slot.process is not None else None
                for slot in self._slots]

    def _runner(self, slot: WorkerSlot, finisher: ThreadPoolExecutor) -> None:
        if self._prestart:
            try:
                slot.start()
            except (OSError, RuntimeError) as exc:
                log.error("worker %s could not start: %s (retried with the first job)",
                          slot.name, exc)
        while (job := self._queue.get()) is not None:
            if self.stopping:
                job.on_finish(job, failure("Interrupted", "the server stopped before this "
                                           "evaluation ran; send it again"))
                continue
            self._run(slot, job, finisher)
        slot.stop()

    def _run(self, slot: WorkerSlot, job: Job, finisher: ThreadPoolExecutor) -> None:
        started = time.monotonic()
        job.on_start(job)
        with self._lock:
            self.running += 1
        try:
            outcome = slot.run(job, self._timeout)
        finally:
            with self._lock:
                self.running -= 1
        if self.stopping and not outcome.ok and outcome.error["kind"] == "WorkerCrashed":
            outcome = failure("Interrupted", "the server stopped during this evaluation; "
                              "send it again")
        self._mean_seconds = 0.8 * self._mean_seconds + 0.2 * (time.monotonic() - started)
        self.completed += 1
        if job.on_ran is not None:
            try:
                job.on_ran(job)
            except Exception:  # noqa: BLE001 - logged; the outcome is still stored
                log.exception("the end of %s could not be announced", job.label or "a job")
        finisher.submit(_finish, job, outcome)


def _finish(job: Job, outcome: Outcome) -> None:
    try:
        job.on_finish(job, outcome)
    except Exception:  # noqa: BLE001 - logged; the storing thread goes on with the next
        log.exception("the outcome of %s could not be handled", job.label or "an evaluation")
