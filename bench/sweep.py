"""Sweep of the level-0 size constants (sizes.H_MAX, H_JUNCTION, GROWTH, THIN_ASPECT) and of the
node growth per adaptive level (levels.LEVEL_GROWTH): for each setting and every benchmark
section, the CPU time to the certificate (less disturbed by other jobs than wall time), whether
it was met, and the errors against the cached references. ``python bench/sweep.py [--quick]``;
prints one table.

Used to choose the constants by measurement across section types, never against one test.
"""

from __future__ import annotations

import argparse
import itertools
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

from engine import figures_from_result  # noqa: E402
from reference import errors, reference  # noqa: E402
from sections import benchmark_sections  # noqa: E402

GRID = {"H_MAX": [1 / 6, 1 / 4], "H_JUNCTION": [1 / 8, 1 / 4], "GROWTH": [0.5],
        "THIN_ASPECT": [12.0, 24.0], "LEVEL_GROWTH": [2.0, 3.0]}


def measure(parsed, ref) -> dict:
    from coldseam.thermal.evaluate import evaluate

    evaluate(parsed)
    start = time.process_time()
    result = evaluate(parsed).result
    seconds = time.process_time() - start
    err = errors(figures_from_result(result), ref)
    return {"seconds": seconds, "met": result["mesh"]["target_met"],
            "nodes": result["mesh"]["nodes"], "flow": err["heat_flow"],
            "theta": err["theta_si_min"], "probes": err["probes"]}


def main() -> int:
    parser = argparse.ArgumentParser()
    parser.add_argument("--quick", action="store_true")
    args = parser.parse_args()
    from coldseam.meshing import sizes
    from coldseam.schema import parse_request
    from coldseam.thermal import levels

    cases = [(n, parse_request(r), reference(n, r))
             for n, r in benchmark_sections(True).items() if n != "facade" or not args.quick]
    print("| H_MAX | H_JUNCTION | GROWTH | THIN_ASPECT | LEVEL_GROWTH | section | CPU s | met | "
          "nodes | err Φ W/m | err θ K |")
    print("|---|---|---|---|---|---|---|---|---|---|---|")
    for h_max, h_junction, growth, thin, level_growth in itertools.product(*GRID.values()):
        sizes.H_MAX, sizes.H_JUNCTION, sizes.GROWTH = h_max, h_junction, growth
        sizes.THIN_ASPECT, levels.LEVEL_GROWTH = thin, level_growth
        setting = f"| {h_max:.3g} | {h_junction:.3g} | {growth} | {thin:g} | {level_growth:g} |"
        total, unmet = 0.0, 0
        for name, parsed, ref in cases:
            m = measure(parsed, ref)
            total += m["seconds"]
            unmet += not m["met"]
            print(f"{setting} {name} | {m['seconds']:.3f} | {m['met']} | {m['nodes']} | "
                  f"{m['flow'] or 0:.1e} | {m['theta'] or 0:.1e} |", flush=True)
        print(f"{setting} **all** | {total:.2f} | {unmet} unmet | | | |", flush=True)
    return 0


if __name__ == "__main__":
    sys.exit(main())
