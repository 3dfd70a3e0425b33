"""Coldseam end to end in a warm process: wall and CPU time, stage split, figures."""

from __future__ import annotations

import statistics
import time

from stages import instrumented, split


def figures_from_result(result: dict) -> dict:
    """The compared quantities (see reference.figures) read off a result document."""
    interior = [k for k, s in result["surfaces"].items() if s["side"] == "interior"]
    flows = result["heat_flows"]
    return {
        "nodes": result["mesh"]["nodes"], "dofs": result["mesh"]["dofs"],
        "heat_flow": sum(flows[k] for k in interior)
        if interior and all(flows[k] is not None for k in interior) else None,  # None: singular
        "L2D": result.get("L2D"),
        "theta_si_min": min(result["surfaces"][k]["min_temperature"] for k in interior)
        if interior else None,
        "probes": result.get("probes") or {},
    }


def run(request: dict, repeats: int) -> dict:
    """Evaluate ``request`` ``repeats`` times after one warm-up; the median run's figures."""
    from coldseam.schema import parse_request
    from coldseam.thermal.evaluate import evaluate

    parsed = parse_request(request)
    evaluate(parsed)
    samples = []
    with instrumented() as clock:
        for _ in range(repeats):
            clock.reset()
            wall, cpu = time.perf_counter(), time.process_time()
            evaluation = evaluate(parsed)
            wall, cpu = time.perf_counter() - wall, time.process_time() - cpu
            samples.append({"wall": wall, "cpu": cpu, "stages": split(clock, wall)})
    samples.sort(key=lambda s: s["wall"])
    median = samples[len(samples) // 2]
    result = evaluation.result
    mesh = result["mesh"]
    return {
        "wall_median": median["wall"], "wall_min": samples[0]["wall"],
        "cpu_median": statistics.median(s["cpu"] for s in samples),
        "stages": median["stages"], "figures": figures_from_result(result),
        "levels": [level["nodes"] for level in mesh["levels"]],
        "target_met": mesh["target_met"], "psi": (result.get("psi") or {}).get("value"),
        "condensation": result.get("condensation") is not None,
    }
