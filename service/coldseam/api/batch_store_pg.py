"""The batch tables in PostgreSQL: ``PgBatchTables`` is mixed into ``PostgresStore`` and runs
the SQLite store's statements (``batch_store.BatchTables``) with named parameters, each method
one transaction.

One difference: a batch belongs to the server instance that created it, and a starting
server resumes only its own unfinished batches (another server's are in flight there).
"""

from __future__ import annotations

import json
import time
from typing import Any

from sqlalchemy import Connection, text

from coldseam.api.batch_store import (
    ITEM_COLUMNS,
    ITEM_STATES,
    BatchRecord,
    Figures,
    ItemRecord,
    NewItem,
    _dumps,
    _item,
)


def _run(conn: Connection, sql: str, params: tuple = ()) -> Any:
    """Execute ``sql`` written with ``?`` placeholders (as the SQLite store's)."""
    parts = sql.split("?")
    named = parts[0] + "".join(f":p{i}{part}" for i, part in enumerate(parts[1:]))
    return conn.execute(text(named), {f"p{i}": value for i, value in enumerate(params)})


class PgBatchTables:
    """Batch persistence; mixed into PostgresStore (needs ``_tx`` and ``instance``)."""

    instance: str

    def create_batch(self, key: str, batch_id: str, owner: str, name: str | None,
                     spec: dict[str, Any], items: list[NewItem]) -> None:
        """Record a batch and all its items in one transaction."""
        now = time.time()
        rows = [{"key": key, "n": n, "item_id": item.item_id,
                 "status": "failed" if item.error else "queued", "template": item.template,
                 "parameters": _dumps(item.parameters), "length": item.length,
                 "request": item.request, "evaluation_id": item.evaluation_id,
                 "error": _dumps(item.error), "now": now} for n, item in enumerate(items)]
        with self._tx() as conn:
            _run(conn, "INSERT INTO batches (key, id, owner, name, created_at, updated_at, "
                 "cancelled, spec, server) VALUES (?, ?, ?, ?, ?, ?, 0, ?, ?)",
                 (key, batch_id, owner, name, now, now, json.dumps(spec), self.instance))
            if rows:
                conn.execute(text(
                    "INSERT INTO batch_items (batch_key, position, item_id, status, template, "
                    "parameters, length, request, evaluation_id, error, updated_at) VALUES "
                    "(:key, :n, :item_id, :status, :template, :parameters, :length, :request, "
                    ":evaluation_id, :error, :now)"), rows)

    def batch(self, key: str) -> BatchRecord | None:
        with self._tx() as conn:
            row = _run(conn, "SELECT id, owner, name, created_at, updated_at, cancelled, spec "
                       "FROM batches WHERE key=?", (key,)).first()
        if row is None:
            return None
        return BatchRecord(id=row[0], owner=row[1], name=row[2], created_at=row[3],
                           updated_at=row[4], cancelled=bool(row[5]), spec=json.loads(row[6]))

    def batch_page(self, owner: str, limit: int, offset: int) -> tuple[list[str], int]:
        """Keys of ``owner``'s batches from ``offset``, newest first, and their total."""
        with self._tx() as conn:
            total = _run(conn, "SELECT COUNT(*) FROM batches WHERE owner=?",
                         (owner,)).scalar_one()
            rows = _run(conn, "SELECT key FROM batches WHERE owner=? ORDER BY created_at DESC, "
                        "key LIMIT ? OFFSET ?", (owner, limit, offset)).all()
        return [row[0] for row in rows], total

    def batch_items(self, key: str, limit: int = -1, offset: int = 0) -> list[ItemRecord]:
        """Items of a batch in their order, ``limit`` of them (-1: all) from ``offset``."""
        with self._tx() as conn:
            rows = _run(conn, f"SELECT {ITEM_COLUMNS} FROM batch_items WHERE batch_key=? "
                        "ORDER BY position LIMIT ? OFFSET ?",
                        (key, None if limit < 0 else limit, offset)).all()
        return [_item(tuple(row)) for row in rows]

    def batch_counts(self, key: str) -> dict[str, int]:
        """How many items of a batch are in each state (every state present, maybe 0)."""
        with self._tx() as conn:
            rows = _run(conn, "SELECT status, COUNT(*) FROM batch_items WHERE batch_key=? "
                        "GROUP BY status", (key,)).all()
        counts = dict.fromkeys(ITEM_STATES, 0)
        counts.update({row[0]: row[1] for row in rows})
        return counts

    def batch_psi_l(self, key: str) -> tuple[list[float], int]:
        """ψ·l of the done items with a length, in item order, and how many items have a
        length (done or not)."""
        with self._tx() as conn:
            values = [row[0] for row in _run(
                conn, "SELECT psi_l FROM batch_items WHERE batch_key=? AND status='done' AND "
                "psi_l IS NOT NULL ORDER BY position", (key,)).all()]
            with_length = _run(conn, "SELECT COUNT(*) FROM batch_items WHERE batch_key=? AND "
                               "length IS NOT NULL", (key,)).scalar_one()
        return values, with_length

    def item_request(self, key: str, position: int) -> tuple[str, str] | None:
        """(owner, request text) of a queued item, None when it is no longer queued."""
        with self._tx() as conn:
            row = _run(conn, "SELECT b.owner, i.request FROM batch_items i JOIN batches b ON "
                       "b.key = i.batch_key WHERE i.batch_key=? AND i.position=? AND "
                       "i.status='queued'", (key, position)).first()
        return (row[0], row[1]) if row else None

    def _item_write(self, sql: str, params: tuple) -> int:
        with self._tx() as conn:
            return _run(conn, sql, params).rowcount

    def mark_item_running(self, key: str, position: int) -> None:
        self._item_write("UPDATE batch_items SET status='running', updated_at=? WHERE "
                         "batch_key=? AND position=? AND status='queued'",
                         (time.time(), key, position))

    def item_evaluation_id(self, key: str, position: int) -> str | None:
        with self._tx() as conn:
            row = _run(conn, "SELECT evaluation_id FROM batch_items WHERE batch_key=? AND "
                       "position=?", (key, position)).first()
        return row[0] if row else None

    def set_item_evaluation(self, key: str, position: int, evaluation_id: str) -> None:
        """Record the evaluation an item now runs as (its id changes when a server limit
        that shapes the request, such as the mesh-node cap, changed since the batch was made)."""
        self._item_write("UPDATE batch_items SET evaluation_id=?, updated_at=? WHERE "
                         "batch_key=? AND position=?", (evaluation_id, time.time(), key,
                                                        position))

    def requeue_item(self, key: str, position: int) -> None:
        """Put an item handed to the pool back in line (the pool refused it)."""
        self._item_write("UPDATE batch_items SET status='queued', updated_at=? WHERE "
                         "batch_key=? AND position=?", (time.time(), key, position))

    def finish_item(self, key: str, position: int, figures: Figures | None,
                    error: dict[str, Any] | None) -> None:
        """Store how an item ended: its figures when done, its error when it failed."""
        if error is not None or figures is None:
            self._item_write("UPDATE batch_items SET status='failed', error=?, updated_at=? "
                             "WHERE batch_key=? AND position=?",
                             (_dumps(error), time.time(), key, position))
            return
        with self._tx() as conn:
            row = _run(conn, "SELECT length FROM batch_items WHERE batch_key=? AND "
                       "position=?", (key, position)).first()
            length = row[0] if row else None
            psi_l = figures.psi * length if figures.psi is not None and length is not None \
                else None
            _run(conn, "UPDATE batch_items SET status='done', psi=?, psi_l=?, f_rsi=?, "
                 "min_temperature=?, l2d=?, verdict=?, error=NULL, updated_at=? "
                 "WHERE batch_key=? AND position=?",
                 (figures.psi, psi_l, figures.fRsi, figures.min_temperature, figures.L2D,
                  figures.verdict, time.time(), key, position))

    def cancel_batch(self, key: str, error: dict[str, Any]) -> int:
        """Mark a batch cancelled and its queued items failed with ``error``; how many."""
        now = time.time()
        with self._tx() as conn:
            _run(conn, "UPDATE batches SET cancelled=1, updated_at=? WHERE key=?", (now, key))
            return _run(conn, "UPDATE batch_items SET status='failed', error=?, updated_at=? "
                        "WHERE batch_key=? AND status='queued'",
                        (_dumps(error), now, key)).rowcount

    def unfinished_items(self) -> list[tuple[str, int]]:
        """(batch key, position) of every item not finished of this server's batches, oldest
        batch first; items it left running are put back in line."""
        with self._tx() as conn:
            _run(conn, "UPDATE batch_items SET status='queued', updated_at=? WHERE "
                 "status='running' AND batch_key IN (SELECT key FROM batches WHERE server=?)",
                 (time.time(), self.instance))
            rows = _run(conn, "SELECT i.batch_key, i.position FROM batch_items i JOIN batches "
                        "b ON b.key = i.batch_key WHERE i.status='queued' AND b.server=? "
                        "ORDER BY b.created_at, i.batch_key, i.position",
                        (self.instance,)).all()
        return [(row[0], row[1]) for row in rows]
