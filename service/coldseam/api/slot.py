"""One evaluation worker process and the pipe to it (see ``coldseam.api.pool``).

A slot starts its worker, sends it one request at a time, relays progress, and stops it when
it overruns the wall-time limit or its resident memory grows past the memory limit (read from
``/proc`` every ``MEMORY_POLL`` seconds). When the worker dies (a segfault in gmsh, ``os._exit``, the
out-of-memory killer) the request fails with a message that says so and a new worker is
started in its place.
"""

from __future__ import annotations

import logging
import os
import signal
import threading
import time
from collections.abc import Callable
from dataclasses import dataclass, field
from multiprocessing.connection import Connection
from typing import Any

from coldseam.api.worker import (
    MEMORY_FIELD,
    OUT_OF_MEMORY,
    lower_priority,
    memory_message,
    worker_main,
)

log = logging.getLogger(__name__)

STARTUP_TIMEOUT = 120.0  # s for a new worker to import the engine
STOP_GRACE = 2.0  # s a worker gets to stop before it is killed
EXIT_WAIT = 10.0  # s to wait for the exit code of a worker whose pipe has closed
MEMORY_POLL = 0.1  # s between two looks at a worker's resident memory
OVER_MEMORY = "over-memory"


@dataclass
class Outcome:
    """How one evaluation ended. ``error`` is ``{"kind", "message", "field"}`` on failure."""

    result: dict[str, Any] | None = None
    field: dict[str, Any] | None = None
    error: dict[str, str] | None = None

    @property
    def ok(self) -> bool:
        return self.error is None


def failure(kind: str, message: str, field: str = "") -> Outcome:
    return Outcome(error={"kind": kind, "message": message, "field": field})


@dataclass
class Job:
    """One evaluation handed to the pool; the callbacks run on a runner thread."""

    key: str
    request: dict[str, Any]
    on_start: Callable[[Job], None]
    on_progress: Callable[[Job, str, float], None]
    on_finish: Callable[[Job, Outcome], None]
    label: str = ""
    extra: dict[str, Any] = field(default_factory=dict)
    #: Called as the worker is done with the job, before its outcome is stored (a local
    #: pool only): the worker is free for the next one from then on.
    on_ran: Callable[[Job], None] | None = None


class WorkerSlot:
    """One worker process and the pipe to it, restarted whenever it is lost."""

    def __init__(self, ctx: Any, engine_spec: str, name: str, memory_limit: int = 0) -> None:
        self._ctx, self._engine_spec, self.name = ctx, engine_spec, name
        self.memory_limit = memory_limit  # bytes of resident memory, 0 for no limit
        self.process: Any = None
        self.conn: Connection | None = None
        self.ready = False
        self.closed = False
        self._lock = threading.RLock()

    def start(self) -> None:
        with self._lock:
            self._start()

    def _start(self) -> None:
        parent_conn, child_conn = self._ctx.Pipe()
        process = self._ctx.Process(target=worker_main, name=self.name, daemon=True,
                                    args=(child_conn, self._engine_spec, self.memory_limit))
        try:
            process.start()
        except BaseException:
            parent_conn.close()  # a process that never started is not kept: kill() joins
            raise
        finally:
            child_conn.close()
        lower_priority(process.pid)  # before its imports: the server keeps the CPU it needs
        self.process, self.conn, self.ready = process, parent_conn, False
        log.info("worker %s started (pid %s)", self.name, process.pid)

    def stop(self) -> None:
        """Ask the worker to stop; kill it if it does not."""
        if self.process is None:
            return
        if self.process.is_alive() and self.conn is not None:
            try:
                self.conn.send(("stop",))
            except (BrokenPipeError, OSError):
                pass
            self.process.join(STOP_GRACE)
        self.kill()

    def kill(self) -> None:
        with self._lock:
            self.interrupt()
            if self.process is not None:
                self.process.join(STOP_GRACE)
            if self.conn is not None:
                self.conn.close()
            self.process, self.conn, self.ready = None, None, False

    def interrupt(self) -> None:
        """Kill the worker process, leaving the pipe to the thread that reads it."""
        process = self.process
        if process is not None and process.is_alive():
            process.kill()

    def run(self, job: Job, timeout: float) -> Outcome:
        """Evaluate ``job`` on this worker within ``timeout`` seconds of wall time."""
        if self.process is None or not self.process.is_alive():
            self.kill()
            try:
                self.start()
            except (OSError, RuntimeError) as exc:
                log.error("worker %s could not start: %s", self.name, exc)
                return failure("WorkerCrashed", f"no evaluation worker could be started "
                               f"({exc})")
        if not self.ready:
            lost = self._wait_ready()
            if lost is not None:
                return lost
        try:
            self.conn.send(("run", job.request))
        except (BrokenPipeError, OSError):
            return self._lost("as the request was sent", "eof")
        return self._await_answer(job, time.monotonic() + timeout, timeout)

    def _wait_ready(self) -> Outcome | None:
        message = self._receive(time.monotonic() + STARTUP_TIMEOUT)
        if message == ("ready",):
            self.ready = True
            return None
        if message is None:
            self._replace()
            return failure("WorkerCrashed", f"the evaluation worker did not start within "
                           f"{STARTUP_TIMEOUT:g} s; it has been replaced")
        return self._lost("while starting", message)

    def _await_answer(self, job: Job, deadline: float, timeout: float) -> Outcome:
        while True:
            message = self._receive(deadline)
            stage = job.extra.get("stage") or "starting"
            if message == OVER_MEMORY:
                self._replace()
                log.warning("worker %s over the memory limit during %s; replaced", self.name,
                            stage)
                return failure("LimitExceeded", memory_message(self.memory_limit, stage),
                               MEMORY_FIELD)
            if message is None or message == "eof":
                return self._lost(f"during {stage}", message, timeout)
            if message[0] == "progress":
                job.extra["stage"] = message[1]
                job.on_progress(job, message[1], message[2])
                continue
            if message[0] == "done":
                return Outcome(result=message[1], field=message[2])
            if message[1] == OUT_OF_MEMORY:  # the worker ends itself; wait for that here
                self._replace()
                return failure("LimitExceeded", message[2], message[3])
            return failure(message[1], message[2], message[3])

    def _receive(self, deadline: float) -> Any:
        """The next message, ``"eof"`` when the worker is gone, ``None`` at the deadline,
        OVER_MEMORY when its resident memory is over the limit."""
        conn, process = self.conn, self.process
        if conn is None or process is None:
            return "eof"
        wait = MEMORY_POLL if self.memory_limit else 1.0
        while (remaining := deadline - time.monotonic()) > 0:
            try:
                if conn.poll(min(remaining, wait)):
                    return conn.recv()
            except (EOFError, OSError):
                return "eof"
            if not process.is_alive():
                return "eof"
            if self.memory_limit and resident_bytes(process.pid) > self.memory_limit:
                return OVER_MEMORY
        return None

    def _lost(self, when: str, message: Any, timeout: float | None = None) -> Outcome:
        """The worker is gone or overran: stop it, start a fresh one, report why."""
        if message is None and timeout is not None:
            self._replace()
            return failure("Timeout", f"the evaluation took longer than the {timeout:g} s "
                           f"limit and was stopped {when}; simplify the section or ask for "
                           "fewer mesh levels (options.max_levels)")
        code = self._exit_code()
        self._replace()
        log.error("worker %s lost %s (exit code %s); replaced", self.name, when, code)
        return failure("WorkerCrashed", f"the evaluation worker stopped unexpectedly {when} "
                       f"({describe_exit(code)}); the worker has been replaced, the request "
                       "was not completed and may be sent again")

    def _exit_code(self) -> int | None:
        process = self.process
        if process is None:
            return None
        process.join(EXIT_WAIT)  # its pipe closed: it is exiting, on a busy machine slowly
        return process.exitcode

    def _replace(self) -> None:
        self.kill()
        if self.closed:
            return
        try:
            self.start()
        except (OSError, RuntimeError) as exc:  # the next job tries again
            log.error("worker %s could not be replaced: %s", self.name, exc)


def describe_exit(code: int | None) -> str:
    if code is None:
        return "no exit code"
    if code < 0:
        try:
            return f"killed by {signal.Signals(-code).name}"
        except ValueError:
            return f"killed by signal {-code}"
    return f"exit code {code}"


_PAGE = os.sysconf("SC_PAGE_SIZE")


def resident_bytes(pid: int) -> int:
    """Resident memory of process ``pid`` (0 when it is gone or /proc cannot say)."""
    try:
        with open(f"/proc/{pid}/statm") as statm:
            return int(statm.read().split()[1]) * _PAGE
    except (OSError, ValueError, IndexError):
        return 0
