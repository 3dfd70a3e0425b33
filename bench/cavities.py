"""Cavity cost: a frame section with 20 air cavities against the same section with solids.

``python bench/cavities.py [--quick] [--repeats N]``

The frame is a PVC block (λ 0.17 W/(m·K)) with 5 × 4 square chambers; "solids" is the same
section with every chamber a solid of the λeq the cavity run reported (so both runs mesh and
solve the same problem). Prints the median wall time of each and their ratio (issue 13 asks
for at most 2×). Numbers live here, never in timed tests.
"""

from __future__ import annotations

import argparse
import copy
import logging
import statistics
import sys
import time

from coldseam.schema import parse_request
from coldseam.thermal.evaluate import evaluate

log = logging.getLogger("bench.cavities")


def frame(columns: int = 5, rows: int = 4, pitch: float = 20.0, wall: float = 4.0) -> dict:
    width, height = columns * pitch + wall, rows * pitch + wall
    regions = [{"material": "pvc", "polygon": [[0, 0], [width, 0], [width, height], [0, height]]}]
    side = pitch - wall
    for i in range(columns):
        for j in range(rows):
            x, y = wall + i * pitch, wall + j * pitch
            regions.append({"material": "air", "polygon": [[x, y], [x + side, y],
                                                           [x + side, y + side], [x, y + side]]})
    return {"section": {
        "unit": "mm", "materials": [{"id": "pvc", "conductivity": 0.17},
                                    {"id": "air", "cavity": {}}],
        "regions": regions,
        "environments": [{"id": "inside", "temperature": 20, "side": "interior"},
                         {"id": "outside", "temperature": 0, "side": "exterior"}],
        "boundaries": [
            {"environment": "outside", "surface_resistance": 0.04, "path": [[0, 0], [0, height]]},
            {"environment": "inside", "surface_resistance": 0.13,
             "path": [[width, 0], [width, height]]}]}}


def with_solids(request: dict, cavities: list[dict]) -> dict:
    solid = copy.deepcopy(request)
    section = solid["section"]
    section["materials"] = section["materials"][:1]
    for k, entry in enumerate(cavities):
        section["materials"].append({"id": f"c{k}", "conductivity":
                                     entry["equivalent_conductivity"]})
        section["regions"][entry["region"]]["material"] = f"c{k}"
    return solid


def timed(request: dict, repeats: int) -> tuple[float, dict]:
    times, result = [], {}
    for _ in range(repeats):
        start = time.perf_counter()
        result = evaluate(parse_request(request)).result
        times.append(time.perf_counter() - start)
    return statistics.median(times), result


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="3 repeats")
    parser.add_argument("--repeats", type=int, default=9)
    args = parser.parse_args(argv)
    logging.basicConfig(level=logging.INFO, format="%(message)s", stream=sys.stdout)
    repeats = 3 if args.quick else args.repeats
    request = frame()
    evaluate(parse_request(request))  # warm: imports, gmsh start
    cavity_time, result = timed(request, repeats)
    solid_time, solid = timed(with_solids(request, result["cavities"]), repeats)
    log.info("cavities: %d, nodes %d / %d, L2D %.9f / %.9f W/(m·K)", len(result["cavities"]),
             result["mesh"]["nodes"], solid["mesh"]["nodes"], result["L2D"], solid["L2D"])
    log.info("median of %d: with cavities %.3f s, with solids %.3f s, ratio %.2f (limit 2)",
             repeats, cavity_time, solid_time, cavity_time / solid_time)
    return 0


if __name__ == "__main__":
    sys.exit(main())
