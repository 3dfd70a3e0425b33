"""What every store of evaluations offers, and the one chosen by the settings.

The embedded default is the SQLite ``Store`` in the data folder; with
``COLDSEAM_DATABASE_URL=postgresql://...`` it is the ``PostgresStore`` (needs the ``cluster``
extra), shared by several servers.
"""

from __future__ import annotations

import socket
from typing import Any, Protocol

from coldseam.api.store import Record, Store
from coldseam.settings import Settings


class EvaluationStore(Protocol):
    """The store interface ``jobs.Evaluations`` and the routes use."""

    def queue(self, key: str, evaluation_id: str, owner: str, name: str | None,
              request_text: str) -> None: ...

    def delete(self, key: str) -> None: ...

    def mark_running(self, key: str) -> None: ...

    def progress(self, key: str, stage: str, fraction: float) -> None: ...

    def finish(self, key: str, result: dict[str, Any] | None, field: dict[str, Any] | None,
               error: dict[str, Any] | None) -> None: ...

    def interrupt_unfinished(self, message: str) -> int: ...

    def get(self, key: str) -> Record | None: ...

    def field(self, key: str) -> bytes | None: ...

    def page(self, owner: str, limit: int, offset: int) -> tuple[list[Record], int]: ...

    def close(self) -> None: ...


def instance_name(settings: Settings) -> str:
    """This server's name in a shared database: ``COLDSEAM_INSTANCE``, else host:port (the same
    after a restart, so the server finds its own unfinished work again)."""
    return settings.instance or f"{socket.gethostname()}:{settings.port}"


def open_store(settings: Settings) -> EvaluationStore:
    """The store the settings choose (PostgreSQL migrated to the newest schema first)."""
    if settings.database_url:
        from coldseam.api.store_pg import PostgresStore

        return PostgresStore(settings.database_url, instance_name(settings),
                             settings.database_wait)
    return Store(settings.database_path)


def redact(url: str) -> str:
    """``url`` without its password, for logs and messages."""
    head, at, tail = url.rpartition("@")
    if not at:
        return url
    scheme, _, credentials = head.partition("://")
    return f"{scheme}://{credentials.split(':', 1)[0]}@{tail}"
