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
import logging
import multiprocessing
import resource
import threading
from concurrent.futures import Future, ProcessPoolExecutor
from concurrent.futures.process import BrokenProcessPool
from typing import Any

from fastapi import HTTPException

from coldseam.api.errors import Busy
from coldseam.api.worker import ADDRESS_HEADROOM
from coldseam.errors import LimitExceeded

log = logging.getLogger(__name__)
#: Longest a drawing may take to read, seconds.
READ_TIMEOUT = 60.0
#: Uploads that may wait while one drawing is read; more are answered 429.
WAITING = 3


def dxf_importer() -> Any:
    try:
        return importlib.import_module("coldseam.imports.dxf").import_dxf
    except (ImportError, AttributeError):
        raise HTTPException(501, "this installation cannot read DXF (coldseam.imports.dxf "
                            "is missing)") from None


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
        self._admitted = 0
        self._last: Future | None = None

    async def read_async(self, data: bytes, mapping: dict[str, Any] | None,
                         unit: str | None) -> dict:
        """The importer's answer; its typed errors pass through, running out of memory or
        time becomes a 413 naming the file, a full waiting line a 429."""
        mine, previous = self._admit()
        released = False
        try:
            if previous is not None:
                await asyncio.wrap_future(previous)
            future = self._submit(data, mapping, unit)
            future.add_done_callback(lambda _: mine.set_result(None))
            released = True  # from here the turn ends with the read, even if the client goes
            return await self._outcome(future)
        finally:
            if not released:
                mine.set_result(None)

    def read(self, data: bytes, mapping: dict[str, Any] | None, unit: str | None) -> dict:
        """As ``read_async``, from code that is not on an event loop."""
        return asyncio.run(self.read_async(data, mapping, unit))

    def _admit(self) -> tuple[Future, Future | None]:
        with self._lock:
            if self._admitted > self.waiting:
                raise Busy("the DXF reader is busy with other drawings and its waiting line "
                           "is full; send the drawing again shortly", retry_after=5)
            self._admitted += 1
            mine, previous = _turn(), self._last
            self._last = mine
        mine.add_done_callback(lambda _: self._leave())
        return mine, previous

    def _leave(self) -> None:
        with self._lock:
            self._admitted -= 1

    def _submit(self, data: bytes, mapping: dict[str, Any] | None, unit: str | None) -> Future:
        with self._lock:
            if self._executor is not None and not _alive(self._executor):
                log.warning("the DXF reader process had ended; starting a new one")
                self._discard()
            try:
                return self._pool().submit(self.function, data, mapping, unit)
            except BrokenProcessPool:  # it died just now: a new one, once
                self._discard()
                return self._pool().submit(self.function, data, mapping, unit)

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


_readers: dict[int, DrawingReader] = {}
_readers_lock = threading.Lock()


def drawing_reader(memory_mb: int) -> DrawingReader:
    """The reader for this memory limit, shared by every app in the process."""
    with _readers_lock:
        if memory_mb not in _readers:
            _readers[memory_mb] = DrawingReader(memory_mb)
        return _readers[memory_mb]
