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
import time
from collections import OrderedDict, deque
from collections.abc import Callable
from concurrent.futures import Future
from typing import Any

from coldseam.api.batch_prepare import checked, prepare
from coldseam.api.batch_store import figures_of
from coldseam.api.jobs import Evaluations
from coldseam.api.pool import QueueFull
from coldseam.api.store import StoreUnavailable, storage_key
from coldseam.batches.spec import BatchSpec
from coldseam.errors import ColdseamError
from coldseam.schema.evaluation import EvaluationRequest
from coldseam.settings import Settings

log = logging.getLogger(__name__)

#: Parsed requests kept from a batch's creation for its items' hand-off (beyond this many
#: waiting, an item's stored text is parsed again when its turn comes, as after a restart).
KEPT_REQUESTS = 20_000
RETRY_SECONDS = 0.5  # wait after the pool refused an item, unless an item finishes first
STORE_RETRY = 1.0  # s between two attempts while a server store (PostgreSQL) is unreachable
CANCELLED = {"kind": "Cancelled", "message": "the batch was cancelled before this item ran",
             "field": ""}


class BatchRunner:
    """Create, feed, resume and cancel batches (one thread; no FastAPI here)."""

    def __init__(self, evaluations: Evaluations, settings: Settings,
                 in_flight: int | None = None) -> None:
        self.evaluations, self.store, self.settings = evaluations, evaluations.store, settings
        self._fixed_in_flight = in_flight
        self._lines: OrderedDict[str, deque[int]] = OrderedDict()
        self._in_flight = 0
        #: (batch key, position) -> the item's parsed request and evaluation id, from create.
        self._prepared: dict[tuple[str, int], tuple[EvaluationRequest, str | None]] = {}
        self._cond = threading.Condition()
        self._stopping = False
        self._thread = threading.Thread(target=self._loop, name="coldseam-batches",
                                        daemon=True)

    @property
    def in_flight_limit(self) -> int:
        """Items handed to the pool at a time: its workers (local processes, or the cluster's
        threads, which may change) and one waiting."""
        if self._fixed_in_flight:
            return self._fixed_in_flight
        capacity = getattr(self.evaluations.pool, "capacity", None)
        return (capacity() if capacity is not None else self.settings.workers) + 1

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
        prepared = [prepare(item, self.settings) for item in spec.items]
        rows = [row for row, _ in prepared]
        self.store.create_batch(key, batch_id, owner, spec.name, spec.summary(), rows)
        waiting = [n for n, row in enumerate(rows) if row.error is None]
        with self._cond:
            if waiting:
                self._lines[key] = deque(waiting)
            for n in waiting[:max(0, KEPT_REQUESTS - len(self._prepared))]:
                self._prepared[key, n] = (prepared[n][1], rows[n].evaluation_id)
            self._cond.notify_all()
        log.info("batch %s of %d items (%d waiting)", batch_id, len(rows), len(waiting))
        return batch_id

    def cancel(self, key: str) -> int:
        """Fail the items of a batch not yet handed to the pool; how many."""
        with self._cond:
            for position in self._lines.pop(key, ()):
                self._prepared.pop((key, position), None)
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
            except StoreUnavailable as exc:  # not handed to the pool: back in line, later
                log.warning("batch item %s/%d waits for the database: %s", key[:12], position,
                            exc)
                try:
                    self._until_available(self._back_in_line, key, position)
                except StoreUnavailable:
                    log.error("batch item %s/%d left for a restart: the database stayed "
                              "away", key[:12], position)
                    self._release()
                continue
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
        with self._cond:
            kept = self._prepared.pop((key, position), None)
        if found is None:  # cancelled meanwhile
            self._release()
            return False
        owner, text = found
        if kept is not None:  # parsed and checked at creation, in this process
            parsed, evaluation_id = kept
        else:
            try:
                parsed, evaluation_id = checked(text, self.settings), None
            except ColdseamError as exc:  # a limit lowered since the batch was made
                self._item_failed(key, position, {"kind": type(exc).__name__,
                                                  "message": exc.message, "field": exc.field})
                return False
        self.store.mark_item_running(key, position)
        release = self._release_once()
        try:
            submitted = self.evaluations.submit(owner, parsed, text, f"batch-{key[:8]}",
                                                evaluation_id, release)
        except QueueFull:
            with self._cond:
                self._prepared[key, position] = (parsed, evaluation_id)
            return True
        if submitted.id != self.store.item_evaluation_id(key, position):
            self.store.set_item_evaluation(key, position, submitted.id)
        if submitted.done is None:
            self._finish(key, position, submitted.key, None, release)
        else:
            submitted.done.add_done_callback(
                lambda done: self._finish(key, position, submitted.key, done, release))
        return False

    def _release_once(self) -> Callable[[], None]:
        """A release of one in-flight place that acts once: as the worker is done with the
        item (so the next one is handed over while this outcome is stored), or when the
        outcome is recorded, whichever comes first."""
        once = threading.Lock()  # taken by the first call, never given back

        def release() -> None:
            if once.acquire(blocking=False):
                self._release()

        return release

    def _finish(self, key: str, position: int, evaluation_key: str,
                done: Future | None, release: Callable[[], None]) -> None:
        """Record how an item ended (on a pool thread, or here for a stored result)."""
        try:
            outcome = done.result() if done is not None else None
            self._until_available(self._record_outcome, key, position, evaluation_key, outcome)
        except Exception:  # noqa: BLE001 - the item stays unfinished, reported after restart
            log.exception("batch item %s/%d could not be recorded", key[:12], position)
        finally:
            release()

    def _record_outcome(self, key: str, position: int, evaluation_key: str,
                        outcome: Any) -> None:
        if outcome is not None and not outcome.ok and outcome.error["kind"] == "Interrupted":
            self.store.requeue_item(key, position)  # the server is stopping: resumed
        elif outcome is not None and not outcome.ok:
            self.store.finish_item(key, position, None, outcome.error)
        else:  # the result just stored, or one stored earlier (read back)
            result = outcome.result if outcome is not None else None
            if result is None:
                record = self.store.get(evaluation_key)
                result = record.result if record is not None else None
            self.store.finish_item(key, position, figures_of(result or {}), None)

    def _until_available(self, action: Any, *args: Any) -> None:
        """``action(*args)``, tried again while the store is unreachable (a server store
        restarting), for up to ``settings.database_wait`` s or until the runner stops; then
        the item is left for a restart to resume."""
        deadline = time.monotonic() + self.settings.database_wait
        while True:
            try:
                action(*args)
                return
            except StoreUnavailable:
                if self._stopping or time.monotonic() > deadline:
                    raise
                time.sleep(STORE_RETRY)

    def _item_failed(self, key: str, position: int, error: dict[str, Any]) -> None:
        try:
            self.store.finish_item(key, position, None, error)
        finally:
            self._release()

    def _release(self) -> None:
        with self._cond:
            self._in_flight -= 1
            self._cond.notify_all()
