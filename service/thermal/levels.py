"""Mesh levels and the convergence certificate.

Levels alternate two gmsh meshes whose sizes differ by √2 with their uniform refinements:
M₀, M₀′, split(M₀), split(M₀′), split²(M₀), … so every level has about twice the nodes of the
one before. Refinement splits triangles in numpy (all boundaries are straight), so gmsh runs
twice per evaluation. The certificate stops when successive levels change the total heat flow
(and so ψ) by less than the target and the minimum interior surface temperature by less than
the temperature target; ISO 10211 asks for under 1 % per doubling of cells.
"""

from __future__ import annotations

import math
from collections.abc import Iterator
from dataclasses import dataclass

import numpy as np

from coldseam.fem.mesh import Mesh, refine_uniform
from coldseam.geometry.outline import Classified
from coldseam.meshing.gmsh_mesher import triangulate
from coldseam.meshing.sizes import plan

TARGETS = {"default": (1e-3, 0.01), "iso": (1e-2, 0.1)}
ISO_RULE = 0.01


@dataclass
class LevelFigures:
    nodes: int
    dofs: int
    elements: int
    heat_flow: float  # Σ_{i<j} Lij·|θi − θj| or the coupling sum, W/m
    coupling_sum: float
    psi: float | None
    min_temperature: float | None
    relative_change: float | None = None
    temperature_change: float | None = None

    def as_dict(self) -> dict:
        return {k: (None if v is None else round(float(v), 10) if isinstance(v, float) else v)
                for k, v in self.__dict__.items()}


def mesh_levels(classified: Classified) -> Iterator[tuple[Mesh, np.ndarray]]:
    coarse = [triangulate(classified, plan(classified, factor)) for factor in (1.0, math.sqrt(2))]
    yield coarse[0]
    yield coarse[1]
    while True:
        for k in (0, 1):
            mesh, probes = coarse[k]
            coarse[k] = (refine_uniform(mesh), probes)
            yield coarse[k]


def compare(previous: LevelFigures, current: LevelFigures) -> None:
    """Fill current's changes against the previous level."""
    scale = max(abs(current.coupling_sum), 1e-300)
    current.relative_change = abs(current.coupling_sum - previous.coupling_sum) / scale
    if current.min_temperature is not None and previous.min_temperature is not None:
        current.temperature_change = abs(current.min_temperature - previous.min_temperature)


def met(figures: LevelFigures, accuracy: str) -> bool:
    flow_target, temperature_target = TARGETS[accuracy]
    if figures.relative_change is None:
        return False
    ok = figures.relative_change < flow_target
    if figures.temperature_change is not None:
        ok = ok and figures.temperature_change < temperature_target
    return ok
