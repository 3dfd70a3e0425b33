"""The inside of one evaluation worker process (no FastAPI here: this runs in a child).

The parent sends ``("run", request_dict)`` over a pipe; the worker answers with any number of
``("progress", stage, fraction)`` and then one of

* ``("done", result, field)``  - the engine's Evaluation.result and its field (the arrays
  form, Evaluation.arrays, when the engine has it; else Evaluation.field),
* ``("error", kind, message, field)`` - a typed Coldseam error (kind: its class name), or
  kind OUT_OF_MEMORY when an allocation failed; the worker then ends.

``("stop",)`` ends the worker. Anything else going wrong ends the process with its traceback
on stderr; the parent sees the exit code and replaces the worker.

With a memory limit the worker's address space is capped a little above it (``RLIMIT_AS``), as
a backstop to the parent's watch on its resident memory: an allocation past the cap fails at
once, the request is answered as over the limit, and the worker ends so that a fresh one
takes its place.
"""

from __future__ import annotations

import importlib
import logging
import os
import resource
import signal
import time
from collections.abc import Callable
from typing import TYPE_CHECKING, Any

from coldseam import DEFAULT_ENGINE
from coldseam.errors import ColdseamError

if TYPE_CHECKING:  # only an annotation here: `coldseam evaluate` need not load multiprocessing
    from multiprocessing.connection import Connection

log = logging.getLogger(__name__)

Engine = Callable[..., Any]
#: Progress messages closer together than this are dropped, except a change of stage.
PROGRESS_INTERVAL = 0.2
#: Address space allowed beyond the memory limit: mapped libraries, thread stacks and
#: allocator arenas that are reserved but never resident (about 0.5 GiB once the engine ran).
ADDRESS_HEADROOM = 1 << 30


def load_engine(spec: str) -> Engine:
    """The engine function named by ``"package.module:function"``."""
    module_name, _, function_name = spec.partition(":")
    if not module_name or not function_name:
        raise ValueError(f"engine must be given as 'module:function', got {spec!r}")
    module = importlib.import_module(module_name)
    return getattr(module, function_name)


def warm_up(engine: Engine) -> None:
    """Evaluate a small junction once before taking requests: the first evaluation in a
    process pays for lazy imports, gmsh's start and the solver's first call (~0.5 s), which
    would otherwise land on one unlucky request."""
    from coldseam.schema.evaluation import EvaluationRequest
    from coldseam.templates import build

    try:
        engine(EvaluationRequest.model_validate(build("wall_corner", {})), None)
    except Exception:  # noqa: BLE001 - warming is an optimisation; requests report errors
        log.warning("worker warm-up evaluation failed", exc_info=True)


def worker_main(conn: Connection, engine_spec: str, memory_limit: int = 0) -> None:
    """Entry point of a worker process: evaluate requests until told to stop.

    ``memory_limit`` (bytes, 0 for none) caps the address space at it plus ADDRESS_HEADROOM.
    """
    signal.signal(signal.SIGINT, signal.SIG_IGN)  # Ctrl-C is for the server, which stops us
    if memory_limit:
        cap = memory_limit + ADDRESS_HEADROOM
        resource.setrlimit(resource.RLIMIT_AS, (cap, cap))
    engine = load_engine(engine_spec)
    if engine_spec == DEFAULT_ENGINE:
        warm_up(engine)
    conn.send(("ready",))
    while True:
        message = conn.recv()
        if message[0] != "run":
            return
        reply = run_one(engine, message[1], _progress_sender(conn), memory_limit)
        conn.send(reply)
        if reply[1] == OUT_OF_MEMORY:
            return  # memory may be fragmented or a library half-way: a fresh worker follows


#: Engine processes (evaluation workers, the DXF reader) run this much nicer than the server:
#: on a machine whose cores they fill, the server's event loop still gets the CPU at once
#: when a request comes, so /healthz and the page answer within milliseconds.
NICENESS = 10


def lower_priority(pid: int) -> None:
    """Make process ``pid`` (a child just started) NICENESS nicer than this process; nothing
    when the system refuses or the process has gone already."""
    try:
        target = min(19, os.getpriority(os.PRIO_PROCESS, 0) + NICENESS)
        os.setpriority(os.PRIO_PROCESS, pid, target)
    except (OSError, AttributeError):  # gone, not allowed, or no priorities on this system
        log.debug("could not lower the priority of process %s", pid)


MEMORY_FIELD = "/options/max_nodes"
#: Error kind of a worker out of memory: the parent answers LimitExceeded and replaces it.
OUT_OF_MEMORY = "OutOfMemory"


def run_one(engine: Engine, request_dict: dict[str, Any],
            progress: Callable[[str, float], None], memory_limit: int = 0) -> tuple:
    """Evaluate one request; typed errors (and running out of memory) become an
    ``("error", ...)`` reply."""
    from coldseam.schema.evaluation import EvaluationRequest

    try:
        request = EvaluationRequest.model_validate(request_dict)
        evaluation = engine(request, progress)
    except ColdseamError as exc:
        return ("error", type(exc).__name__, exc.message, exc.field)
    except MemoryError:
        return ("error", OUT_OF_MEMORY, memory_message(memory_limit), MEMORY_FIELD)
    # The field's arrays as they are (one copy each through the pipe, no lists): see
    # coldseam.thermal.field; an engine without them sends its field document.
    field = getattr(evaluation, "arrays", None)
    return ("done", evaluation.result, evaluation.field if field is None else field)


def memory_message(memory_limit: int, stage: str | None = None) -> str:
    """What an evaluation stopped for needing too much memory is answered."""
    limit = f"the {memory_limit / 2**20:.0f} MiB memory limit of a worker" if memory_limit \
        else "the memory this machine has"
    when = f" during {stage}" if stage else ""
    return (f"the evaluation needed more than {limit} and was stopped{when}: ask for fewer "
            "mesh nodes (options.max_nodes) or levels (options.max_levels), or simplify the "
            "section")


def _progress_sender(conn: Connection) -> Callable[[str, float], None]:
    last = {"stage": None, "at": 0.0}

    def progress(stage: str, fraction: float) -> None:
        now = time.monotonic()
        if stage == last["stage"] and now - last["at"] < PROGRESS_INTERVAL:
            return
        last.update(stage=stage, at=now)
        conn.send(("progress", str(stage), min(max(float(fraction), 0.0), 1.0)))

    return progress
