"""Time of the geometry checks against the vertices of a section:
``python bench/geometry_checks.py [n ...]`` (default n = 500, 1000, 2000, 5000).

The section is a wall whose exterior face is a wavy line of n vertices, exposed along a
boundary path through all of them, whose straight interior face is exposed along a path of n
points, with an inclusion of n vertices and n/50 small square inserts: every check that walks the outline, the paths, the probes and the regions has n-sized
work. Prints a table: the request parsed (pydantic validators), the planar partition
(painting, slivers, near misses), the outline classified (paths split and matched, probes,
connectivity), the size plan the node estimate needs, and the estimate itself, in seconds.
"""

from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "service"))
sys.path.insert(0, str(ROOT / "tests"))

from sections import wavy_wall  # noqa: E402

from coldseam.geometry.outline import classify  # noqa: E402
from coldseam.geometry.partition import build_partition  # noqa: E402
from coldseam.meshing.estimate import estimate_nodes  # noqa: E402
from coldseam.meshing.sizes import plan  # noqa: E402
from coldseam.schema import parse_request  # noqa: E402
from coldseam.thermal.model import prepare  # noqa: E402


def timed(function, *args):
    started = time.perf_counter()
    value = function(*args)
    return value, time.perf_counter() - started


def measure(n: int) -> dict:
    request = {"section": wavy_wall(n)}
    parsed, t_parse = timed(parse_request, request)
    partition, t_partition = timed(build_partition, parsed.section)
    _, t_classify = timed(classify, parsed.section, partition)
    classified = prepare(parsed).classified
    level, t_plan = timed(plan, classified, 1.0)
    _, t_estimate = timed(estimate_nodes, classified, level)
    return {"n": n, "parse": t_parse, "partition": t_partition, "classify": t_classify,
            "plan": t_plan, "estimate": t_estimate}


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("n", nargs="*", type=int, default=[500, 1000, 2000, 5000])
    args = parser.parse_args()
    columns = ["n", "parse", "partition", "classify", "plan", "estimate"]
    print("| " + " | ".join(columns) + " |")
    print("|" + "---|" * len(columns))
    for n in args.n:
        row = measure(n)
        print("| " + " | ".join(f"{row[c]}" if c == "n" else f"{row[c]:.3f}" for c in columns)
              + " |", flush=True)


if __name__ == "__main__":
    main()
