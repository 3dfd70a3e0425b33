"""The inside of one evaluation worker process (no FastAPI here: this runs in a child).

The parent sends ``("run", request_dict)`` over a pipe; the worker answers with any number of
``("progress", stage, fraction)`` and then one of

* ``("done", result, field)``  - the engine's Evaluation.result and Evaluation.field,
* ``("error", kind, message, field)`` - a typed Coldseam error (kind: its class name).

``("stop",)`` ends the worker. Anything else going wrong ends the process with its traceback
on stderr; the parent sees the exit code and replaces the worker.
"""

from __future__ import annotations

import importlib
import logging
import signal
import time
from collections.abc import Callable
from multiprocessing.connection import Connection
from typing import Any

from coldseam.errors import ColdseamError

log = logging.getLogger(__name__)

Engine = Callable[..., Any]
#: Progress messages closer together than this are dropped, except a change of stage.
PROGRESS_INTERVAL = 0.2


def load_engine(spec: str) -> Engine:
    """The engine function named by ``"package.module:function"``."""
    module_name, _, function_name = spec.partition(":")
    if not module_name or not function_name:
        raise ValueError(f"engine must be given as 'module:function', got {spec!r}")
    module = importlib.import_module(module_name)
    return getattr(module, function_name)


def worker_main(conn: Connection, engine_spec: str) -> None:
    """Entry point of a worker process: evaluate requests until told to stop."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)  # Ctrl-C is for the server, which stops us
    engine = load_engine(engine_spec)
    conn.send(("ready",))
    while True:
        message = conn.recv()
        if message[0] != "run":
            return
        conn.send(run_one(engine, message[1], _progress_sender(conn)))


def run_one(engine: Engine, request_dict: dict[str, Any],
            progress: Callable[[str, float], None]) -> tuple:
    """Evaluate one request; typed errors become an ``("error", ...)`` reply."""
    from coldseam.schema.evaluation import EvaluationRequest

    try:
        request = EvaluationRequest.model_validate(request_dict)
        evaluation = engine(request, progress)
    except ColdseamError as exc:
        return ("error", type(exc).__name__, exc.message, exc.field)
    return ("done", evaluation.result, evaluation.field)


def _progress_sender(conn: Connection) -> Callable[[str, float], None]:
    last = {"stage": None, "at": 0.0}

    def progress(stage: str, fraction: float) -> None:
        now = time.monotonic()
        if stage == last["stage"] and now - last["at"] < PROGRESS_INTERVAL:
            return
        last.update(stage=stage, at=now)
        conn.send(("progress", str(stage), min(max(float(fraction), 0.0), 1.0)))

    return progress
