"""Batch throughput: ``python bench/batches.py [--quick]``.

A 100-item template grid (floor_slab, 10 insulation thicknesses × 10 slab thicknesses; 20
with --quick) run through the service's own batch machinery on its embedded default (SQLite
store, local worker processes, the batch runner), once with 1 worker and once with 2, each on a
fresh data folder (nothing cached). The workers are warmed up first with items outside the
grid, so that start-up is not counted. Prints items/s of each, their ratio, and the share of
the time the workers were running an evaluation (sampled every 10 ms: how well the batch
runner keeps them fed, whatever else the machine is doing); the target is ≥ 1.8× with 2
workers on 2 cores (both workers kept busy). On a machine busy with other work the ratio says
more about that work than about Coldseam: read the busy share beside it.
"""

from __future__ import annotations

import argparse
import itertools
import json
import logging
import os
import sys
import tempfile
import time
from pathlib import Path

log = logging.getLogger("bench.batches")


def grid(quick: bool) -> dict:
    insulation = list(range(100, 300, 40 if quick else 20))  # 5 or 10 values
    slabs = list(range(200, 300, 25 if quick else 10))  # 4 or 10 values
    return {"grid": {"template": "floor_slab", "length": 1.0,
                     "parameters": {"insulation_thickness": insulation,
                                    "slab_thickness": slabs}}}


def warm_up(workers: int) -> dict:
    return {"items": [{"id": f"warm {n}", "template": "wall_corner",
                       "parameters": {"insulation_thickness": 50 + n}} for n in range(workers)]}


def run(workers: int, document: dict) -> dict:
    """Seconds and items/s of ``document`` on ``workers`` fresh local workers."""
    from coldseam.api.batch_runner import BatchRunner
    from coldseam.api.jobs import Evaluations
    from coldseam.api.pool import WorkerPool
    from coldseam.api.store import Store
    from coldseam.batches.spec import parse_batch
    from coldseam.settings import Settings

    with tempfile.TemporaryDirectory(prefix="coldseam-bench-") as folder:
        settings = Settings(data_dir=Path(folder), workers=workers)
        store = Store(settings.database_path)
        pool = WorkerPool(workers, settings.queue_size, settings.engine,
                          settings.evaluation_timeout, settings.worker_start_method, True,
                          settings.worker_memory_mb * 2**20)
        pool.start()
        runner = BatchRunner(Evaluations(store, pool), settings)
        runner.start()
        try:
            finish(runner, store, parse_batch(warm_up(workers), 10))
            spec = parse_batch(document, settings.max_batch_items)
            started = time.perf_counter()
            samples: list[int] = []
            done = finish(runner, store, spec, samples)
            seconds = time.perf_counter() - started
        finally:
            runner.stop()
            pool.shutdown()
            store.close()
    items = len(spec.items)
    assert done["counts"]["done"] == items, done["counts"]
    busy = sum(samples) / (len(samples) * workers) if samples else 0.0
    return {"workers": workers, "items": items, "seconds": seconds,
            "items_per_second": items / seconds, "busy": busy}


def finish(runner, store, spec, samples: list[int] | None = None) -> dict:
    """Create the batch of ``spec`` and wait for it; ``samples`` gets, every 10 ms, how many
    evaluations a worker is running (the share of busy workers). The batch document itself is
    read every 0.2 s only, as a polling client would: this bench first read it every 10 ms,
    which loaded the very process it measures."""
    from coldseam.api.batch_view import batch_document
    from coldseam.api.store import storage_key

    key = storage_key("", runner.create("", spec))
    for tick in itertools.count():
        if tick % 20 == 0:  # the batch's state every 0.2 s, as a client polling would read it
            document = batch_document(runner.evaluations, key, store.batch(key), limit=0)
            if document["status"] in ("done", "failed"):
                return document
        if samples is not None:
            samples.append(running(runner.evaluations))
        time.sleep(0.01)
    raise AssertionError("unreachable")


def running(evaluations) -> int:
    """Workers evaluating right now (an outcome being stored no longer counts: the worker
    is free for the next item by then)."""
    return evaluations.pool.running


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="20 items instead of 100")
    parser.add_argument("--engine", help="another engine ('module:function'), e.g. a stand-in "
                        "that does nothing, to measure the batch machinery alone")
    args = parser.parse_args()
    logging.basicConfig(level=logging.WARNING)
    if args.engine:
        os.environ["COLDSEAM_ENGINE"] = args.engine
    document = grid(args.quick)
    one, two = run(1, document), run(2, document)
    ratio = two["items_per_second"] / one["items_per_second"]
    print(f"cores: {os.cpu_count()}, load average before: {os.getloadavg()[0]:.2f}")
    for row in (one, two):
        print(f"{row['workers']} worker(s): {row['items']} items in {row['seconds']:.2f} s, "
              f"{row['items_per_second']:.2f} items/s, workers busy {row['busy']:.0%} of "
              "the time")
    print(f"2 workers / 1 worker: {ratio:.2f}× (target ≥ 1.8×)")
    print(json.dumps({"one": one, "two": two, "ratio": ratio}))
    return 0


if __name__ == "__main__":
    sys.exit(main())
