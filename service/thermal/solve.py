"""Solve one mesh level: the design (heat-flow) run and the condensation (fRsi) run."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from coldseam.fem.mesh import Mesh
from coldseam.fem.space import Space
from coldseam.fem.system import ConductionProblem, make_space
from coldseam.thermal.model import ThermalModel


@dataclass
class Run:
    """Unit-temperature solves for one set of surface resistances, combined for the actual
    temperatures (superposition: the field is linear in the environment temperatures)."""

    problem: ConductionProblem
    unit: np.ndarray  # (D, N): θ with environment j at 1 °C and all others at 0 °C
    unit_flows: np.ndarray  # (N, N): [i, j] heat flow from environment i for unit solve j
    temperatures: np.ndarray  # (N,) °C

    @property
    def theta(self) -> np.ndarray:
        return self.unit @ self.temperatures

    @property
    def heat_flows(self) -> np.ndarray:
        """W/m flowing into the section from each environment."""
        return self.unit_flows @ self.temperatures

    @property
    def coupling(self) -> np.ndarray:
        """ISO 10211 coupling coefficients Lij = −Φi(θj = 1, others 0), W/(m·K)."""
        matrix = -self.unit_flows.copy()
        np.fill_diagonal(matrix, 0.0)
        return matrix


def conductances(resistance: np.ndarray) -> np.ndarray:
    with np.errstate(divide="ignore"):
        return np.where(resistance > 0, 1.0 / np.maximum(resistance, 1e-300), np.inf)


def run(model: ThermalModel, space: Space, resistance: np.ndarray,
        like: ConductionProblem | None = None) -> Run:
    """Solve with per-boundary surface resistances ``resistance`` for every environment
    (``like``: a problem on the same space whose conduction matrix can be shared)."""
    mesh = space.mesh
    group = mesh.boundary_group
    conductance = conductances(resistance)[group]
    problem = (like.with_conductance(conductance) if like is not None else
               ConductionProblem(space, model.conductivities[mesh.material], conductance))
    n_env = len(model.env_temperature)
    env_of_edge = model.boundary_env[group]
    ambient = (env_of_edge[:, None] == np.arange(n_env)[None]).astype(float)
    unit = problem.solve(ambient)
    flows = np.empty((n_env, n_env))
    for j in range(n_env):
        per_boundary = problem.heat_flows(unit[:, j], ambient[:, j], len(model.boundary_env))
        flows[:, j] = np.bincount(model.boundary_env, weights=per_boundary, minlength=n_env)
    return Run(problem, unit, flows, model.env_temperature)


@dataclass
class LevelSolution:
    mesh: Mesh
    space: Space
    probe_nodes: np.ndarray
    design: Run
    condensation: Run | None


def solve_level(model: ThermalModel, mesh: Mesh, probe_nodes: np.ndarray,
                order: int) -> LevelSolution:
    space = make_space(mesh, order)
    design = run(model, space, model.boundary_resistance)
    condensation = None
    if model.has_condensation_run():
        same = np.array_equal(model.boundary_condensation_resistance, model.boundary_resistance)
        condensation = design if same else run(model, space,
                                               model.boundary_condensation_resistance,
                                               like=design.problem)
    return LevelSolution(mesh, space, probe_nodes, design, condensation)
