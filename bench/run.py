"""Coldseam speed benchmark: ``python bench/run.py [--quick] [--skip service,scaling,...]``.

Runs, in one process (scaling sizes and the service in their own processes):
1. Coldseam end to end, warm, on every benchmark section: time to the certified result, split
   into stages, nodes/dofs, errors against a cached fine P2 reference (bench/cache/);
2. the peer pipeline (bench/peer.py) refined until it is as accurate, and the ratio;
3. scaling of one level from 1e4 to 1e6 nodes (time and peak memory per stage);
4. the service (p50/p95, throughput at 1, 4, 16 clients) and the CLI cold start.
Prints the tables, writes bench/results/<time>.json and bench/latest.md.
"""

from __future__ import annotations

import argparse
import json
import logging
import os
import platform
import sys
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

import compare  # noqa: E402
import report  # noqa: E402
import scaling  # noqa: E402
from reference import reference  # noqa: E402
from sections import benchmark_sections  # noqa: E402

import service  # noqa: E402

PARTS = ("sections", "scaling", "service", "cli")


def machine() -> dict:
    model = next((line.split(":", 1)[1].strip() for line in
                  Path("/proc/cpuinfo").read_text().splitlines()
                  if line.startswith("model name")), platform.processor())
    return {"cpu": model, "cores": os.cpu_count(), "python": platform.python_version(),
            "date": time.strftime("%Y-%m-%d %H:%M UTC", time.gmtime()),
            "load_at_start": os.getloadavg()[0]}


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="fewer repeats and sizes")
    parser.add_argument("--skip", default="", help=f"comma-separated parts of {PARTS}")
    parser.add_argument("--only", default="", help="comma-separated section names")
    parser.add_argument("--report", metavar="JSON", help="only rewrite bench/latest.md from a "
                        "results file")
    args = parser.parse_args(argv)
    if args.report:
        write_report(json.loads(Path(args.report).read_text()))
        return 0
    logging.basicConfig(level=logging.INFO, format="%(message)s")
    logging.getLogger("skfem").setLevel(logging.WARNING)
    skip = set(filter(None, args.skip.split(",")))
    out: dict = {"machine": machine(), "quick": args.quick}
    if "sections" not in skip:
        out["sections"] = run_sections(args.quick, set(filter(None, args.only.split(","))))
    if "scaling" not in skip:
        sizes = [10_000, 30_000, 100_000] if args.quick else [10_000, 30_000, 100_000,
                                                              300_000, 1_000_000]
        rows = scaling.run(sizes, [2, 1], timeout=240)
        out["scaling"] = {"rows": rows, "exponent": {
            f"P{order}": scaling.exponent([r for r in rows if r["order"] == order])
            for order in (1, 2)}}
    if "service" not in skip:
        counts = {1: 7, 4: 14, 16: 16} if args.quick else {1: 14, 4: 28, 16: 32}
        out["service"] = service.service(counts)
    if "cli" not in skip:
        out["cli"] = service.cli_cold_start(3 if args.quick else 5)
    out["machine"]["load_at_end"] = os.getloadavg()[0]
    (HERE / "results").mkdir(exist_ok=True)
    stamp = time.strftime("%Y%m%d-%H%M%S")
    (HERE / "results" / f"{stamp}.json").write_text(json.dumps(out, indent=1))
    if args.only:
        print(report.markdown(out))
    else:
        write_report(out)
    return 0


def write_report(data: dict) -> None:
    """bench/latest.md: the tables and targets, then bench/notes.md (the analysis) verbatim."""
    notes = HERE / "notes.md"
    text = report.markdown(data, notes.read_text() if notes.exists() else "")
    print(text)
    (HERE / "latest.md").write_text(text)


#: Seconds the peer's next run may be predicted to take before its halving stops (30 s unless
#: named): the facade's Coldseam time is ~2 s, so settling "≥ 5×" needs peer runs past 10 s,
#: and its next halving after 200k nodes is predicted at ~35 s.
PEER_BUDGET = {"facade": 150}


def run_sections(quick: bool, only: set[str]) -> list[dict]:
    rows = []
    for name, request in benchmark_sections(quick).items():
        if only and name not in only:
            continue
        logging.info("section %s", name)
        ref = reference(name, request)
        budget = 20 if quick else PEER_BUDGET.get(name, 30)
        rows.append(compare.section(name, request, ref, repeats=3 if quick else 5,
                                    peer_budget=budget))
    return rows


if __name__ == "__main__":
    sys.exit(main())
