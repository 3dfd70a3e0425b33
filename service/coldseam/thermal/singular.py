"""Where known surface temperatures make a figure meaningless.

A boundary with surface resistance 0 holds its surface at the environment's temperature. Where
two such boundaries of different environments meet at a vertex of the outline, the temperature
jumps there: the heat flux grows like 1/r towards the vertex and the heat flow between the two
environments is unbounded (every refinement of the mesh gives a larger one; ISO 10211 Annex A
Case 1 is such a section, a temperature check, not a heat-flow check). The temperatures away
from the vertex are well defined and converge.

Likewise, where the interior surface of the fRsi check touches a known temperature of another
environment, its lowest temperature is that known temperature by construction: an fRsi there
measures the drawing, not the junction.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from coldseam.geometry.partition import where
from coldseam.thermal.model import ThermalModel


@dataclass(frozen=True)
class Contact:
    """Two boundaries of different environments meeting at an outline vertex."""

    at: tuple[float, float]  # metres
    environments: tuple[str, str]
    text: str  # the point in the section unit, for messages


def _contacts(model: ThermalModel, resistance: np.ndarray, known_a: bool) -> list[Contact]:
    """Vertices where a boundary (known temperature itself when ``known_a``) meets a
    known-temperature boundary (resistance 0) of another environment."""
    touching: dict[int, set[int]] = {}
    for (a, b), boundary in model.classified.exposure.items():
        touching.setdefault(a, set()).add(boundary)
        touching.setdefault(b, set()).add(boundary)
    points = model.classified.partition.points
    ids = model.env_ids
    out = []
    for vertex, boundaries in sorted(touching.items()):
        pairs = {(int(model.boundary_env[p]), int(model.boundary_env[q]))
                 for p in boundaries for q in boundaries
                 if model.boundary_env[p] != model.boundary_env[q] and resistance[q] == 0
                 and (resistance[p] == 0 or not known_a)}
        for i, j in sorted(pairs):
            if known_a and i > j:
                continue
            x, y = (float(v) for v in points[vertex])
            out.append(Contact((x, y), (ids[i], ids[j]), where(model.section, x, y)))
    return out


def heat_flow_contacts(model: ThermalModel) -> list[Contact]:
    """Vertices where known temperatures of two environments meet in the design run: there
    the heat flow between them is unbounded."""
    return _contacts(model, model.boundary_resistance, known_a=True)


def interior_contacts(model: ThermalModel, primary: int | None) -> list[Contact]:
    """Vertices where the surface of interior environment ``primary`` meets a known
    temperature of another environment in the fRsi run (its minimum is then that
    temperature by construction)."""
    if primary is None:
        return []
    name = model.env_ids[primary]
    return [c for c in _contacts(model, model.boundary_condensation_resistance, known_a=False)
            if c.environments[0] == name]


def singular_block(contacts: list[Contact]) -> dict | None:
    """The result's ``mesh.heat_flow_singular`` entry, or None for a regular section."""
    if not contacts:
        return None
    return {"at": [list(c.at) for c in contacts],
            "environments": [list(c.environments) for c in contacts],
            "reason": heat_flow_reason(contacts)}


def heat_flow_reason(contacts: list[Contact]) -> str:
    first = contacts[0]
    more = f" (and {len(contacts) - 1} more)" if len(contacts) > 1 else ""
    return (f"known surface temperatures of '{first.environments[0]}' and "
            f"'{first.environments[1]}' meet at {first.text}{more}: the heat flow between "
            "them is unbounded there (it grows with every refinement of the mesh), so no heat "
            "flow, L2D or ψ is given; the mesh is certified on temperatures instead")


def frsi_reason(contacts: list[Contact]) -> str:
    first = contacts[0]
    return (f"the interior surface of '{first.environments[0]}' meets the known surface "
            f"temperature of '{first.environments[1]}' at {first.text}: its lowest temperature "
            "there is that known temperature by construction, so no fRsi or condensation "
            "verdict is given")


@dataclass(frozen=True)
class Meaning:
    """What the known temperatures of a section leave meaningful (empty lists: everything)."""

    heat_flow: list[Contact]  # heat flow, L2D, ψ, sensitivities unbounded
    design_minimum: list[Contact]  # θsi,min of the design run fixed by a known temperature
    frsi: list[Contact]  # fRsi and the condensation verdict meaningless

    @property
    def singular(self) -> bool:
        return bool(self.heat_flow)


def assess(model: ThermalModel) -> Meaning:
    """The contacts of ``model`` (see the module docstring)."""
    from coldseam.thermal.results import primary_interior

    primary = primary_interior(model)
    design = [c for c in _contacts(model, model.boundary_resistance, known_a=False)
              if primary is not None and c.environments[0] == model.env_ids[primary]]
    return Meaning(heat_flow_contacts(model), design, interior_contacts(model, primary))
