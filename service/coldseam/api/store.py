"""Stored evaluations: SQLite in WAL mode, one transaction per change, safe across threads.

Each row is keyed by ``storage_key(owner, id)``, so the same request sent with two API keys
gives two private rows, and an id alone does not reach another key's row. The request is kept
exactly as the user sent it (``request`` text), beside the result and the temperature field
(binary arrays, made into JSON when asked for: coldseam.api.fieldpack).
"""

from __future__ import annotations

import hashlib
import json
import os
import sqlite3
import tempfile
import threading
import time
from collections.abc import Iterator
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from coldseam.api import fieldpack
from coldseam.api.batch_store import BATCH_SCHEMA, BatchTables
from coldseam.errors import StoreFull, StoreUnavailable

SCHEMA = """
CREATE TABLE IF NOT EXISTS evaluations (
    key TEXT PRIMARY KEY,
    id TEXT NOT NULL,
    owner TEXT NOT NULL,
    status TEXT NOT NULL,
    name TEXT,
    created_at REAL NOT NULL,
    updated_at REAL NOT NULL,
    request TEXT NOT NULL,
    summary TEXT,
    result TEXT,
    field BLOB,
    error TEXT
);
CREATE INDEX IF NOT EXISTS evaluations_by_owner ON evaluations (owner, created_at DESC);
"""

UNFINISHED = ("queued", "running")


def storage_key(owner: str, evaluation_id: str) -> str:
    """The row key of ``evaluation_id`` for ``owner`` (a secret-derived tag, or "")."""
    return hashlib.sha256(f"{owner}\n{evaluation_id}".encode()).hexdigest()


@dataclass(frozen=True)
class Record:
    id: str
    status: str
    name: str | None
    created_at: float
    updated_at: float
    request_text: str
    summary: dict[str, Any] | None
    result: dict[str, Any] | None
    error: dict[str, Any] | None
    stage: str | None = None  # kept by a shared (server) store only; live state otherwise
    progress: float = 0.0


def check_writable(folder: Path) -> None:
    """StoreUnavailable when ``folder`` cannot be made or written (read-only, no access)."""
    try:
        folder.mkdir(parents=True, exist_ok=True)
        handle, name = tempfile.mkstemp(prefix=".write-check-", dir=folder)
        os.close(handle)
        os.unlink(name)
    except OSError as exc:
        raise StoreUnavailable(f"the data folder {folder} cannot be written "
                               f"({exc.strerror or exc}): results could not be stored") from None


@contextmanager
def store_faults() -> Iterator[None]:
    """SQLite's disk faults as typed errors: full -> StoreFull; read-only, I/O error, cannot
    open -> StoreUnavailable. Other sqlite3 errors (bugs of ours) pass unchanged."""
    try:
        yield
    except sqlite3.OperationalError as exc:
        name = getattr(exc, "sqlite_errorname", "") or ""
        text = str(exc)
        if name == "SQLITE_FULL" or "is full" in text:
            raise StoreFull("the disk holding results is full: the result could not be "
                            "stored; try again when space has been freed") from exc
        if name.startswith(("SQLITE_READONLY", "SQLITE_IOERR", "SQLITE_CANTOPEN")) or \
                any(w in text for w in ("readonly", "I/O error", "unable to open")):
            raise StoreUnavailable(f"the result store cannot be written ({text}); try again "
                                   "later") from exc
        raise


class Store(BatchTables):
    """The evaluations table (and the batch tables, ``BatchTables``) of one SQLite database
    file."""

    def __init__(self, path: Path) -> None:
        check_writable(path.parent)
        with store_faults():
            self._conn = sqlite3.connect(path, check_same_thread=False, isolation_level=None)
        self._lock = threading.Lock()
        with self._lock, store_faults():
            self._conn.execute("PRAGMA journal_mode=WAL")
            # FULL: a result answered 200 is on disk, even if the machine loses power next
            # (NORMAL keeps it across a killed process only); one fsync per result is cheap.
            self._conn.execute("PRAGMA synchronous=FULL")
            self._conn.executescript(SCHEMA)
            self._conn.executescript(BATCH_SCHEMA)

    def close(self) -> None:
        with self._lock:
            self._conn.close()

    def _write(self, sql: str, params: tuple, durable: bool = True) -> None:
        """One transaction. ``durable=False`` for the steps before a result (queued, running,
        a queue entry taken back): they skip the WAL's fsync (4-5 ms each on this machine's
        busy disk), and the next durable commit writes them too; a server that restarts marks
        unfinished rows as interrupted anyway."""
        with self._lock, store_faults():
            if not durable:
                self._conn.execute("PRAGMA synchronous=NORMAL")
            try:
                self._conn.execute("BEGIN IMMEDIATE")
                try:
                    self._conn.execute(sql, params)
                    self._conn.execute("COMMIT")
                except sqlite3.Error:
                    if self._conn.in_transaction:
                        self._conn.execute("ROLLBACK")
                    raise
            finally:
                if not durable:
                    self._conn.execute("PRAGMA synchronous=FULL")

    def queue(self, key: str, evaluation_id: str, owner: str, name: str | None,
              request_text: str) -> None:
        """Record a new (or re-sent, after a failure) evaluation as queued."""
        now = time.time()
        self._write(
            "INSERT INTO evaluations (key, id, owner, status, name, created_at, updated_at, "
            "request) VALUES (?, ?, ?, 'queued', ?, ?, ?, ?) ON CONFLICT(key) DO UPDATE SET "
            "status='queued', created_at=excluded.created_at, updated_at=excluded.updated_at, "
            "request=excluded.request, result=NULL, field=NULL, error=NULL, summary=NULL",
            (key, evaluation_id, owner, name, now, now, request_text), durable=False,
        )

    def delete(self, key: str) -> None:
        self._write("DELETE FROM evaluations WHERE key=?", (key,), durable=False)

    def mark_running(self, key: str) -> None:
        self._write("UPDATE evaluations SET status='running', updated_at=? WHERE key=?",
                    (time.time(), key), durable=False)

    def finish(self, key: str, result: dict[str, Any] | None,
               field: dict[str, Any] | bytes | None, error: dict[str, Any] | None) -> None:
        """Store the outcome of an evaluation in one transaction (``field``: see pack_field)."""
        status = "failed" if error is not None else "done"
        packed = pack_field(field)
        self._write(
            "UPDATE evaluations SET status=?, updated_at=?, summary=?, result=?, field=?, "
            "error=? WHERE key=?",
            (status, time.time(), _dumps(summarise(result)), _dumps(result), packed,
             _dumps(error), key),
        )

    def progress(self, key: str, stage: str, fraction: float) -> None:
        """Nothing to do: one server owns this file and answers from its live state."""

    def interrupt_unfinished(self, message: str) -> int:
        """Mark evaluations a previous server left queued or running as failed."""
        error = _dumps({"kind": "Interrupted", "message": message, "field": ""})
        with self._lock, store_faults():
            cursor = self._conn.execute(
                "UPDATE evaluations SET status='failed', error=?, updated_at=? "
                "WHERE status IN (?, ?)", (error, time.time(), *UNFINISHED))
        return cursor.rowcount

    def get(self, key: str) -> Record | None:
        with self._lock:
            row = self._conn.execute(
                "SELECT id, status, name, created_at, updated_at, request, summary, result, "
                "error FROM evaluations WHERE key=?", (key,)).fetchone()
        return _record(row) if row else None

    def field(self, key: str) -> bytes | None:
        """The stored temperature field as compact JSON bytes (made from the stored arrays
        here, when it is asked for: see coldseam.api.fieldpack)."""
        with self._lock:
            row = self._conn.execute("SELECT field FROM evaluations WHERE key=?",
                                     (key,)).fetchone()
        return fieldpack.to_json(row[0]) if row and row[0] is not None else None

    def page(self, owner: str, limit: int, offset: int) -> tuple[list[Record], int]:
        """``limit`` records of ``owner`` from ``offset``, newest first, and the total."""
        with self._lock:
            total = self._conn.execute("SELECT COUNT(*) FROM evaluations WHERE owner=?",
                                       (owner,)).fetchone()[0]
            rows = self._conn.execute(
                "SELECT id, status, name, created_at, updated_at, '', summary, NULL, error "
                "FROM evaluations WHERE owner=? ORDER BY created_at DESC, rowid DESC "
                "LIMIT ? OFFSET ?", (owner, limit, offset)).fetchall()
        return [_record(row) for row in rows], total


def pack_field(field: dict[str, Any] | bytes | None) -> bytes | None:
    """The temperature field as stored (``fieldpack.pack``; bytes are taken as packed
    already, by a cluster worker)."""
    if field is None or isinstance(field, bytes):
        return field
    return fieldpack.pack(field)


def summarise(result: dict[str, Any] | None) -> dict[str, Any] | None:
    """The headline figures of a result, for lists."""
    if result is None:
        return None
    psi = result.get("psi") or {}
    condensation = result.get("condensation") or {}
    return {"L2D": result.get("L2D"), "psi": psi.get("value"),
            "fRsi": condensation.get("fRsi"), "verdict": condensation.get("verdict")}


def _record(row: tuple) -> Record:
    """A Record from a row of the columns above (and, from a server store, stage, progress)."""
    live = {"stage": row[9], "progress": row[10] or 0.0} if len(row) > 9 else {}
    return Record(id=row[0], status=row[1], name=row[2], created_at=row[3],
                  updated_at=row[4], request_text=row[5], summary=_loads(row[6]),
                  result=_loads(row[7]), error=_loads(row[8]), **live)


def _compact(value: Any) -> str:
    """Compact JSON; numpy arrays and scalars (``tolist``/``item``) become plain lists/numbers."""
    return json.dumps(value, separators=(",", ":"), allow_nan=False, default=_plain)


def _plain(value: Any) -> Any:
    for method in ("tolist", "item"):
        if hasattr(value, method):
            return getattr(value, method)()
    raise TypeError(f"{type(value).__name__} is not JSON-able")


def _dumps(value: Any) -> str | None:
    return None if value is None else _compact(value)


def _loads(text: str | None) -> Any:
    return None if text is None else json.loads(text)
