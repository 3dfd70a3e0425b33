"""The DXF reader process: drawings are read one at a time in a separate process under the
worker memory limit and a time limit, so a hostile or simply enormous drawing costs the server
neither memory nor a stuck thread.

Uploads wait for their turn on the event loop, holding no thread of the shared pool (so that
health checks, the page and evaluations are served meanwhile), and only a few may wait: more
are answered 429 at once. A reader process that died between drawings is replaced before the
next one is sent, so an innocent upload never inherits its death.
"""

from __future__ import annotations

import asyncio
import importlib
import importlib.util
import json
import logging
import multiprocessing
import resource
import threading
from concurrent.futures import Future, ProcessPoolExecutor
from concurrent.futures.process import BrokenProcessPool
from typing import Any

from fastapi import HTTPException
from fastapi.concurrency import run_in_threadpool

from coldseam.api.worker import ADDRESS_HEADROOM, lower_priority
from coldseam.errors import LimitExceeded

log = logging.getLogger(__name__)
#: Longest a drawing may take to read, seconds.
READ_TIMEOUT = 60.0
#: Uploads that may wait while one drawing is read; more are answered 429.
WAITING = 3
#: Seconds a refused upload is asked to wait (Retry-After).
BUSY_RETRY = 5


IMPORTER = "coldseam.imports.dxf"
MISSING = f"this installation cannot read DXF ({IMPORTER} is missing)"


def dxf_importer() -> Any:
    try:
        return importlib.import_module(IMPORTER).import_dxf
    except (ImportError, AttributeError):
        raise HTTPException(501, MISSING) from None


def check_importer() -> None:
    """501 when this installation has no DXF importer, found without importing it: the
    server never reads a drawing itself, and importing the reader's libraries (about 0.25 s
    of CPU) on the event loop at the first upload held up every other request, /healthz
    included, for that long."""
    try:
        found = importlib.util.find_spec(IMPORTER) is not None
    except (ImportError, ValueError):
        found = False
    if not found:
        raise HTTPException(501, MISSING)


def _limit_memory(memory_mb: int) -> None:
    if memory_mb:
        cap = memory_mb * 2**20 + ADDRESS_HEADROOM
        resource.setrlimit(resource.RLIMIT_AS, (cap, cap))


def _read(data: bytes, mapping: dict[str, Any] | None, unit: str | None) -> dict:
    return dxf_importer()(data, mapping, unit)


def _turn() -> Future:
    """A future marking the end of one upload's turn (not cancellable by a hang-up)."""
    future: Future = Future()
    future.set_running_or_notify_cancel()
    return future


class DrawingReader:
    """One reader process (spawned on first use, replaced when it dies or overruns)."""

    def __init__(self, memory_mb: int, timeout: float = READ_TIMEOUT,
                 function: Any = None, waiting: int = WAITING) -> None:
        self.memory_mb, self.timeout, self.waiting = memory_mb, timeout, waiting
        self.function = function or _read  # module-level, so the reader process can load it
        self._lock = threading.Lock()  # held for bookkeeping only, never during a read
        self._executor: ProcessPoolExecutor | None = None
        self._lowered: set[int] = set()  # reader processes already made nicer
        self._admitted = 0
        self._last: Future | None = None

    async def read_async(self, data: bytes, mapping: dict[str, Any] | None,
                         unit: str | None) -> dict:
        """The importer's answer; its typed errors pass through, running out of memory or
        time becomes a 413 naming the file, a full waiting line a 429."""
        mine, previous = self._take_turn()
        released = False
        try:
            if previous is not None:
                await asyncio.wrap_future(previous)
            # a thread for the moment of handing over (it may start the process), not the read
            future = await run_in_threadpool(self._submit, data, mapping, unit)
            future.add_done_callback(lambda _: mine.set_result(None))
            released = True  # from here the turn ends with the read, even if the client goes
            return await self._outcome(future)
        finally:
            if not released:
                mine.set_result(None)

    def read(self, data: bytes, mapping: dict[str, Any] | None, unit: str | None) -> dict:
        """As ``read_async``, from code that is not on an event loop."""
        return asyncio.run(self.read_async(data, mapping, unit))

    def enter(self) -> bool:
        """Take a place among the uploads being read or waiting; False when all are taken
        (the upload is then answered 429 before its body is read)."""
        with self._lock:
            if self._admitted > self.waiting:
                return False
            self._admitted += 1
            return True

    def leave(self) -> None:
        with self._lock:
            self._admitted -= 1

    def _take_turn(self) -> tuple[Future, Future | None]:
        with self._lock:
            mine, previous = _turn(), self._last
            self._last = mine
        return mine, previous

    def _submit(self, data: bytes, mapping: dict[str, Any] | None, unit: str | None) -> Future:
        with self._lock:
            if self._executor is not None and not _alive(self._executor):
                log.warning("the DXF reader process had ended; starting a new one")
                self._discard()
            try:
                future = self._pool().submit(self.function, data, mapping, unit)
            except BrokenProcessPool:  # it died just now: a new one, once
                self._discard()
                future = self._pool().submit(self.function, data, mapping, unit)
            self._lower_priority()
            return future

    def _lower_priority(self) -> None:
        """The reader process (started by the first submit) runs nicer than the server."""
        processes = getattr(self._executor, "_processes", None) or {}
        for pid in processes:
            if pid not in self._lowered:
                lower_priority(pid)
                self._lowered.add(pid)

    async def _outcome(self, future: Future) -> dict:
        try:
            return await asyncio.wait_for(asyncio.wrap_future(future), self.timeout)
        except TimeoutError:
            with self._lock:
                self._discard()
            raise LimitExceeded(
                f"reading the drawing took longer than {self.timeout:.0f} s and was "
                "stopped: send a drawing of the cross-section only (purge blocks, hatches "
                "and other views)", "/file") from None
        except (MemoryError, BrokenProcessPool):
            with self._lock:
                self._discard()
            limit = (f"the {self.memory_mb} MiB memory limit" if self.memory_mb
                     else "the memory of this machine")
            raise LimitExceeded(
                f"reading the drawing needed more than {limit} and was stopped: send a "
                "drawing of the cross-section only", "/file") from None

    def _pool(self) -> ProcessPoolExecutor:
        if self._executor is None:
            self._executor = ProcessPoolExecutor(
                max_workers=1, mp_context=multiprocessing.get_context("spawn"),
                initializer=_limit_memory, initargs=(self.memory_mb,))
        return self._executor

    def _discard(self) -> None:
        executor, self._executor = self._executor, None
        if executor is None:
            return
        for process in list((getattr(executor, "_processes", None) or {}).values()):
            process.kill()  # a drawing that overran its time: no graceful stop to wait for
        executor.shutdown(wait=False, cancel_futures=True)

    def close(self) -> None:
        with self._lock:
            if self._executor is not None:
                self._executor.shutdown(wait=True, cancel_futures=True)
                self._executor = None


def _alive(executor: ProcessPoolExecutor) -> bool:
    """False when the pool is broken or its process has ended (killed between drawings)."""
    if getattr(executor, "_broken", False):
        return False
    processes = getattr(executor, "_processes", None) or {}
    return all(process.is_alive() for process in list(processes.values()))


class ReaderGate:
    """ASGI middleware: a DXF upload past the reader's waiting line is answered 429 at once,
    before its body is read (parsing many large uploads at once would itself load the event
    loop). Uploads without an accepted key pass on to be answered 401 and take no place."""

    def __init__(self, app: Any, memory_mb: int, path: str = "/api/v1/imports/dxf") -> None:
        self.app, self.memory_mb, self.path = app, memory_mb, path

    async def __call__(self, scope: dict, receive: Any, send: Any) -> None:
        if scope["type"] != "http" or scope.get("method") != "POST" or \
                scope.get("path") != self.path or not _accepted(scope):
            await self.app(scope, receive, send)
            return
        reader = drawing_reader(self.memory_mb)
        if not reader.enter():
            await _busy(send)
            return
        try:
            await self.app(scope, receive, send)
        finally:
            reader.leave()


def _accepted(scope: dict) -> bool:
    ring = getattr(scope["app"].state, "keys", None)
    if ring is None or ring.open:
        return True
    for name, value in scope.get("headers", []):
        if name == b"authorization":
            scheme, _, key = value.decode("latin-1").partition(" ")
            return scheme.lower() == "bearer" and ring.owner_of(key.strip()) is not None
    return False


async def _busy(send: Any) -> None:
    message = ("the DXF reader is busy with other drawings and its waiting line is full; "
               f"send the drawing again in {BUSY_RETRY} s")
    body = json.dumps({"detail": message, "field": "", "message": message, "kind": "Busy"})
    await send({"type": "http.response.start", "status": 429,
                "headers": [(b"content-type", b"application/json"),
                            (b"retry-after", str(BUSY_RETRY).encode()),
                            (b"content-length", str(len(body)).encode()),
                            # the body is not read: closing stops the server parsing it
                            (b"connection", b"close")]})
    await send({"type": "http.response.body", "body": body.encode()})


_readers: dict[int, DrawingReader] = {}
_readers_lock = threading.Lock()


def drawing_reader(memory_mb: int) -> DrawingReader:
    """The reader for this memory limit, shared by every app in the process."""
    with _readers_lock:
        if memory_mb not in _readers:
            _readers[memory_mb] = DrawingReader(memory_mb)
        return _readers[memory_mb]
