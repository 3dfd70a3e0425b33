"""Evaluations as the API sees them: the store, the worker pool and the live progress of the
evaluations in flight, tied together (no FastAPI here)."""

from __future__ import annotations

import dataclasses
import logging
import sqlite3
import threading
import time
from collections.abc import Callable
from concurrent.futures import Future
from dataclasses import dataclass, field
from typing import Any

from coldseam.api.pool import QueueFull, WorkerPool
from coldseam.api.slot import Job, Outcome, failure
from coldseam.api.store import Record, storage_key
from coldseam.api.stores import EvaluationStore
from coldseam.errors import StoreFailure, StoreUnavailable
from coldseam.schema.evaluation import EvaluationRequest, request_digest

log = logging.getLogger(__name__)

#: Failures caused by the request itself (logged quietly).
USER_ERRORS = {"InvalidSection", "MeshingFailed", "LimitExceeded"}
#: What a store raises when it cannot record something.
STORE_ERRORS = (sqlite3.Error, StoreFailure)
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
        #: Outcomes that could not be stored (disk full, read-only): answered from here, so
        #: that a client polling the evaluation sees it failed instead of running for ever.
        self._unstored: dict[str, dict[str, Any]] = {}
        self._lock = threading.Lock()

    def submit(self, owner: str, request: EvaluationRequest, request_text: str,
               request_id: str = "", evaluation_id: str | None = None,
               on_ran: Callable[[], None] | None = None) -> Submitted:
        """Start evaluating ``request`` unless its result is stored or it is in flight.
        ``evaluation_id`` is ``request_digest(request)`` where the caller has it already;
        ``on_ran()`` is called when a local worker is done with it, before its outcome is
        stored (not at all for a stored result, one in flight already, or on a cluster).

        Raises QueueFull when no worker is free and the queue is full.
        """
        evaluation_id = evaluation_id or request_digest(request)
        key = storage_key(owner, evaluation_id)
        with self._lock:
            if key in self._live:
                return Submitted(evaluation_id, key, self._live[key].done)
            record = self.store.get(key)
            if record is not None and record.status == "done":
                return Submitted(evaluation_id, key, None)
            self.store.queue(key, evaluation_id, owner, request.section.name, request_text)
            self._unstored.pop(key, None)
            live = self._live[key] = Live()
        self.flush_unstored()  # the store took a write: it may take the failures it could not
        job = Job(key=key, request=request.model_dump(mode="json"), label=request_id,
                  on_start=self._started, on_progress=self._progressed,
                  on_finish=self._finished,
                  on_ran=None if on_ran is None else (lambda job: on_ran()))
        try:
            self.pool.submit(job)
        except QueueFull:
            self._forget(key)
            raise
        log.info("evaluation %s queued (request %s)", evaluation_id, request_id)
        return Submitted(evaluation_id, key, live.done)

    def flush_unstored(self) -> None:
        """Store the failures that could not be stored when they happened, where it now can."""
        with self._lock:
            pending = list(self._unstored.items())
        for key, error in pending:
            stored = {k: v for k, v in error.items() if k != "unstored"}
            try:
                self.store.finish(key, None, None, stored)
            except (StoreFailure, sqlite3.Error):
                return
            with self._lock:
                if self._unstored.get(key) is error:
                    del self._unstored[key]

    def live(self, key: str) -> Live | None:
        with self._lock:
            return self._live.get(key)

    def record(self, owner: str, evaluation_id: str) -> tuple[str, Record | None, Live | None]:
        key = storage_key(owner, evaluation_id)
        live = self.live(key)  # first: the store is written before the live state goes
        record = self.store.get(key)
        error = self._unstored.get(key)
        if live is None and record is not None and error is not None \
                and record.status in ("queued", "running"):
            record = dataclasses.replace(record, status="failed", error=error)
        return key, record, live

    def _forget(self, key: str) -> None:
        with self._lock:
            self._live.pop(key, None)
        try:
            self.store.delete(key)
        except (StoreFailure, sqlite3.Error) as exc:  # left queued: marked failed at restart
            log.error("could not remove %s from the store: %s", key[:12], exc)

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
            if outcome.error is not None and outcome.error.get("unstored"):
                self._unstored[job.key] = outcome.error
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
        except StoreFailure as exc:
            log.error("result of %s could not be stored: %s", job.key[:12], exc.message)
            return _unstored(type(exc).__name__, exc.message, job.label)
        except sqlite3.Error as exc:
            log.error("result of %s could not be stored: %s", job.key[:12], exc)
            return _unstored("StoreFailed", f"the result could not be stored ({exc})", job.label)
        try:
            self.store.finish(job.key, None, None, outcome.error)
        except STORE_ERRORS as exc:
            log.error("failure of %s could not be stored: %s", job.key[:12], exc)
            outcome.error["unstored"] = "1"
        return outcome

    def _finish_durably(self, key: str, outcome: Outcome) -> None:
        """Store ``outcome``. A server store (PostgreSQL, ``waits_when_unavailable``) that
        cannot be reached is tried again for ``store_wait`` seconds: a restart of the database
        loses nothing that was evaluated. (SQLite's read-only or failing disk is answered at
        once.)"""
        deadline = time.monotonic() + self.store_wait
        while True:
            try:
                self.store.finish(key, outcome.result, outcome.field, outcome.error)
                return
            except StoreUnavailable as exc:
                if not getattr(self.store, "waits_when_unavailable", False) or \
                        time.monotonic() > deadline:
                    raise
                log.warning("result of %s waits for the database: %s", key[:12], exc.message)
                time.sleep(STORE_RETRY)


def _unstored(kind: str, message: str, request_id: str) -> Outcome:
    """The failure answered for an outcome the store could not take."""
    outcome = failure(kind, message)
    outcome.error.update(request_id=request_id, unstored="1")
    return outcome
