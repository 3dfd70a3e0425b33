"""Stored batches: two tables beside the evaluations, and the methods that read and write them.

``BatchTables`` is mixed into ``coldseam.api.store.Store`` (it uses the store's ``_lock``,
``_conn`` and ``_write``); every statement is plain SQL with ``?`` placeholders, no JSON
functions, so another store (another database) can take the same statements.

A batch row is keyed like an evaluation, by ``storage_key(owner, batch id)``; its items are
keyed by (batch key, position). An item keeps the request text it evaluates, so unfinished
items can be sent again after a restart, and once finished, its headline figures (or its
error), so that reading a batch never needs the evaluation rows.
"""

from __future__ import annotations

import json
import numbers
import time
from dataclasses import dataclass
from typing import Any

BATCH_SCHEMA = """
CREATE TABLE IF NOT EXISTS batches (
    key TEXT PRIMARY KEY,
    id TEXT NOT NULL,
    owner TEXT NOT NULL,
    name TEXT,
    created_at REAL NOT NULL,
    updated_at REAL NOT NULL,
    cancelled INTEGER NOT NULL DEFAULT 0,
    spec TEXT NOT NULL
);
CREATE INDEX IF NOT EXISTS batches_by_owner ON batches (owner, created_at DESC);
CREATE TABLE IF NOT EXISTS batch_items (
    batch_key TEXT NOT NULL,
    position INTEGER NOT NULL,
    item_id TEXT NOT NULL,
    status TEXT NOT NULL,
    template TEXT,
    parameters TEXT,
    length REAL,
    request TEXT,
    evaluation_id TEXT,
    psi REAL,
    psi_l REAL,
    f_rsi REAL,
    min_temperature REAL,
    l2d REAL,
    verdict TEXT,
    error TEXT,
    updated_at REAL NOT NULL,
    PRIMARY KEY (batch_key, position)
);
CREATE INDEX IF NOT EXISTS batch_items_by_status ON batch_items (status, batch_key);
"""

#: Item states: waiting for the runner, handed to the pool, and the two ends.
ITEM_STATES = ("queued", "running", "done", "failed")
ITEM_COLUMNS = ("position, item_id, status, template, parameters, length, evaluation_id, psi, "
                "psi_l, f_rsi, min_temperature, l2d, verdict, error")


@dataclass(frozen=True)
class NewItem:
    """An item as a batch is created: ``request`` is None when it failed before that (its
    ``error`` says why)."""

    item_id: str
    template: str | None
    parameters: dict[str, Any] | None
    length: float | None
    request: str | None
    evaluation_id: str | None
    error: dict[str, Any] | None = None


@dataclass(frozen=True)
class BatchRecord:
    id: str
    owner: str
    name: str | None
    created_at: float
    updated_at: float
    cancelled: bool
    spec: dict[str, Any]


@dataclass(frozen=True)
class ItemRecord:
    position: int
    item_id: str
    status: str
    template: str | None
    parameters: dict[str, Any] | None
    length: float | None
    evaluation_id: str | None
    psi: float | None
    psi_l: float | None
    fRsi: float | None
    min_temperature: float | None
    L2D: float | None
    verdict: str | None
    error: dict[str, Any] | None


@dataclass(frozen=True)
class Figures:
    """The headline figures of a done item's evaluation."""

    psi: float | None
    fRsi: float | None
    min_temperature: float | None
    L2D: float | None
    verdict: str | None


class BatchTables:
    """Batch persistence; mixed into the Store (needs ``_lock``, ``_conn``, ``_write``)."""

    def create_batch(self, key: str, batch_id: str, owner: str, name: str | None,
                     spec: dict[str, Any], items: list[NewItem]) -> None:
        """Record a batch and all its items in one transaction."""
        now = time.time()
        rows = [(key, n, item.item_id, "failed" if item.error else "queued", item.template,
                 _dumps(item.parameters), item.length, item.request, item.evaluation_id,
                 _dumps(item.error), now) for n, item in enumerate(items)]
        with self._lock:
            self._conn.execute("BEGIN IMMEDIATE")
            try:
                self._conn.execute(
                    "INSERT INTO batches (key, id, owner, name, created_at, updated_at, "
                    "cancelled, spec) VALUES (?, ?, ?, ?, ?, ?, 0, ?)",
                    (key, batch_id, owner, name, now, now, json.dumps(spec)))
                self._conn.executemany(
                    "INSERT INTO batch_items (batch_key, position, item_id, status, template, "
                    "parameters, length, request, evaluation_id, error, updated_at) "
                    "VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)", rows)
            except Exception:
                self._conn.execute("ROLLBACK")
                raise
            self._conn.execute("COMMIT")

    def batch(self, key: str) -> BatchRecord | None:
        with self._lock:
            row = self._conn.execute(
                "SELECT id, owner, name, created_at, updated_at, cancelled, spec FROM batches "
                "WHERE key=?", (key,)).fetchone()
        if row is None:
            return None
        return BatchRecord(id=row[0], owner=row[1], name=row[2], created_at=row[3],
                           updated_at=row[4], cancelled=bool(row[5]), spec=json.loads(row[6]))

    def batch_page(self, owner: str, limit: int, offset: int) -> tuple[list[str], int]:
        """Keys of ``owner``'s batches from ``offset``, newest first, and their total."""
        with self._lock:
            total = self._conn.execute("SELECT COUNT(*) FROM batches WHERE owner=?",
                                       (owner,)).fetchone()[0]
            rows = self._conn.execute(
                "SELECT key FROM batches WHERE owner=? ORDER BY created_at DESC, key "
                "LIMIT ? OFFSET ?", (owner, limit, offset)).fetchall()
        return [row[0] for row in rows], total

    def batch_items(self, key: str, limit: int = -1, offset: int = 0) -> list[ItemRecord]:
        """Items of a batch in their order, ``limit`` of them (-1: all) from ``offset``."""
        with self._lock:
            rows = self._conn.execute(
                f"SELECT {ITEM_COLUMNS} FROM batch_items WHERE batch_key=? ORDER BY position "
                "LIMIT ? OFFSET ?", (key, limit, offset)).fetchall()
        return [_item(row) for row in rows]

    def batch_counts(self, key: str) -> dict[str, int]:
        """How many items of a batch are in each state (every state present, maybe 0)."""
        with self._lock:
            rows = self._conn.execute(
                "SELECT status, COUNT(*) FROM batch_items WHERE batch_key=? GROUP BY status",
                (key,)).fetchall()
        counts = dict.fromkeys(ITEM_STATES, 0)
        counts.update(dict(rows))
        return counts

    def batch_psi_l(self, key: str) -> tuple[list[float], int]:
        """ψ·l of the done items with a length, in item order, and how many items have a
        length (done or not)."""
        with self._lock:
            values = [row[0] for row in self._conn.execute(
                "SELECT psi_l FROM batch_items WHERE batch_key=? AND status='done' AND "
                "psi_l IS NOT NULL ORDER BY position", (key,)).fetchall()]
            with_length = self._conn.execute(
                "SELECT COUNT(*) FROM batch_items WHERE batch_key=? AND length IS NOT NULL",
                (key,)).fetchone()[0]
        return values, with_length

    def item_request(self, key: str, position: int) -> tuple[str, str] | None:
        """(owner, request text) of a queued item, None when it is no longer queued."""
        with self._lock:
            row = self._conn.execute(
                "SELECT b.owner, i.request FROM batch_items i JOIN batches b ON "
                "b.key = i.batch_key WHERE i.batch_key=? AND i.position=? AND "
                "i.status='queued'", (key, position)).fetchone()
        return (row[0], row[1]) if row else None

    def mark_item_running(self, key: str, position: int) -> None:
        # Not durable: a restart puts running items back in line anyway.
        self._write("UPDATE batch_items SET status='running', updated_at=? WHERE batch_key=? "
                    "AND position=? AND status='queued'", (time.time(), key, position),
                    durable=False)

    def item_evaluation_id(self, key: str, position: int) -> str | None:
        with self._lock:
            row = self._conn.execute("SELECT evaluation_id FROM batch_items WHERE "
                                     "batch_key=? AND position=?", (key, position)).fetchone()
        return row[0] if row else None

    def set_item_evaluation(self, key: str, position: int, evaluation_id: str) -> None:
        """Record the evaluation an item now runs as (its id changes when a server limit
        that shapes the request, such as the mesh-node cap, changed since the batch was made)."""
        self._write("UPDATE batch_items SET evaluation_id=?, updated_at=? WHERE batch_key=? "
                    "AND position=?", (evaluation_id, time.time(), key, position))

    def requeue_item(self, key: str, position: int) -> None:
        """Put an item handed to the pool back in line (the pool refused it)."""
        self._write("UPDATE batch_items SET status='queued', updated_at=? WHERE batch_key=? "
                    "AND position=?", (time.time(), key, position))

    def finish_item(self, key: str, position: int, figures: Figures | None,
                    error: dict[str, Any] | None) -> None:
        """Store how an item ended: its figures when done, its error when it failed.

        A done item's row skips the fsync: its evaluation's result was stored durably just
        before, so an item a power cut takes back to queued or running is found done at once
        when the restarted server resumes it."""
        if error is not None or figures is None:
            self._write("UPDATE batch_items SET status='failed', error=?, updated_at=? "
                        "WHERE batch_key=? AND position=?",
                        (_dumps(error), time.time(), key, position))
            return
        with self._lock:
            row = self._conn.execute("SELECT length FROM batch_items WHERE batch_key=? AND "
                                     "position=?", (key, position)).fetchone()
        length = row[0] if row else None
        psi_l = figures.psi * length if figures.psi is not None and length is not None \
            else None
        self._write(
            "UPDATE batch_items SET status='done', psi=?, psi_l=?, f_rsi=?, "
            "min_temperature=?, l2d=?, verdict=?, error=NULL, updated_at=? WHERE batch_key=? AND position=?",
            (figures.psi, psi_l, figures.fRsi, figures.min_temperature, figures.L2D,
             figures.verdict, time.time(), key, position), durable=False)

    def cancel_batch(self, key: str, error: dict[str, Any]) -> int:
        """Mark a batch cancelled and its queued items failed with ``error``; how many."""
        now = time.time()
        with self._lock:
            self._conn.execute("BEGIN IMMEDIATE")
            try:
                self._conn.execute("UPDATE batches SET cancelled=1, updated_at=? WHERE key=?",
                                   (now, key))
                cursor = self._conn.execute(
                    "UPDATE batch_items SET status='failed', error=?, updated_at=? "
                    "WHERE batch_key=? AND status='queued'", (_dumps(error), now, key))
            except Exception:
                self._conn.execute("ROLLBACK")
                raise
            self._conn.execute("COMMIT")
        return cursor.rowcount

    def unfinished_items(self) -> list[tuple[str, int]]:
        """(batch key, position) of every item not finished, oldest batch first; items left
        running by an earlier server are put back in line."""
        with self._lock:
            self._conn.execute("UPDATE batch_items SET status='queued', updated_at=? "
                               "WHERE status='running'", (time.time(),))
            rows = self._conn.execute(
                "SELECT i.batch_key, i.position FROM batch_items i JOIN batches b ON "
                "b.key = i.batch_key WHERE i.status='queued' ORDER BY b.created_at, "
                "i.batch_key, i.position").fetchall()
        return [(row[0], row[1]) for row in rows]


def figures_of(result: dict[str, Any]) -> Figures:
    """The figures a batch keeps from an evaluation result (model-v1)."""
    psi = result.get("psi") or {}
    condensation = result.get("condensation") or {}
    return Figures(psi=_number(psi.get("value")), fRsi=_number(condensation.get("fRsi")),
                   min_temperature=_number(condensation.get("min_temperature")),
                   L2D=_number(result.get("L2D")), verdict=condensation.get("verdict"))


def _number(value: Any) -> float | None:
    # numbers.Real: a result handed over in process may hold numpy scalars (stored as numbers)
    return float(value) if isinstance(value, numbers.Real) else None


def _item(row: tuple) -> ItemRecord:
    return ItemRecord(position=row[0], item_id=row[1], status=row[2], template=row[3],
                      parameters=_loads(row[4]), length=row[5], evaluation_id=row[6],
                      psi=row[7], psi_l=row[8], fRsi=row[9], min_temperature=row[10],
                      L2D=row[11], verdict=row[12], error=_loads(row[13]))


def _dumps(value: Any) -> str | None:
    return None if value is None else json.dumps(value, separators=(",", ":"))


def _loads(text: str | None) -> Any:
    return None if text is None else json.loads(text)
