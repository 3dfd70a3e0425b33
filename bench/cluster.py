"""Throughput of evaluations on a Dask cluster with 1 and 2 workers, and the database's cost of
one result: the numbers behind docs/deploy.md's 100-machine arithmetic.

Starts everything itself, on loopback: a PostgreSQL server (Debian's package, initdb in a
temporary folder), a Dask scheduler with N single-threaded ``dask worker`` processes, and one
``coldseam serve`` with COLDSEAM_CLUSTER and COLDSEAM_DATABASE_URL. The work is a parameter
study of the wall_corner template (insulation thickness varied: each variant a distinct
request), the real engine, posted as one batch (``POST /api/v1/batches``) and followed until
done.
Each worker first evaluates one variant that is not timed (its engine process starts and
warms up). CPU time per evaluation of each part (API server, PostgreSQL, Dask workers with
their engine processes, scheduler) is read from /proc, less what that part spends idle
(measured for 3 s before). Then the store alone: queue, mark running and finish of one real result, repeated.

    python bench/cluster.py --quick       # 6 variants, each worker count once (a minute)
    python bench/cluster.py --variants 40  # 40 variants, each worker count twice (1, 2, 2, 1)

Prints one JSON document. On a shared machine the figures are what this machine gave at that
moment: give its load average beside them.
"""

from __future__ import annotations

import argparse
import json
import logging
import os
import statistics
import sys
import tempfile
import time
from pathlib import Path

REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO / "tests" / "scaleout"))
sys.path.insert(0, str(REPO / "service"))

from scaleout_support import dask_cluster, postgres, serve  # noqa: E402

from coldseam.templates import build  # noqa: E402

log = logging.getLogger("bench.cluster")


def variants(count: int, start: int) -> dict:
    """A batch of ``count`` wall-corner variants differing in insulation thickness (20 mm
    and 0.5 mm steps), each a distinct request."""
    return {"name": f"bench {start}", "items": [
        {"id": f"V{start + i}", "template": "wall_corner",
         "parameters": {"insulation_thickness": 20 + 0.5 * (start + i)}}
        for i in range(count)]}


def run_study(client, batch: dict) -> float:
    """Seconds from posting ``batch`` until every item is done (one look every 0.2 s)."""
    started = time.perf_counter()
    posted = client.post("/api/v1/batches", json=batch)
    posted.raise_for_status()
    location = posted.headers["Location"]
    while True:
        time.sleep(0.2)
        state = client.get(location, params={"limit": 1}).json()
        if state["status"] in ("done", "failed"):
            if state["counts"]["failed"]:
                raise RuntimeError(f"items failed: {state['counts']}")
            return time.perf_counter() - started


_TICK = os.sysconf("SC_CLK_TCK")
IDLE_SECONDS = 3.0


def cpu_seconds(root: int, depth: int | None = None) -> float:
    """User and system CPU time of process ``root`` and its live descendants (only those
    ``depth`` generations below it, when given)."""
    total, stack = 0.0, [(root, 0)]
    while stack:
        pid, level = stack.pop()
        try:
            fields = Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()
            if depth is None or level == depth:
                total += (int(fields[11]) + int(fields[12])) / _TICK
            for task in os.listdir(f"/proc/{pid}/task"):
                stack += [(int(c), level + 1) for c in
                          Path(f"/proc/{pid}/task/{task}/children").read_text().split()]
        except (OSError, ValueError):
            continue
    return total


def part_cpu(parts: dict[str, int]) -> dict[str, float]:
    """CPU seconds of each part; the Dask workers also split into the nanny, the worker
    processes and their engine processes."""
    cpu = {name: cpu_seconds(pid) for name, pid in parts.items()}
    root = parts["dask_workers"]
    for name, depth in (("dask_nanny", 0), ("dask_worker_processes", 1),
                        ("engine_processes", 2)):
        cpu[name] = cpu_seconds(root, depth)
    return cpu


def postmaster(pg) -> int:
    return int((pg.data / "postmaster.pid").read_text().split()[0])


def cluster_throughput(pg, workers: int, count: int, folder: Path, offset: int) -> dict:
    url = pg.new_database()
    with dask_cluster(folder / f"dask-{workers}.log", workers) as cluster, \
         serve(folder / f"server-{workers}.log", f"bench{workers}", database_url=url,
               cluster=cluster.address, queue_size="1000") as server, server.client() as client:
        run_study(client, variants(workers, offset))  # warm-up: one per worker
        parts = {"api_server": server.process.pid, "postgres": postmaster(pg),
                 "dask_workers": cluster.workers[0].pid, "dask_scheduler": cluster.scheduler.pid}
        idle = part_cpu(parts)
        time.sleep(IDLE_SECONDS)  # what each part spends doing nothing (heartbeats, polls)
        before = part_cpu(parts)
        idle = {name: (before[name] - idle[name]) / IDLE_SECONDS for name in before}
        seconds = run_study(client, variants(count, offset + workers))
        after = part_cpu(parts)
        cpu = {name: round((after[name] - before[name] - idle[name] * seconds) / count, 4)
               for name in after}
    return {"workers": workers, "evaluations": count, "seconds": round(seconds, 2),
            "per_second": round(count / seconds, 3),
            "per_worker_per_second": round(count / seconds / workers, 3),
            "cpu_seconds_per_evaluation": cpu,
            "idle_cpu_per_second": {name: round(rate, 4) for name, rate in idle.items()}}


def store_cost(pg, repeats: int) -> dict:
    """Mean wall time and database growth of storing one real result (queue, running,
    finish: three transactions, each committed to disk), the field packed beforehand as a
    cluster worker packs it; the packing timed apart."""
    import psycopg

    from coldseam.api.store import pack_field, storage_key
    from coldseam.api.store_pg import PostgresStore
    from coldseam.schema.evaluation import EvaluationRequest
    from coldseam.thermal.evaluate import evaluate

    evaluation = evaluate(EvaluationRequest.model_validate(build("wall_corner", {})), None)
    field_json = json.dumps(evaluation.field, separators=(",", ":"))
    packing = time.perf_counter()
    packed_field = pack_field(evaluation.field)  # as a cluster worker packs it
    packing = time.perf_counter() - packing
    packed = len(packed_field)
    url = pg.new_database()
    store = PostgresStore(url, "bench")
    started = time.perf_counter()
    for i in range(repeats):
        key = storage_key("", f"{i:032x}")
        store.queue(key, f"{i:032x}", "", "bench", json.dumps(build("wall_corner", {})))
        store.mark_running(key)
        store.finish(key, evaluation.result, packed_field, None)
    seconds = (time.perf_counter() - started) / repeats
    store.close()
    with psycopg.connect(url) as conn:
        size = conn.execute("SELECT pg_total_relation_size('evaluations')").fetchone()[0]
    return {"results": repeats, "ms_per_result": round(1000 * seconds, 2),
            "ms_packing_the_field_on_the_worker": round(1000 * packing, 2),
            "transactions_per_result": 3, "bytes_per_result": size // repeats,
            "field_json_bytes": len(field_json), "field_packed_bytes": packed,
            "result_json_bytes": len(json.dumps(evaluation.result))}


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--variants", type=int, default=20, help="timed evaluations per run")
    parser.add_argument("--quick", action="store_true", help="6 evaluations, one round")
    parser.add_argument("--rounds", type=int, default=2, help="runs of each worker count, "
                        "alternating (1, 2, 2, 1, ...), against a load that changes")
    args = parser.parse_args()
    count = 6 if args.quick else args.variants
    args.rounds = 1 if args.quick else max(1, args.rounds)
    logging.basicConfig(level=logging.INFO, format="%(message)s")
    report: dict = {"load_average_at_start": os.getloadavg(), "cpus": os.cpu_count()}
    with tempfile.TemporaryDirectory(prefix="coldseam-bench-") as tmp, postgres() as pg:
        folder = Path(tmp)
        order = [1, 2, 2, 1][:2 * args.rounds] if args.rounds <= 2 else [1, 2] * args.rounds
        report["runs"] = [cluster_throughput(pg, n, count, folder, 100 * i)
                          for i, n in enumerate(order)]
        rate = {n: statistics.mean(r["per_second"] for r in report["runs"] if r["workers"] == n)
                for n in (1, 2)}
        report["mean_per_second"] = {f"{n}_workers": round(v, 3) for n, v in rate.items()}
        report["ratio_2_to_1"] = round(rate[2] / rate[1], 2)
        report["store"] = store_cost(pg, 50 if args.quick else 200)
    report["load_average_at_end"] = os.getloadavg()
    print(json.dumps(report, indent=2))


if __name__ == "__main__":
    main()
