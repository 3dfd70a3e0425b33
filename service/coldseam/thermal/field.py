"""The temperature field of the final level as compact arrays, for drawing.

``field_arrays`` keeps its large members (points, triangles, temperature, heat_flux,
material) as numpy arrays: they cross from a worker process to the server in one copy each
and are stored as binary (coldseam.api.fieldpack); ``plain`` turns them into the JSON lists
below, which is what ``field_document`` returns and what ``/field`` answers.

{"unit": "m", "points": [[x, y]], "triangles": [[a, b, c]] (linear sub-triangles; for P2
 above DRAWN_TRIANGLES the vertex triangles), "temperature": [θ] per point (design run),
 "heat_flux": [|q| W/m²] per triangle, "material": [k] per triangle, "materials": [{"id", "conductivity"}],
 "pieces": [{"material", "polygon", "holes"}], "boundaries": [{"environment", "side",
 "surface_resistance", "segments"}], "adiabatic": [segments],
 "min_surface": {env: {"temperature", "at"}}, "condensation_min": {...} | null,
 "cavities": [{"material", "region", "cavity", "width", "thickness", "heat_flow_direction",
 "equivalent_conductivity", "ventilation", "rings"}]} (a cavity's own materials entry also
 carries "cavity": the same fields without the rings)
"""

from __future__ import annotations

import gc
from collections.abc import Iterator
from contextlib import contextmanager

import numpy as np

from coldseam.fem.system import element_heat_flux
from coldseam.thermal.model import ThermalModel
from coldseam.thermal.results import interior_minimum
from coldseam.thermal.solve import LevelSolution

#: P2 triangle (vertices 0,1,2; sides 3=01, 4=12, 5=20) drawn as four linear triangles.
P2_SPLIT = np.array([[0, 3, 5], [3, 1, 4], [5, 4, 2], [3, 4, 5]])
#: Above this many drawn triangles a P2 field is drawn on its vertex triangles (exact vertex
#: temperatures, linear between them) instead of four sub-triangles each: as many triangles
#: as a P1 field at the service's node limit. At 1.03M nodes the split gave 8.3M triangles and
#: 4.1M points as Python lists (~2.3 GB, 6 s of ``tolist``).
DRAWN_TRIANGLES = 2_500_000


#: The members ``field_arrays`` leaves as numpy arrays.
ARRAYS = ("points", "triangles", "temperature", "heat_flux", "material")


def field_document(model: ThermalModel, solution: LevelSolution) -> dict:
    """The field with plain lists (JSON-able)."""
    return plain(field_arrays(model, solution))


def plain(field: dict) -> dict:
    """``field`` with its array members as lists (lists are left as they are)."""
    out = dict(field)
    with _no_cycle_collection():
        for name in ARRAYS:
            if isinstance(out.get(name), np.ndarray):
                out[name] = out[name].tolist()
    return out


def field_arrays(model: ThermalModel, solution: LevelSolution) -> dict:
    space, run = solution.space, solution.design
    theta = run.theta
    flux = np.linalg.norm(element_heat_flux(space, run.problem.conductivity, theta), axis=1)
    points = space.dof_points
    if space.order == 2 and len(P2_SPLIT) * space.mesh.elements <= DRAWN_TRIANGLES:
        triangles = space.cell_dofs[:, P2_SPLIT].reshape(-1, 3)
        repeat = len(P2_SPLIT)
    else:
        triangles, repeat = space.cell_dofs[:, :3], 1  # vertices are the first dofs
        points, theta = points[:space.mesh.nodes], theta[:space.mesh.nodes]
    part = model.classified.partition
    return {
        "unit": "m",
        "points": np.round(points, 7),
        "triangles": triangles.astype(np.int32),
        "temperature": np.round(theta, 4),
        "heat_flux": np.round(np.repeat(flux, repeat), 3),
        "material": np.repeat(space.mesh.material, repeat).astype(np.int32),
        "materials": _materials(model),
        "cavities": [_cavity(c) for c in model.cavities],
        "pieces": [{"material": model.materials[k].id,
                    "polygon": np.round(poly.exterior.coords, 7).tolist(),
                    "holes": [np.round(r.coords, 7).tolist() for r in poly.interiors]}
                   for k, poly in part.pieces],
        "boundaries": _boundaries(model),
        "adiabatic": [part.points[list(s)].round(7).tolist() for s in model.classified.adiabatic],
        "min_surface": {env: {"temperature": block["min_temperature"], "at": block["at"]}
                        for env, block in _surface_minima(model, solution).items()},
        "condensation_min": _condensation_min(model, solution),
    }


def _materials(model: ThermalModel) -> list[dict]:
    """Each material entry the triangles index; a cavity's own entry says which cavity."""
    by_index = {c["material_index"]: c for c in model.cavities if "material_index" in c}
    out = []
    for k, m in enumerate(model.materials):
        entry = {"id": m.id, "conductivity": list(m.conductivity)}
        if k in by_index:
            entry["cavity"] = _cavity(by_index[k], rings=False)
        out.append(entry)
    return out


def _cavity(c: dict, rings: bool = True) -> dict:
    """A cavity for drawing: its result fields and (with ``rings``) its outline, metres."""
    keys = ("material", "region", "cavity", "width", "thickness", "heat_flow_direction",
            "equivalent_conductivity", "ventilation", "exposed_to")
    out = {k: c[k] for k in keys if k in c}
    if rings:
        out["rings"] = c["_rings"]
    return out


@contextmanager
def _no_cycle_collection() -> Iterator[None]:
    """Pause the cyclic garbage collector while millions of small lists are made: each one
    counts as a new container, so the collector ran over and over during ``tolist`` of the
    (N, 2) points and (E, 3) triangles (measured on 1.03M nodes: 2.4 -> 0.5 s). Lists of
    numbers form no cycles, so nothing is left uncollected; the previous state is restored."""
    enabled = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if enabled:
            gc.enable()


def _boundaries(model: ThermalModel) -> list[dict]:
    part = model.classified.partition
    out = []
    for b, boundary in enumerate(model.section.boundaries):
        env = model.section.environments[model.boundary_env[b]]
        segments = [part.points[list(s)].round(7).tolist()
                    for s, owner in model.classified.exposure.items() if owner == b]
        out.append({"environment": env.id, "side": env.side,
                    "surface_resistance": boundary.surface_resistance, "segments": segments})
    return out


def _surface_minima(model, solution) -> dict:
    from coldseam.thermal.results import surface_block

    return surface_block(model, solution)


def _condensation_min(model, solution) -> dict | None:
    from coldseam.thermal.singular import assess

    run = solution.condensation
    if run is None or assess(model).frsi:
        return None  # none, or fixed by a known temperature the interior surface meets
    minimum = interior_minimum(model, run)
    if minimum is None:
        return None
    return {"temperature": minimum[0], "at": run.problem.space.dof_points[minimum[1]].tolist()}
