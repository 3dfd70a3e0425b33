"""Evaluations as the API sees them: the store, the worker pool and the live progress of the
evaluations in flight, tied together (no FastAPI here)."""

from __future__ import annotations

import logging
import sqlite3
import threading
import time
from concurrent.futures import Future
from dataclasses import dataclass, field

from coldseam.api.pool import QueueFull, WorkerPool
from coldseam.api.slot import Job, Outcome, failure
from coldseam.api.store import Record, StoreError, StoreUnavailable, storage_key
from coldseam.api.stores import EvaluationStore
from coldseam.schema.evaluation import EvaluationRequest, request_digest

log = logging.getLogger(__name__)

#: Failures caused by the request itself (logged quietly).
USER_ERRORS = {"InvalidSection", "MeshingFailed", "LimitExceeded"}
#: What a store raises when it cannot record something.
STORE_ERRORS = (sqlite3.Error, StoreError)
STORE_RETRY = 1.0  # s between two attempts to store a result while the database is away


@dataclass
class Live:
    """An evaluation that is queued or running in this server process."""

    status: str = "queued"
    stage: str | None = None
    progress: float = 0.0
    done: Future = field(default_factory=lambda: _uncancellable())


def _uncancellable() -> Future:
    """A future a client hanging up cannot cancel (asyncio.wrap_future would, on the way)."""
    future: Future = Future()
    future.set_running_or_notify_cancel()
    return future


@dataclass(frozen=True)
class Submitted:
    """What `Evaluations.submit` did: ``done`` is None when a stored result was found."""

    id: str
    key: str
    done: Future | None


class Evaluations:
    """Submit, look up and list evaluations, each scoped to its owner."""

    def __init__(self, store: EvaluationStore, pool: WorkerPool,
                 store_wait: float = 60.0) -> None:
        self.store, self.pool = store, pool
        self.store_wait = store_wait  # s a finished result waits for an unreachable database
        self._live: dict[str, Live] = {}
        self._lock = threading.Lock()

    def submit(self, owner: str, request: EvaluationRequest, request_text: str,
               request_id: str = "") -> Submitted:
        """Start evaluating ``request`` unless its result is stored or it is in flight.

        Raises QueueFull when no worker is free and the queue is full.
        """
        evaluation_id = request_digest(request)
        key = storage_key(owner, evaluation_id)
        with self._lock:
            if key in self._live:
                return Submitted(evaluation_id, key, self._live[key].done)
            record = self.store.get(key)
            if record is not None and record.status == "done":
                return Submitted(evaluation_id, key, None)
            self.store.queue(key, evaluation_id, owner, request.section.name, request_text)
            live = self._live[key] = Live()
        job = Job(key=key, request=request.model_dump(mode="json"), label=request_id,
                  on_start=self._started, on_progress=self._progressed,
                  on_finish=self._finished)
        try:
            self.pool.submit(job)
        except QueueFull:
            self._forget(key)
            raise
        log.info("evaluation %s queued (request %s)", evaluation_id, request_id)
        return Submitted(evaluation_id, key, live.done)

    def live(self, key: str) -> Live | None:
        with self._lock:
            return self._live.get(key)

    def record(self, owner: str, evaluation_id: str) -> tuple[str, Record | None, Live | None]:
        key = storage_key(owner, evaluation_id)
        live = self.live(key)  # first: the store is written before the live state goes
        return key, self.store.get(key), live

    def _forget(self, key: str) -> None:
        with self._lock:
            self._live.pop(key, None)
        self.store.delete(key)

    def _started(self, job: Job) -> None:
        with self._lock:
            self._live[job.key].status = "running"
        try:
            self.store.mark_running(job.key)
        except STORE_ERRORS as exc:  # the live state still says running
            log.error("could not record %s as running: %s", job.key[:12], exc)

    def _progressed(self, job: Job, stage: str, fraction: float) -> None:
        with self._lock:
            live = self._live[job.key]
            live.stage, live.progress = stage, fraction
        try:
            self.store.progress(job.key, stage, fraction)  # for other servers (shared store)
        except STORE_ERRORS as exc:
            log.debug("could not record the progress of %s: %s", job.key[:12], exc)

    def _finished(self, job: Job, outcome: Outcome) -> None:
        if outcome.error is not None:
            outcome.error.setdefault("request_id", job.label)
        outcome = self._store_outcome(job, outcome)
        with self._lock:
            live = self._live.pop(job.key)
        if not outcome.ok:
            kind = outcome.error["kind"]
            level = logging.INFO if kind in USER_ERRORS else logging.WARNING
            log.log(level, "evaluation failed (request %s): %s: %s", job.label, kind,
                    outcome.error["message"])
        live.done.set_result(outcome)

    def _store_outcome(self, job: Job, outcome: Outcome) -> Outcome:
        """Store ``outcome``; what is answered when it cannot be stored."""
        try:
            self._finish_durably(job.key, outcome)
            return outcome
        except (TypeError, ValueError) as exc:
            log.error("result of %s is not plain JSON: %s", job.key[:12], exc)
            outcome = failure("SolveFailed", f"the engine returned a result that is not "
                              f"plain JSON ({exc}); this is an engine fault")
        except StoreUnavailable as exc:
            log.error("result of %s could not be stored within %g s: %s", job.key[:12],
                      self.store_wait, exc)
            return failure("Interrupted", f"the evaluation finished but the results database "
                           f"stayed unreachable for {self.store_wait:g} s, so its result was "
                           "not kept; send it again")
        except STORE_ERRORS as exc:
            log.error("result of %s could not be stored: %s", job.key[:12], exc)
            return failure("StoreFailed", f"the result could not be stored ({exc})")
        try:
            self.store.finish(job.key, None, None, outcome.error)
        except STORE_ERRORS as exc:
            log.error("failure of %s could not be stored: %s", job.key[:12], exc)
        return outcome

    def _finish_durably(self, key: str, outcome: Outcome) -> None:
        """Store ``outcome``; while the database is unreachable, try again for ``store_wait``
        seconds (a restart of the database loses nothing that was evaluated)."""
        deadline = time.monotonic() + self.store_wait
        while True:
            try:
                self.store.finish(key, outcome.result, outcome.field, outcome.error)
                return
            except StoreUnavailable as exc:
                if time.monotonic() > deadline:
                    raise
                log.warning("result of %s waits for the database: %s", key[:12], exc)
                time.sleep(STORE_RETRY)
