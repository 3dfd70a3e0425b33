"""Reference answers: each section solved once with P2 on a very fine mesh, cached on disk.

Two fine solutions per section, both solved directly (no iterative tolerance enters):
- ``fine``: the engine's adaptive nested sequence continued to ``REF_MAX_NODES`` nodes (far
  beyond where its certificate stops); uncertainty: the change over its last doubling.
- ``uniform``: the finest of the older, independent sequence (gmsh mesh graded towards the
  junction vertices, then uniform splits) below ``REF_MAX_NODES``; uncertainty: the change from
  the previous level of the same family (a quarter of the cell size). It is kept to cross-check
  the adaptive reference by a method that shares none of its refinement decisions:
  ``cross_check`` is their difference.
Case 1 has an analytical solution: its probe reference is the series, exact.
"""

from __future__ import annotations

import hashlib
import json
import logging
import time
from pathlib import Path

import numpy as np
from sections import CASE_1_PROBES, case_1_series

log = logging.getLogger(__name__)
CACHE = Path(__file__).resolve().parent / "cache"
REF_MAX_NODES = 120_000
VERSION = 2


def figures(model, solution) -> dict:
    """The compared quantities of one solved level (design run; P2 or P1 alike)."""
    from coldseam.thermal import results

    run = solution.design
    out: dict = {"nodes": int(solution.mesh.nodes), "dofs": int(solution.space.dofs)}
    interior = np.flatnonzero(model.env_interior)
    out["heat_flow"] = float(run.heat_flows[interior].sum()) if len(interior) else None
    coupling = run.coupling
    out["L2D"] = float(0.5 * (coupling[0, 1] + coupling[1, 0])) if len(coupling) == 2 else None
    surfaces = results.surface_block(model, solution)
    mins = [surfaces[model.env_ids[k]]["min_temperature"] for k in interior]
    out["theta_si_min"] = float(min(mins)) if mins else None
    out["probes"] = results.probe_block(model, solution)
    return out


def _solve_direct(model, mesh, probes):
    """A level solved with SuperLU whatever its size (the reference must not iterate)."""
    from coldseam.fem import solvers
    from coldseam.thermal.solve import solve_level

    limit = solvers.DIRECT_LIMIT
    solvers.DIRECT_LIMIT = 10**9
    try:
        return solve_level(model, mesh, probes, 2)
    finally:
        solvers.DIRECT_LIMIT = limit


def _uniform(model) -> tuple[dict, dict]:
    from coldseam.thermal.levels import mesh_levels

    meshes = []
    for mesh, probes in mesh_levels(model.classified):
        if mesh.nodes > REF_MAX_NODES:
            break
        meshes.append((mesh, probes))
    return (figures(model, _solve_direct(model, *meshes[-1])),
            figures(model, _solve_direct(model, *meshes[-3])))


def _adaptive(model) -> tuple[dict, dict]:
    from coldseam.thermal.levels import first_level, next_level
    from coldseam.thermal.solve import error_indicators

    mesh, probes = first_level(model.classified)
    solved = []
    while mesh.nodes <= REF_MAX_NODES:
        solution = _solve_direct(model, mesh, probes)
        solved.append(figures(model, solution))
        mesh = next_level(mesh, error_indicators(model, solution), 2)
    return solved[-1], solved[-2]


def _uncertainty(fine: dict, previous: dict) -> dict:
    return {k: (abs(fine[k] - previous[k]) if fine[k] is not None else None)
            for k in ("heat_flow", "L2D", "theta_si_min")}


def compute(request: dict) -> dict:
    from coldseam.schema import parse_request
    from coldseam.thermal.model import prepare

    model = prepare(parse_request(request))
    start = time.perf_counter()
    fine, previous = _adaptive(model)
    uniform, uniform_previous = _uniform(model)
    out = {"fine": fine, "previous_level": previous, "max_nodes": REF_MAX_NODES,
           "uncertainty": _uncertainty(fine, previous),
           "uniform": uniform, "uniform_uncertainty": _uncertainty(uniform, uniform_previous),
           "cross_check": _uncertainty(fine, uniform),
           "seconds": time.perf_counter() - start}
    if request["section"].get("name") == "ISO 10211 Case 1":
        out["fine"]["probes"] = {f"r{r}c{c}": case_1_series(c / 8, 1 - r / 8)
                                 for r, c in CASE_1_PROBES}
        out["analytic_probes"] = True
    return out


def key(request: dict) -> str:
    text = json.dumps(request, sort_keys=True) + f"|{VERSION}"
    return hashlib.sha256(text.encode()).hexdigest()[:20]


def reference(name: str, request: dict) -> dict:
    """The cached reference of ``request`` (computed and stored on first use)."""
    CACHE.mkdir(exist_ok=True)
    path = CACHE / f"ref-{name.replace(':', '_')}-{key(request)}.json"
    if path.exists():
        return json.loads(path.read_text())
    log.info("computing the reference for %s (once)", name)
    out = compute(request)
    path.write_text(json.dumps(out, indent=1))
    return out


def errors(result: dict, ref: dict) -> dict:
    """Absolute errors of figures ``result`` (see ``figures``) against a reference."""
    fine = ref["fine"]
    out = {}
    for k in ("heat_flow", "L2D", "theta_si_min"):
        # Case 1 (known temperatures meeting at corners): the heat flow diverges with
        # refinement and θsi is fixed; only its probe temperatures are compared.
        ok = (result.get(k) is not None and fine.get(k) is not None
              and not ref.get("analytic_probes"))
        out[k] = abs(result[k] - fine[k]) if ok else None
    if fine["probes"] and result.get("probes"):
        out["probes"] = max(abs(result["probes"][p] - v) for p, v in fine["probes"].items())
    else:
        out["probes"] = None
    return out
