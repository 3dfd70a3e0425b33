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
#: Changes within this fraction of the value are rounding, not discretisation (solves are
#: accurate to ~1e-11): a field the elements represent exactly changes by ~1e-15 between
#: levels, in random directions, and must not read as a diverging sequence.
ROUNDOFF = 1e-10


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


def tail_estimate(values: list[float | None], relative: bool) -> float | None:
    """Estimated remaining change of the last level's value, Δₖ·r/(1 − r).

    Δₖ is the change from the level before (about half the nodes). The ratio r per doubling
    comes from the same mesh family where possible (levels k and k−2 are nested refinements,
    k−2 and k−4 likewise): r = √(|vₖ − vₖ₋₂| / |vₖ₋₂ − vₖ₋₄|); otherwise from consecutive
    changes. r is bounded to [0.25, 0.9]: a lucky small ratio is not trusted and a slow one
    counts as 0.9 (a remaining change of 9·Δₖ). None when the changes clearly grow (r > 1.2)
    or there are too few levels to judge.
    """
    v = [x for x in values if x is not None]
    if len(v) < 3:
        return None
    scale = max(abs(v[-1]), 1e-300) if relative else 1.0
    noise = ROUNDOFF * (scale if relative else max(abs(v[-1]), 1.0))

    def change(a: float, b: float) -> float:
        """|a − b|, or 0 when it is only rounding (an exactly represented solution)."""
        return 0.0 if abs(a - b) <= noise else abs(a - b)

    last = change(v[-1], v[-2]) / scale
    if len(v) >= 5:
        near, far = change(v[-1], v[-3]), change(v[-3], v[-5])
        ratio = (near / far) ** 0.5 if far > 0 else (0.0 if near == 0 else 2.0)
    else:
        before = change(v[-2], v[-3])
        ratio = change(v[-1], v[-2]) / before if before > 0 else (0.0 if last == 0 else 2.0)
    if ratio > 1.2:
        return None
    ratio = min(max(ratio, 0.25), 0.9)
    return last * ratio / (1 - ratio)


def met(levels: list[LevelFigures], accuracy: str) -> bool:
    """Target met: the last change and the estimated remaining change together are below it,
    for the heat flow (relative) and the minimum interior surface temperature (K)."""
    flow_target, temperature_target = TARGETS[accuracy]
    last = levels[-1]
    if last.relative_change is None:
        return False
    tail = tail_estimate([level.coupling_sum for level in levels], relative=True)
    if tail is None or last.relative_change + tail >= flow_target:
        return False
    if last.min_temperature is None:
        return True
    tail = tail_estimate([level.min_temperature for level in levels], relative=False)
    return tail is not None and last.temperature_change + tail < temperature_target
