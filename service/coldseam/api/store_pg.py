"""Stored evaluations in PostgreSQL (``COLDSEAM_DATABASE_URL=postgresql://...``), shared by
several ``coldseam serve`` processes: the same methods and rows as the SQLite ``Store``.

SQLAlchemy 2 Core on psycopg 3; the schema is made by the Alembic migrations in
``coldseam/api/migrations`` (``upgrade head`` at start, under an advisory lock so that servers
starting together migrate once). Each change is one transaction, committed before the method
returns (PostgreSQL's default ``synchronous_commit=on``: the WAL is on disk), so a result is
durable before it is answered. Each row also records the server ``instance`` that queued it,
so that a server starting again interrupts only its own unfinished work; and the stage and
progress of a running evaluation, so that any server can answer its status.

A database that cannot be reached raises ``StoreUnavailable`` (answered 503); the connection
pool checks connections before use, so service resumes by itself when the database is back.
"""

from __future__ import annotations

import logging
import time
from collections.abc import Iterator
from contextlib import contextmanager
from typing import Any

from sqlalchemy import Connection, create_engine, exc, text

from coldseam.api import fieldpack
from coldseam.api.batch_store_pg import PgBatchTables
from coldseam.api.store import (
    UNFINISHED,
    Record,
    _dumps,
    _record,
    pack_field,
    summarise,
)
from coldseam.api.stores import redact
from coldseam.errors import StoreFailure, StoreUnavailable

log = logging.getLogger(__name__)

#: Key of the advisory lock held while the schema is migrated (any constant shared by all).
MIGRATION_LOCK = 0x636F6C64  # "cold"
CONNECT_TIMEOUT = 5  # s for one connection attempt
#: Progress is written at most this often per evaluation (besides a change of stage).
PROGRESS_WRITE_INTERVAL = 1.0
RECORD_COLUMNS = ("id, status, name, created_at, updated_at, request, summary, result, error, "
                  "stage, progress")


def engine_url(url: str) -> str:
    """``postgresql://`` (what users write) as SQLAlchemy's psycopg 3 dialect URL."""
    for prefix in ("postgresql+psycopg://", "postgresql://", "postgres://"):
        if url.startswith(prefix):
            return "postgresql+psycopg://" + url[len(prefix):]
    raise ValueError("COLDSEAM_DATABASE_URL must start with postgresql://")


class PostgresStore(PgBatchTables):
    """The evaluations (and batches, ``PgBatchTables``) of one PostgreSQL database, for the
    server named ``instance``."""

    #: A finished result waits for the database to come back (``jobs.Evaluations``).
    waits_when_unavailable = True

    def __init__(self, url: str, instance: str, wait: float = 30.0) -> None:
        self.instance, self.url = instance, redact(url)
        self._engine = create_engine(
            engine_url(url), pool_pre_ping=True, pool_size=8, max_overflow=8,
            pool_timeout=CONNECT_TIMEOUT, connect_args={"connect_timeout": CONNECT_TIMEOUT})
        self._progress_written: dict[str, tuple[str, float]] = {}
        self._migrate(wait)

    def _migrate(self, wait: float) -> None:
        """``alembic upgrade head``, retried for ``wait`` seconds while the database is down."""
        deadline = time.monotonic() + wait
        while True:
            try:
                with self._engine.begin() as conn:
                    conn.execute(text("SELECT pg_advisory_xact_lock(:k)"), {"k": MIGRATION_LOCK})
                    upgrade_head(conn)
                return
            except exc.OperationalError as error:
                if time.monotonic() > deadline:
                    raise StoreUnavailable(f"the database {self.url} cannot be reached: "
                                           f"{_reason(error)}") from None
                log.warning("database %s not reachable yet (%s); retrying", self.url,
                            _reason(error))
                time.sleep(1.0)

    def close(self) -> None:
        self._engine.dispose()

    @contextmanager
    def _tx(self) -> Iterator[Connection]:
        """One transaction, committed on leaving; an unreachable database as StoreUnavailable."""
        try:
            with self._engine.begin() as conn:
                yield conn
        except (exc.OperationalError, exc.InterfaceError) as error:
            raise StoreUnavailable(f"the results database is not reachable "
                                   f"({_reason(error)})") from None
        except exc.DBAPIError as error:
            if error.connection_invalidated:
                raise StoreUnavailable(f"the connection to the results database was lost "
                                       f"({_reason(error)})") from None
            log.error("database error: %s", error)
            raise StoreFailure(f"the results database refused the change "
                               f"({_reason(error)})") from error

    def _write(self, sql: str, params: dict[str, Any]) -> int:
        with self._tx() as conn:
            return conn.execute(text(sql), params).rowcount

    def queue(self, key: str, evaluation_id: str, owner: str, name: str | None,
              request_text: str) -> None:
        """Record a new (or re-sent, after a failure) evaluation as queued by this server."""
        now = time.time()
        self._write(
            "INSERT INTO evaluations (key, id, owner, status, name, created_at, updated_at, "
            "request, server) VALUES (:key, :id, :owner, 'queued', :name, :now, :now, "
            ":request, :server) ON CONFLICT (key) DO UPDATE SET status='queued', "
            "created_at=excluded.created_at, updated_at=excluded.updated_at, "
            "request=excluded.request, result=NULL, field=NULL, error=NULL, summary=NULL, "
            "stage=NULL, progress=0, server=excluded.server",
            {"key": key, "id": evaluation_id, "owner": owner, "name": name, "now": now,
             "request": request_text, "server": self.instance})

    def delete(self, key: str) -> None:
        self._write("DELETE FROM evaluations WHERE key=:key", {"key": key})

    def mark_running(self, key: str) -> None:
        self._write("UPDATE evaluations SET status='running', updated_at=:now WHERE key=:key "
                    "AND status IN ('queued', 'running')", {"now": time.time(), "key": key})

    def progress(self, key: str, stage: str, fraction: float) -> None:
        """Record the stage and progress of a running evaluation (at most once a second, and
        at each change of stage), for the other servers."""
        now = time.monotonic()
        last = self._progress_written.get(key)
        if last is not None and last[0] == stage and now - last[1] < PROGRESS_WRITE_INTERVAL:
            return
        self._progress_written[key] = (stage, now)
        self._write("UPDATE evaluations SET stage=:stage, progress=:fraction WHERE key=:key "
                    "AND status='running'", {"stage": stage, "fraction": fraction, "key": key})

    def finish(self, key: str, result: dict[str, Any] | None,
               field: dict[str, Any] | bytes | None, error: dict[str, Any] | None) -> None:
        """Store the outcome of an evaluation in one transaction."""
        self._progress_written.pop(key, None)
        status = "failed" if error is not None else "done"
        packed = pack_field(field)
        self._write(
            "UPDATE evaluations SET status=:status, updated_at=:now, summary=:summary, "
            "result=:result, field=:field, error=:error, stage=NULL, progress=0 WHERE key=:key",
            {"status": status, "now": time.time(), "summary": _dumps(summarise(result)),
             "result": _dumps(result), "field": packed, "error": _dumps(error), "key": key})

    def interrupt_unfinished(self, message: str) -> int:
        """Mark evaluations this server instance left queued or running as failed (other
        servers' work in flight is theirs)."""
        error = _dumps({"kind": "Interrupted", "message": message, "field": ""})
        return self._write(
            "UPDATE evaluations SET status='failed', error=:error, updated_at=:now, "
            "stage=NULL, progress=0 WHERE server=:server AND status IN ('queued', 'running')",
            {"error": error, "now": time.time(), "server": self.instance})

    def get(self, key: str) -> Record | None:
        with self._tx() as conn:
            row = conn.execute(text(f"SELECT {RECORD_COLUMNS} FROM evaluations WHERE key=:key"),
                               {"key": key}).first()
        return _record(tuple(row)) if row else None

    def field(self, key: str) -> bytes | None:
        """The stored temperature field as compact JSON bytes."""
        with self._tx() as conn:
            row = conn.execute(text("SELECT field FROM evaluations WHERE key=:key"),
                               {"key": key}).first()
        return fieldpack.to_json(bytes(row[0])) if row and row[0] is not None else None

    def page(self, owner: str, limit: int, offset: int) -> tuple[list[Record], int]:
        """``limit`` records of ``owner`` from ``offset``, newest first, and the total."""
        with self._tx() as conn:
            total = conn.execute(text("SELECT COUNT(*) FROM evaluations WHERE owner=:owner"),
                                 {"owner": owner}).scalar_one()
            rows = conn.execute(text(
                "SELECT id, status, name, created_at, updated_at, '', summary, NULL, error, "
                "stage, progress FROM evaluations WHERE owner=:owner "
                "ORDER BY created_at DESC, seq DESC LIMIT :limit OFFSET :offset"),
                {"owner": owner, "limit": limit, "offset": offset}).all()
        return [_record(tuple(row)) for row in rows], total

    def unfinished(self) -> int:
        """Evaluations queued or running on any server (for the health page and tests)."""
        with self._tx() as conn:
            return conn.execute(text("SELECT COUNT(*) FROM evaluations WHERE status IN "
                                     f"{UNFINISHED!r}")).scalar_one()


def _config():
    from alembic.config import Config

    config = Config()
    config.set_main_option("script_location", "coldseam.api:migrations")
    return config


def head_revision() -> str:
    """The newest migration carried by this package."""
    from alembic.script import ScriptDirectory

    return ScriptDirectory.from_config(_config()).get_current_head()


def upgrade_head(conn: Connection) -> None:
    """Bring the schema to the newest migration, on ``conn`` (inside its transaction)."""
    from alembic import command

    config = _config()
    config.attributes["connection"] = conn
    command.upgrade(config, "head")


def _reason(error: Exception) -> str:
    """The first line of a driver error, without SQLAlchemy's background link."""
    original = getattr(error, "orig", None) or error
    return str(original).strip().splitlines()[0] if str(original).strip() else type(
        original).__name__
