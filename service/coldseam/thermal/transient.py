"""The transient block: heat flows and minimum surface temperatures at the series' times.

Series T (n, N) per environment at t = 0, Δt, …, linear in between; environments without a
series keep their steady temperature; the run starts from the steady state at the first values.
Values are those of the semi-discrete FEM model C θ' + K θ = f(T(t)) solved exactly in time
on a reduced space (``coldseam.fem.transient``) grown until the outputs change by less than
1e-5 of their swing. At a known-temperature surface (Rs = 0) the heat flow jumps where the
series' slope changes; the value reported at such a time is the one just before it.
"""

from __future__ import annotations

import logging
from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp

from coldseam.fem import transient
from coldseam.fem.dynamics import DynamicProblem
from coldseam.fem.solvers import factorize
from coldseam.fem.system import FAMILIES
from coldseam.thermal.model import ThermalModel
from coldseam.thermal.solve import Run, unit_ambient

log = logging.getLogger(__name__)
HOUR = 3600.0


@dataclass
class Outputs:
    """Linear functionals of the field: rows [flows θ-part (N); surface dofs (S); stored (1)]."""

    theta_rows: sp.csr_matrix  # (N + S + 1, D)
    rate_rows: sp.csr_matrix  # (N, D): C θ' part of the flows (known-temperature dofs)
    ambient_rows: np.ndarray  # (N, N): T part of the flows
    surface: list[np.ndarray]  # per environment: its rows among the S surface rows


def series(model: ThermalModel) -> tuple[np.ndarray, float]:
    """(n, N) air temperatures at the series times, °C, and the step Δt in s."""
    request = model.request.dynamics.transient
    n = len(next(iter(request.temperatures.values())))
    temps = np.tile(model.env_temperature, (n, 1))
    for env, values in request.temperatures.items():
        temps[:, model.env_ids.index(env)] = values
    return temps, request.time_step_hours * HOUR


def outputs(model: ThermalModel, dyn: DynamicProblem) -> Outputs:
    p = dyn.problem
    space, n_env = p.space, len(model.env_ids)
    env_of_edge = model.boundary_env[space.mesh.boundary_group]
    load = FAMILIES[space.order].EDGE_LOAD
    robin = np.flatnonzero(p.robin)
    weight = (p.h * p.lengths)[robin]
    k = space.edge_dofs.shape[1]
    robin_rows = sp.csr_matrix((np.repeat(weight, k) * np.tile(load, len(robin)),
                                (np.repeat(env_of_edge[robin], k), space.edge_dofs[robin].ravel())),
                               shape=(n_env, space.dofs))
    owner_env = env_of_edge[p.fixed_owner[p.fixed]]
    pick = sp.csr_matrix((np.ones(len(p.fixed)), (owner_env, p.fixed)), shape=(n_env, space.dofs))
    unit_load = p.load(unit_ambient(model, space.mesh))
    conductance = np.bincount(env_of_edge[robin], weights=weight, minlength=n_env)
    ambient_rows = np.diag(conductance) - pick @ unit_load
    surface_dofs = [np.unique(space.edge_dofs[env_of_edge == e]) for e in range(n_env)]
    every = np.concatenate(surface_dofs)
    starts = np.cumsum([0] + [len(d) for d in surface_dofs])
    select = sp.csr_matrix((np.ones(len(every)), (np.arange(len(every)), every)),
                           shape=(len(every), space.dofs))
    stored = sp.csr_matrix(np.ones((1, space.dofs)) @ dyn.capacity)
    theta_rows = sp.vstack([-robin_rows + pick @ p.matrix, select, stored]).tocsr()
    surface = [np.arange(starts[e], starts[e + 1]) for e in range(n_env)]
    return Outputs(theta_rows, (pick @ dyn.capacity).tocsr(), ambient_rows, surface)


class TransientRun:
    """Everything the series evaluation needs on one level, for one run (design or fRsi)."""

    def __init__(self, model: ThermalModel, dyn: DynamicProblem, run: Run) -> None:
        self.model, self.dyn, self.run = model, dyn, run
        self.temps, self.dt = series(model)
        p = dyn.problem
        self.unit = run.unit
        rhs = (dyn.capacity @ self.unit)[p.free]
        self.w = np.zeros_like(self.unit)
        self.w[p.free] = dyn.solver.solve(rhs)
        self.out = outputs(model, dyn)
        slopes = np.diff(self.temps, axis=0) / self.dt  # (n − 1, N): T' on each step
        self.slopes = np.vstack([slopes, slopes[-1:]])  # the last row is never used onwards
        changes = np.diff(np.vstack([np.zeros((1, slopes.shape[1])), slopes]), axis=0)
        self.changes = np.vstack([changes, np.zeros((1, slopes.shape[1]))])  # (n, N)
        self.driven = np.flatnonzero(np.any(self.changes != 0, axis=0))
        self._shifted = None

    def _solves(self) -> list:
        """Solvers of K_ff and of K_ff + C_ff/Δt (factorised here, once per run)."""
        if self._shifted is None:
            self._shifted = factorize((self.dyn.k_ff + self.dyn.c_ff / self.dt).tocsc())
        return [self.dyn.solver.solve, self._shifted.solve]

    def evaluate(self) -> dict:
        p, dyn = self.dyn.problem, self.dyn
        start = self.w[p.free][:, self.driven]
        blocks, previous = transient.BLOCKS_PER_CHECK, None
        space = transient.KrylovSpace(dyn.k_ff, dyn.c_ff, self._solves(), start)
        while True:
            basis = space.grow(blocks)
            values = self._values(basis)
            if previous is not None and self._settled(previous, values):
                break
            if basis.shape[1] == (previous or {}).get("size"):
                break  # the space stopped growing: it is invariant, so exact
            previous = values
            blocks += transient.BLOCKS_PER_CHECK
            transient.check_growth(blocks)
        log.info("transient: %d reduced modes, %d series times", basis.shape[1], len(self.temps))
        return values

    def _values(self, basis: np.ndarray) -> dict:
        """Outputs at every series time (left limits, see the module docstring) for the
        reduced space ``basis``."""
        p, out = self.dyn.problem, self.out
        reduced = transient.reduce(self.dyn.k_ff, self.dyn.c_ff, basis, self.w[p.free])
        changes = np.zeros_like(self.changes)
        changes[:, self.driven] = self.changes[:, self.driven]
        before, integrals = transient.modal_amplitudes(reduced, changes, self.dt)
        _, _, rate = transient.decay_factors(reduced.tau, self.dt)
        modes = basis @ reduced.modes
        temps = self.temps
        slopes = np.vstack([np.zeros((1, temps.shape[1])), self.slopes[:-1]])  # T'(t_n−)

        def at_times(rows: sp.csr_matrix) -> tuple[np.ndarray, np.ndarray]:
            """rows·θ(t_n) (n, R) and the modal part of rows, (R, m)."""
            modal = rows[:, p.free] @ modes
            value = temps @ (rows @ self.unit).T - slopes @ (rows @ self.w).T + before @ modal.T
            return value, modal

        field, modal = at_times(out.theta_rows)
        fixed_stored, modal_rate = at_times(out.rate_rows)  # (C θ) at known-temperature dofs
        n_env = temps.shape[1]
        rate_part = slopes @ (out.rate_rows @ self.unit).T - (before * rate) @ modal_rate.T
        flows = temps @ out.ambient_rows.T + field[:, :n_env] + rate_part
        mean_t = 0.5 * (temps[1:] + temps[:-1]) * self.dt  # ∫T over each step
        flow_rows = out.theta_rows[:n_env]
        field_integral = (mean_t @ (flow_rows @ self.unit).T
                          - slopes[1:] * self.dt @ (flow_rows @ self.w).T
                          + integrals[1:] @ modal[:n_env].T)
        step_heat = (mean_t @ out.ambient_rows.T + field_integral
                     + np.diff(fixed_stored, axis=0))
        surface = field[:, n_env:-1]
        return {"flows": flows,
                "heat_in": np.vstack([np.zeros((1, n_env)), np.cumsum(step_heat, axis=0)]),
                "stored": field[:, -1] - field[0, -1],
                "min": np.column_stack([surface[:, rows].min(axis=1) for rows in out.surface]),
                "size": basis.shape[1]}

    def _settled(self, previous: dict, values: dict) -> bool:
        """Flows and minimum temperatures changed by < TOLERANCE of their kind's swing."""
        for key in ("flows", "min"):
            swing = np.ptp(values[key], axis=0).max()
            if key == "min":
                swing = max(swing, np.ptp(self.temps, axis=0).max())
            change = np.abs(values[key] - previous[key]).max()
            if change > transient.TOLERANCE * max(swing, 1e-12):
                return False
        return True


def transient_block(model: ThermalModel, dyn: DynamicProblem, run: Run) -> dict:
    """The contract's transient block plus the energy account (J/m from t = 0)."""
    values = TransientRun(model, dyn, run).evaluate()
    ids = model.env_ids
    temps, dt = series(model)
    return {
        "times_hours": (np.arange(len(temps)) * dt / HOUR).tolist(),
        "heat_flows": {env: values["flows"][:, k].tolist() for k, env in enumerate(ids)},
        "min_surface_temperature": {env: values["min"][:, k].tolist()
                                    for k, env in enumerate(ids)},
        "heat_in": {env: values["heat_in"][:, k].tolist() for k, env in enumerate(ids)},
        "stored_heat_change": values["stored"].tolist(),
        "air_temperatures": {env: temps[:, k].tolist() for k, env in enumerate(ids)},
        "reduced_modes": int(values["size"]),
    }
