"""The task a Dask worker runs for one evaluation (no FastAPI here: this runs on the cluster).

A Dask worker runs the engine as the local pool does: in a child process of its own, in a
``WorkerSlot`` kept per worker thread, with the same wall-time and resident-memory limits, so
that an overrun or a crash fails that evaluation with the same error kinds as locally
(Timeout, LimitExceeded, WorkerCrashed) and the Dask worker itself carries on. Start and
progress go to the API server as Dask events on the server's topic
(``Worker.log_event`` / ``Client.subscribe_topic``); the outcome is the task's result.

A Dask worker needs nothing but ``pip install 'coldseam[cluster]'``: this module is imported
by reference when the first task arrives.
"""

from __future__ import annotations

import logging
import multiprocessing
import threading
import time
from typing import Any

from coldseam.api.slot import Job, Outcome, WorkerSlot
from coldseam.api.store import _compact, pack_field

log = logging.getLogger(__name__)

_local = threading.local()  # one engine process per Dask worker thread
#: Seconds between two progress events of one evaluation (stage changes included).
PROGRESS_INTERVAL = 0.5


def evaluate_on_worker(key: str, token: str, request: dict[str, Any],
                       config: dict[str, Any]) -> dict[str, Any]:
    """Evaluate ``request`` in this worker thread's engine process; the Outcome as a dict.

    ``config``: engine (spec), timeout (s), memory_limit (bytes, 0: none), start_method,
    topic (where start and progress events go).
    """
    from distributed import get_worker

    worker = get_worker()

    def send(kind: str, **fields: Any) -> None:
        worker.log_event(config["topic"], {"key": key, "token": token, "kind": kind, **fields})

    last = [0.0]

    def progress(job: Job, stage: str, fraction: float) -> None:
        # every event passes through the single-threaded scheduler: a few per evaluation
        now = time.monotonic()
        if now - last[0] >= PROGRESS_INTERVAL:
            last[0] = now
            send("progress", stage=stage, fraction=fraction)

    slot = _slot(config["engine"], config["memory_limit"], config["start_method"])
    job = Job(key=key, request=request, on_start=_nothing, on_progress=progress,
              on_finish=_nothing, label=token)
    send("start")
    outcome = slot.run(job, config["timeout"])
    try:  # packed here, on the worker: the API server only stores the bytes
        field = pack_field(outcome.field)
        _compact(outcome.result)
    except (TypeError, ValueError) as exc:
        return {"result": None, "field": None, "error": {
            "kind": "SolveFailed", "field": "", "message": f"the engine returned a result "
            f"that is not plain JSON ({exc}); this is an engine fault"}}
    return {"result": outcome.result, "field": field, "error": outcome.error}


def _slot(engine: str, memory_limit: int, start_method: str) -> WorkerSlot:
    """This thread's engine process slot, made anew when the server asks for other limits."""
    wanted = (engine, memory_limit, start_method)
    slot = getattr(_local, "slot", None)
    if slot is not None and _local.config == wanted:
        return slot
    if slot is not None:
        slot.kill()
    allow_children()
    ctx = multiprocessing.get_context(start_method)
    slot = WorkerSlot(ctx, engine, f"coldseam-engine-{threading.get_ident()}", memory_limit)
    _local.slot, _local.config = slot, wanted
    return slot


def allow_children() -> None:
    """Let this process start the engine process.

    A Dask nanny starts its worker as a daemonic process (``distributed.worker.daemon``), and
    multiprocessing refuses children to those; the engine processes are daemonic themselves
    and end with the worker, so the flag is lifted here (the same as starting the workers
    with ``DASK_DISTRIBUTED__WORKER__DAEMON=False``).
    """
    process = multiprocessing.current_process()
    if process.daemon:
        log.info("lifting the daemon flag of Dask worker process %s for the engine process",
                 process.name)
        process._config["daemon"] = False  # noqa: SLF001 - no public way once started


def _nothing(*_: Any) -> None:
    pass


def outcome_of(data: dict[str, Any]) -> Outcome:
    """The Outcome a task returned."""
    return Outcome(result=data.get("result"), field=data.get("field"), error=data.get("error"))
