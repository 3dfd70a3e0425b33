"""The batch runner: one thread that feeds batch items to the worker pool as places free up.

A batch never floods the pool's bounded queue: at most ``in_flight`` of its items (all
batches together) are handed to the pool at a time — the number of workers and one waiting —
so a single evaluation sent meanwhile waits behind one batch item at most. Batches take turns,
one item each. Items are ordinary evaluations (``Evaluations.submit``): same ids, same rows,
same cache; an item whose result is stored is done at once. When the pool refuses an item
(queue full of single evaluations), it goes back to the head of its line and the runner waits
for a place.
"""

from __future__ import annotations

import logging
import secrets
import threading
from collections import OrderedDict, deque
from concurrent.futures import Future
from typing import Any

from coldseam.api.batch_prepare import checked, prepare
from coldseam.api.batch_store import figures_of
from coldseam.api.jobs import Evaluations
from coldseam.api.pool import QueueFull
from coldseam.api.store import storage_key
from coldseam.batches.spec import BatchSpec
from coldseam.errors import ColdseamError
from coldseam.settings import Settings

log = logging.getLogger(__name__)

RETRY_SECONDS = 0.5  # wait after the pool refused an item, unless an item finishes first
CANCELLED = {"kind": "Cancelled", "message": "the batch was cancelled before this item ran",
             "field": ""}


class BatchRunner:
    """Create, feed, resume and cancel batches (one thread; no FastAPI here)."""

    def __init__(self, evaluations: Evaluations, settings: Settings,
                 in_flight: int | None = None) -> None:
        self.evaluations, self.store, self.settings = evaluations, evaluations.store, settings
        self.in_flight_limit = in_flight or settings.workers + 1
        self._lines: OrderedDict[str, deque[int]] = OrderedDict()
        self._in_flight = 0
        self._cond = threading.Condition()
        self._stopping = False
        self._thread = threading.Thread(target=self._loop, name="coldseam-batches",
                                        daemon=True)

    def start(self) -> int:
        """Start the thread, after putting every unfinished item of earlier runs back in
        line; how many were."""
        unfinished = self.store.unfinished_items()
        with self._cond:
            for key, position in unfinished:
                self._lines.setdefault(key, deque()).append(position)
        self._thread.start()
        return len(unfinished)

    def stop(self) -> None:
        with self._cond:
            self._stopping = True
            self._cond.notify_all()
        self._thread.join(5)

    def create(self, owner: str, spec: BatchSpec) -> str:
        """Store a new batch of ``owner`` and line its items up; its id."""
        batch_id = secrets.token_hex(16)
        key = storage_key(owner, batch_id)
        rows = [prepare(item, self.settings) for item in spec.items]
        self.store.create_batch(key, batch_id, owner, spec.name, spec.summary(), rows)
        waiting = [n for n, row in enumerate(rows) if row.error is None]
        with self._cond:
            if waiting:
                self._lines[key] = deque(waiting)
            self._cond.notify_all()
        log.info("batch %s of %d items (%d waiting)", batch_id, len(rows), len(waiting))
        return batch_id

    def cancel(self, key: str) -> int:
        """Fail the items of a batch not yet handed to the pool; how many."""
        with self._cond:
            self._lines.pop(key, None)
        return self.store.cancel_batch(key, CANCELLED)

    def waiting(self) -> int:
        with self._cond:
            return sum(len(line) for line in self._lines.values())

    def _loop(self) -> None:
        while True:
            with self._cond:
                while not self._stopping and (not self._lines or
                                              self._in_flight >= self.in_flight_limit):
                    self._cond.wait()
                if self._stopping:
                    return
                key, position = self._next()
                self._in_flight += 1
            try:
                refused = self._submit(key, position)
            except Exception:  # noqa: BLE001 - one item's fault must not end the runner
                log.exception("batch item %s/%d could not be submitted", key[:12], position)
                self._item_failed(key, position, {"kind": "SolveFailed", "message":
                                                  "the item could not be submitted (logged)",
                                                  "field": ""})
                refused = False
            if refused:
                self._back_in_line(key, position)

    def _next(self) -> tuple[str, int]:
        """The next item, batches taking turns (called with the lock held)."""
        key, line = next(iter(self._lines.items()))
        position = line.popleft()
        del self._lines[key]
        if line:
            self._lines[key] = line  # to the end: the next batch's turn
        return key, position

    def _back_in_line(self, key: str, position: int) -> None:
        self.store.requeue_item(key, position)
        with self._cond:
            self._in_flight -= 1
            self._lines[key] = deque([position, *self._lines.pop(key, deque())])
            self._lines.move_to_end(key, last=False)
            self._cond.wait(RETRY_SECONDS)

    def _submit(self, key: str, position: int) -> bool:
        """Hand one item to the pool; True when the pool refused it."""
        found = self.store.item_request(key, position)
        if found is None:  # cancelled meanwhile
            self._release()
            return False
        owner, text = found
        try:
            parsed = checked(text, self.settings)
        except ColdseamError as exc:  # a limit lowered since the batch was made
            self._item_failed(key, position, {"kind": type(exc).__name__,
                                              "message": exc.message, "field": exc.field})
            return False
        self.store.mark_item_running(key, position)
        try:
            submitted = self.evaluations.submit(owner, parsed, text, f"batch-{key[:8]}")
        except QueueFull:
            return True
        if submitted.id != self.store.item_evaluation_id(key, position):
            self.store.set_item_evaluation(key, position, submitted.id)
        if submitted.done is None:
            self._finish(key, position, submitted.key, None)
        else:
            submitted.done.add_done_callback(
                lambda done: self._finish(key, position, submitted.key, done))
        return False

    def _finish(self, key: str, position: int, evaluation_key: str,
                done: Future | None) -> None:
        """Record how an item ended (on a pool thread, or here for a stored result)."""
        try:
            outcome = done.result() if done is not None else None
            if outcome is not None and not outcome.ok and \
                    outcome.error["kind"] == "Interrupted":
                self.store.requeue_item(key, position)  # the server is stopping: resumed
            elif outcome is not None and not outcome.ok:
                self.store.finish_item(key, position, None, outcome.error)
            else:
                record = self.store.get(evaluation_key)
                self.store.finish_item(key, position, figures_of(record.result or {}), None)
        except Exception:  # noqa: BLE001 - the item stays unfinished, reported after restart
            log.exception("batch item %s/%d could not be recorded", key[:12], position)
        finally:
            self._release()

    def _item_failed(self, key: str, position: int, error: dict[str, Any]) -> None:
        try:
            self.store.finish_item(key, position, None, error)
        finally:
            self._release()

    def _release(self) -> None:
        with self._cond:
            self._in_flight -= 1
            self._cond.notify_all()
