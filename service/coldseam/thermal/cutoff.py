"""Cut-off plane checks (ISO 10211): flanking parts must be one-dimensional at the cut.

Every straight chain of adiabatic outline edges that joins an interior to an exterior surface,
and is not declared a symmetry line, is taken for a cut-off plane. Along it the computed temperatures are compared with the 1D solution of
the layers the chain crosses (surface resistances at its two ends), and its distance to the
nearest junction vertex with max(1 m, 3 × the chain's length) [ISO 10211, from memory].
"""

from __future__ import annotations

import numpy as np

from coldseam.geometry.partition import where
from coldseam.meshing.sizes import junction_vertices
from coldseam.thermal.model import ThermalModel
from coldseam.thermal.solve import LevelSolution

TEMPERATURE_LIMIT = 0.05  # K


def adiabatic_chains(model: ThermalModel) -> list[list[int]]:
    """Maximal chains of adiabatic outline segments, as point-index lists."""
    neighbours: dict[int, list[int]] = {}
    for a, b in model.classified.adiabatic:
        neighbours.setdefault(a, []).append(b)
        neighbours.setdefault(b, []).append(a)
    ends = [p for p, n in neighbours.items() if len(n) != 2]
    seen: set[tuple[int, int]] = set()
    chains = []
    for start in ends:
        for nxt in neighbours[start]:
            if (min(start, nxt), max(start, nxt)) in seen:
                continue
            chain = [start, nxt]
            seen.add((min(start, nxt), max(start, nxt)))
            while len(neighbours[chain[-1]]) == 2:
                following = [q for q in neighbours[chain[-1]] if q != chain[-2]][0]
                seen.add((min(chain[-1], following), max(chain[-1], following)))
                chain.append(following)
            chains.append(chain)
    return chains


def _end_side(model: ThermalModel, point: int) -> tuple[str, float, float] | None:
    """Side, temperature and Rs of the exposed boundary touching a chain end."""
    for (a, b), boundary in model.classified.exposure.items():
        if point in (a, b):
            env = model.boundary_env[boundary]
            side = "interior" if model.env_interior[env] else "exterior"
            return side, float(model.env_temperature[env]), float(
                model.boundary_resistance[boundary])
    return None


def check_cutoffs(model: ThermalModel, solution: LevelSolution) -> list[str]:
    warnings = []
    junctions = set(junction_vertices(model.classified).tolist())
    for chain in adiabatic_chains(model):
        ends = [_end_side(model, chain[0]), _end_side(model, chain[-1])]
        if None in ends or ends[0][0] == ends[1][0] or not _straight(model, chain):
            continue
        if all((min(a, b), max(a, b)) in model.classified.symmetry
               for a, b in zip(chain, chain[1:], strict=False)):
            continue
        if ends[0][0] == "exterior":
            chain, ends = chain[::-1], ends[::-1]
        warnings += _check_chain(model, solution, chain, ends, junctions)
    return warnings


def _straight(model: ThermalModel, chain: list[int]) -> bool:
    pts = model.classified.partition.points[chain]
    d = pts[-1] - pts[0]
    span = float(np.linalg.norm(d))
    if span == 0:
        return False
    offsets = np.abs((pts[:, 0] - pts[0, 0]) * d[1] - (pts[:, 1] - pts[0, 1]) * d[0]) / span
    return bool(np.all(offsets <= 1e-6 * model.classified.partition.extent))


def _check_chain(model, solution, chain, ends, junctions) -> list[str]:
    part = model.classified.partition
    pts = part.points[chain]
    length = float(np.linalg.norm(np.diff(pts, axis=0), axis=1).sum())
    label = f"the adiabatic edge from {where(model.section, *pts[0])} to " \
            f"{where(model.section, *pts[-1])}"
    out = []
    deviation = _deviation_from_1d(model, solution, chain, ends)
    if deviation is not None and deviation > TEMPERATURE_LIMIT:
        out.append(f"{label} is not one-dimensional: its temperatures differ from the 1D "
                   f"solution of its layers by up to {deviation:.2f} K; move this cut-off plane "
                   "further from the junction (ignore this if it is a symmetry line)")
    others = [p for p in junctions if p not in chain]
    if others:
        gap = float(np.min(np.linalg.norm(part.points[others][:, None] - pts[None], axis=2)))
        needed = max(1.0, 3.0 * length)
        if gap < needed - 1e-9:
            out.append(f"{label} lies {gap:.2f} m from the nearest junction vertex; ISO 10211 "
                       f"places cut-off planes at least max(1 m, 3 × thickness) = {needed:.2f} m "
                       "away (or on a symmetry plane)")
    return out


def _deviation_from_1d(model, solution, chain, ends) -> float | None:
    part = model.classified.partition
    segments = part.segments()
    lam = model.conductivities
    resistance = [ends[0][2]]
    for a, b in zip(chain, chain[1:], strict=False):
        face = part.faces[segments[(min(a, b), max(a, b))][0]]
        d = part.points[b] - part.points[a]
        t = float(np.linalg.norm(d))
        c = d / t
        resistance.append(t / float(lam[face.material, 0] * c[0] ** 2 +
                                    lam[face.material, 1] * c[1] ** 2))
    resistance.append(ends[1][2])
    total = sum(resistance)
    cumulative = np.cumsum(resistance)[:-1]  # at each chain point
    expected = ends[0][1] - (ends[0][1] - ends[1][1]) * cumulative / total
    space = solution.space
    theta = solution.design.theta
    nodes = _nodes_at(space.dof_points, part.points[chain], part.extent)
    if nodes is None:
        return None
    return float(np.max(np.abs(theta[nodes] - expected)))


def _nodes_at(dof_points, xy, extent) -> np.ndarray | None:
    """The dof at each of the few points xy, or None when one has no dof within 1e-6·extent.

    Brute force, one point at a time (cheaper than building a k-d tree over every dof, and no
    scipy.spatial import); the distances are bit for bit those of scipy's cKDTree. Should two
    dofs be equally near a point, the k-d tree's choice between them is taken.
    """
    idx = np.empty(len(xy), int)
    for k, (x, y) in enumerate(np.asarray(xy, float)):
        dx, dy = dof_points[:, 0] - x, dof_points[:, 1] - y
        dist = np.sqrt(dx * dx + dy * dy)
        idx[k] = np.argmin(dist)
        if dist[idx[k]] > 1e-6 * extent:
            return None
        if np.count_nonzero(dist == dist[idx[k]]) > 1:
            from scipy.spatial import cKDTree

            idx[k] = cKDTree(dof_points).query([x, y])[1]
    return idx
