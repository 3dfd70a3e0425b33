"""Scaling of one level from 1e4 to 1e6 nodes: time and peak memory per stage.

Each size runs in its own process, so peak memory is that size's alone; one size alone:
``python bench/scaling.py --element P1 --nodes 1e6`` (prints one JSON line; the older
positional form ``python bench/scaling.py NODES ORDER`` still works). The section is the large
synthetic facade; the level is a gmsh mesh of the engine's size plan, scaled so that uniform splits (as the engine refines) reach NODES.
Stages: geometry, meshing (plan, gmsh, splits), solve_level (assembly of both runs,
factorisation or AMG, the design and condensation unit solves), post-processing (figures,
result blocks with the adjoint sensitivities, field document). Peak memory per stage is the
resident high-water mark (VmHWM, reset before each stage); CPU time (all threads) is given
beside wall time, with the load average at the start.
"""

from __future__ import annotations

import argparse
import json
import math
import os
import subprocess
import sys
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent


def _hwm_reset() -> None:
    Path("/proc/self/clear_refs").write_text("5")


def _hwm() -> float:
    for line in Path("/proc/self/status").read_text().splitlines():
        if line.startswith("VmHWM:"):
            return int(line.split()[1]) / 1024**2  # GiB
    return float("nan")


def _level_factor(classified, nodes: int) -> tuple[float, int]:
    """Size factor and number of splits giving about ``nodes`` nodes (measured, untimed)."""
    from coldseam.meshing.gmsh_mesher import triangulate
    from coldseam.meshing.sizes import plan

    mesh, _ = triangulate(classified, plan(classified, 1.0))
    splits = max(0, int(math.floor(math.log(nodes / (2 * mesh.nodes), 4))))
    factor = math.sqrt(nodes / (mesh.nodes * 4**splits))
    probe, _ = triangulate(classified, plan(classified, factor))  # nodes grow below factor²
    return factor * math.sqrt(nodes / (probe.nodes * 4**splits)), splits


def _mesh(classified, factor: float, splits: int):
    """A gmsh level of the engine's size plan at ``factor``, then uniform splits."""
    from coldseam.fem.mesh import refine_uniform
    from coldseam.meshing.gmsh_mesher import triangulate
    from coldseam.meshing.sizes import plan

    mesh, probes = triangulate(classified, plan(classified, factor))
    for _ in range(splits):
        mesh = refine_uniform(mesh)
    return mesh, probes


def measure(nodes: int, order: int) -> dict:
    sys.path.insert(0, str(HERE))
    from sections import facade

    from coldseam.schema import parse_request
    from coldseam.thermal import evaluate as ev
    from coldseam.thermal.field import field_document
    from coldseam.thermal.model import prepare
    from coldseam.thermal.psi import flanking_values
    from coldseam.thermal.results import level_figures, psi_pair
    from coldseam.thermal.solve import solve_level

    out: dict = {"order": order, "load_at_start": os.getloadavg()[0]}
    request = parse_request({**facade(), "options": {"element": f"P{order}",
                                                    "max_nodes": 4_000_000}})
    stage = {}

    def timed(name, fn, *args):
        _hwm_reset()
        start, cpu = time.perf_counter(), time.process_time()
        value = fn(*args)
        stage[name] = {"seconds": time.perf_counter() - start,
                       "cpu_seconds": time.process_time() - cpu, "peak_gib": _hwm()}
        return value

    model = timed("geometry", prepare, request)
    factor, splits = _level_factor(model.classified, nodes)
    mesh, probes = timed("meshing", _mesh, model.classified, factor, splits)
    solution = timed("solve_level", solve_level, model, mesh, probes, order)

    def post():
        flanking, pair = flanking_values(model), psi_pair(model)
        figures = level_figures(model, solution, flanking, pair)
        ev._result(model, flanking, pair, [figures], solution, [])
        ev._release_solvers(solution)  # as evaluate does before the field document
        field_document(model, solution)
    timed("post-processing", post)
    out.update(nodes=mesh.nodes, dofs=solution.space.dofs, stages=stage,
               seconds=sum(s["seconds"] for s in stage.values()),
               cpu_seconds=sum(s["cpu_seconds"] for s in stage.values()),
               peak_gib=max(s["peak_gib"] for s in stage.values()))
    return out


def run(sizes: list[int], orders: list[int], timeout: float) -> list[dict]:
    rows = []
    for order in orders:
        for nodes in sizes:
            try:
                done = subprocess.run([sys.executable, str(HERE / "scaling.py"), str(nodes),
                                       str(order)], capture_output=True, text=True,
                                      timeout=timeout, check=False)
                row = (json.loads(done.stdout.strip().splitlines()[-1]) if done.returncode == 0
                       else {"error": done.stderr.strip().splitlines()[-1:]})
            except subprocess.TimeoutExpired:
                row = {"error": f"over {timeout:.0f} s"}
            rows.append({"target_nodes": nodes, "order": order, **row})
    return rows


def exponent(rows: list[dict], key=lambda r: r["seconds"]) -> float | None:
    """Least-squares slope of log(key) against log(nodes)."""
    import numpy as np

    good = [r for r in rows if "error" not in r]
    if len(good) < 2:
        return None
    x = np.log([r["nodes"] for r in good])
    y = np.log([max(key(r), 1e-6) for r in good])
    return float(np.polyfit(x, y, 1)[0])


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description="one level of the facade at one size")
    parser.add_argument("size", nargs="*", help="NODES ORDER (older form)")
    parser.add_argument("--element", choices=("P1", "P2"), default="P1")
    parser.add_argument("--nodes", type=float, default=1e6, help="target nodes, e.g. 1e6")
    args = parser.parse_args(argv)
    if args.size:
        nodes, order = int(float(args.size[0])), int(args.size[1])
    else:
        nodes, order = int(args.nodes), int(args.element[1])
    print(json.dumps(measure(nodes, order)))
    return 0


if __name__ == "__main__":
    sys.exit(main())
