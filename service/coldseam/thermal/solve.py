"""Solve one mesh level: the design (heat-flow) run and the condensation (fRsi) run."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from coldseam.fem.indicators import residual_indicators
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


def complete_units(solved: np.ndarray) -> np.ndarray:
    """All N unit solves from the first N − 1: every exposed edge belongs to one environment,
    so with every environment at 1 °C the field is 1 °C everywhere (the conduction matrix
    annihilates constants and each surface term holds), and the last unit field is 1 minus the
    others. One solve fewer per run: half the work for the usual two environments."""
    return np.column_stack([solved, 1.0 - solved.sum(axis=1)])


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
    ambient = unit_ambient(model, mesh)
    unit = complete_units(problem.solve(ambient[:, :-1]) if n_env > 1 else
                          np.zeros((space.dofs, 0)))
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


def unit_ambient(model: ThermalModel, mesh: Mesh) -> np.ndarray:
    """(B, N) boundary temperatures of the unit solves: 1 on environment j's edges."""
    env_of_edge = model.boundary_env[mesh.boundary_group]
    return (env_of_edge[:, None] == np.arange(len(model.env_temperature))[None]).astype(float)


def error_indicators(model: ThermalModel, solution: LevelSolution) -> np.ndarray:
    """Where to refine: (E,) weights summing to about 1 per goal.

    Goals: the heat flows (energy-norm residual indicators ηₖ² of every unit solve, design
    and fRsi runs) and the minimum interior surface temperature of each run (goal-oriented:
    ηₖ(θ)·ηₖ(z), with z the solution of the adjoint problem loaded at that surface point, so
    refinement goes where the residual affects the point value). Each goal's weights are
    normalised, so neither swamps the other.
    """
    from coldseam.thermal.results import interior_minimum

    ambient = unit_ambient(model, solution.mesh)
    runs = [solution.design]
    if solution.condensation is not None and solution.condensation is not solution.design:
        runs.append(solution.condensation)
    columns, boundary, conductance, goals = [], [], [], []
    for r in runs:  # every run's unit solves and adjoint, indicated in one pass
        problem = r.problem
        first = sum(c.shape[1] for c in columns)
        columns.append(r.unit)
        boundary.append(ambient)
        minimum = interior_minimum(model, r)
        dual = minimum is not None and problem.fixed_owner[minimum[1]] < 0
        if dual:
            load = np.zeros(solution.space.dofs)
            load[minimum[1]] = 1.0
            z = np.zeros((solution.space.dofs, 1))
            z[problem.free, 0] = problem.solver.solve(load[problem.free])
            columns.append(z)
            boundary.append(np.zeros((len(ambient), 1)))
        width = r.unit.shape[1] + dual
        conductance.append(np.repeat(problem.conductance[:, None], width, axis=1))
        goals.append((first, r.unit.shape[1], dual))
    eta = residual_indicators(solution.space, solution.design.problem.conductivity,
                              np.hstack(conductance), np.hstack(columns), np.hstack(boundary))
    weights = np.zeros(solution.mesh.elements)
    for first, units, dual in goals:
        primal = eta[:, first:first + units].sum(axis=1)
        weights += _normalised(primal)
        if dual:
            weights += _normalised(np.sqrt(primal * eta[:, first + units]))
    return weights


def _normalised(values: np.ndarray) -> np.ndarray:
    total = values.sum()
    return values / total if total > 0 and np.isfinite(total) else np.zeros_like(values)
