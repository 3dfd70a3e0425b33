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


def tail_estimate(changes: list[float | None]) -> float | None:
    """Estimated distance of the last level from the limit, from the last two changes.

    With a geometric ratio r = Δₖ/Δₖ₋₁ the remaining change is Δₖ·r/(1 − r). None when there
    are fewer than two changes or they do not shrink (r ≥ 0.9): no estimate can be trusted.
    """
    if len(changes) < 2 or changes[-1] is None or changes[-2] is None:
        return None
    if changes[-2] == 0:
        return 0.0 if changes[-1] == 0 else None
    ratio = changes[-1] / changes[-2]
    if ratio >= 0.9:
        return None
    ratio = max(ratio, 0.25)  # levels are not nested: do not trust a lucky small ratio
    return changes[-1] * ratio / (1 - ratio)


def met(levels: list[LevelFigures], accuracy: str) -> bool:
    """Target met: the last change and the estimated remaining change are both below it,
    for the heat flow (relative) and the minimum interior surface temperature (K)."""
    flow_target, temperature_target = TARGETS[accuracy]
    flow = [level.relative_change for level in levels[1:]]
    temperature = [level.temperature_change for level in levels[1:]]
    if not flow or flow[-1] is None or flow[-1] >= flow_target:
        return False
    tail = tail_estimate(flow)
    if tail is None or flow[-1] + tail >= flow_target:
        return False
    if levels[-1].min_temperature is None:
        return True
    if temperature[-1] is None or temperature[-1] >= temperature_target:
        return False
    tail = tail_estimate(temperature)
    return tail is not None and temperature[-1] + tail < temperature_target
