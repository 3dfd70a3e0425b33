"""The parts of the service path around one evaluation, each timed alone in this process:
what POST /api/v1/evaluations does besides the engine (bench/plain.py prints them)."""

from __future__ import annotations

import json
import pickle
import statistics
import tempfile
import threading
import time
from collections.abc import Callable
from multiprocessing import Pipe
from pathlib import Path


def _median(action: Callable[[], object], repeats: int) -> float:
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        action()
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def _through_pipe(message: object) -> Callable[[], object]:
    """Send ``message`` through a real pipe and receive it (the reader on a thread, as a
    worker and the server are two processes: a long message must not fill the pipe)."""
    parent, child = Pipe()
    got: list = []

    def once() -> object:
        reader = threading.Thread(target=lambda: got.append(parent.recv()))
        reader.start()
        child.send(message)
        reader.join()
        return got.pop()

    return once


def parts(request: dict, repeats: int = 100) -> dict[str, float]:
    from coldseam.api.evaluations import parse_checked, record_body
    from coldseam.api.store import Store
    from coldseam.api.worker import run_one
    from coldseam.schema.evaluation import EvaluationRequest, request_digest
    from coldseam.settings import Settings
    from coldseam.thermal.evaluate import evaluate

    text = json.dumps(request)
    settings = Settings()
    parsed = parse_checked(text, settings)
    dumped = parsed.model_dump(mode="json")
    reply = run_one(evaluate, dumped, lambda stage, fraction: None)  # as a worker answers
    _, result, field = reply
    out = {
        "validation (JSON, model, limits) and id": _median(
            lambda: request_digest(parse_checked(text, settings)), repeats),
        "request to the worker: dump, pipe, validate again": _median(
            lambda: EvaluationRequest.model_validate(_through_pipe(("run", dumped))()[1]),
            repeats),
        "answer from the worker through the pipe (result and field)": _median(
            _through_pipe(reply), repeats),
    }
    out["answer size (pickled result / field)"] = (  # type: ignore[assignment]
        len(pickle.dumps(result)), len(pickle.dumps(field)))
    with tempfile.TemporaryDirectory() as folder:
        store = Store(Path(folder) / "bench.sqlite")
        counter = iter(range(10**9))

        def write_all() -> None:
            key = f"k{next(counter)}"
            store.queue(key, key, "", "bench", text)
            store.mark_running(key)
            store.finish(key, result, field, None)

        out["store: queue, running, finish (3 transactions, synchronous=FULL)"] = _median(
            write_all, max(10, repeats // 3))
        store.queue("read", "read", "", "bench", text)
        store.finish("read", result, field, None)
        out["store read and the answer's JSON"] = _median(
            lambda: json.dumps(record_body(store.get("read"), None, "")), repeats)
        store.close()
    return out
