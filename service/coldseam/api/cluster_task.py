"""The task a Dask worker runs for one evaluation (no FastAPI here: this runs on the cluster).

A Dask worker runs the engine as the local pool does: in a child process of its own, in a
``WorkerSlot`` (one per task running, kept idle between tasks), with the same wall-time and resident-memory limits, so
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
import os
import threading
import time
from typing import Any

from coldseam.api.slot import Job, Outcome, WorkerSlot
from coldseam.api.store import _compact, pack_field

log = logging.getLogger(__name__)

#: Idle engine process slots of this Dask worker process (one is taken per task), and the
#: (engine, memory limit, start method) each was made for.
_idle: list[WorkerSlot] = []
_idle_lock = threading.Lock()
_made_for: dict[int, tuple[str, int, str]] = {}
#: Seconds between two progress events of one evaluation (stage changes included).
PROGRESS_INTERVAL = 0.5


def evaluate_on_worker(key: str, token: str, request: dict[str, Any],
                       config: dict[str, Any]) -> dict[str, Any]:
    """Evaluate ``request`` in an engine process of this Dask worker; the Outcome as a dict.

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

    slot = _take(_wanted(config))
    job = Job(key=key, request=request, on_start=_nothing, on_progress=progress,
              on_finish=_nothing, label=token)
    send("start")
    try:
        outcome = slot.run(job, config["timeout"])
    finally:
        _give_back(slot)
    try:  # packed here, on the worker: the API server only stores the bytes
        field = pack_field(outcome.field)
        _compact(outcome.result)
    except (TypeError, ValueError) as exc:
        return {"result": None, "field": None, "error": {
            "kind": "SolveFailed", "field": "", "message": f"the engine returned a result "
            f"that is not plain JSON ({exc}); this is an engine fault"}}
    return {"result": outcome.result, "field": field, "error": outcome.error}


def _wanted(config: dict[str, Any]) -> tuple[str, int, str]:
    return (config["engine"], config["memory_limit"], config["start_method"])


def _take(wanted: tuple[str, int, str]) -> WorkerSlot:
    """An idle engine process slot of this Dask worker process made for ``wanted`` (engine,
    memory limit, start method), or a new one; slots made for other limits are stopped."""
    stale = []
    with _idle_lock:
        while _idle:
            slot = _idle.pop()
            if _made_for.get(id(slot)) == wanted:
                break
            stale.append(slot)
        else:
            slot = None
    for old in stale:
        _made_for.pop(id(old), None)
        old.kill()
    if slot is None:
        allow_children()
        engine, memory_limit, start_method = wanted
        slot = WorkerSlot(multiprocessing.get_context(start_method), engine,
                          f"coldseam-engine-{os.getpid()}-{len(_made_for)}", memory_limit)
        _made_for[id(slot)] = wanted
    return slot


def _give_back(slot: WorkerSlot) -> None:
    with _idle_lock:
        _idle.append(slot)


def prestart(config: dict[str, Any], dask_worker: Any = None) -> int:
    """Start one engine process per thread of this Dask worker, in the background (run on
    each worker by ``Client.run``, which passes ``dask_worker``, when a server connects);
    how many it starts."""
    count = dask_worker.state.nthreads if dask_worker is not None else 1
    wanted = _wanted(config)

    def start() -> None:
        for slot in [_take(wanted) for _ in range(count)]:
            try:
                if slot.process is None:
                    slot.start()
            except (OSError, RuntimeError) as exc:  # the first task tries again
                log.warning("engine process could not be started: %s", exc)
            _give_back(slot)

    with _idle_lock:
        ready = sum(1 for slot in _idle if _made_for.get(id(slot)) == wanted)
    if ready >= count:
        return 0
    threading.Thread(target=start, name="coldseam-prestart", daemon=True).start()
    return count


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
