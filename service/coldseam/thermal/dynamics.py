"""Dynamic behaviour of a section (model-v1 additions §2): ISO 13786 periodic quantities per
metre of junction, the slowest thermal time constants, and the transient response.

Definitions (pinned here; per metre of junction, for a plain layered wall of height H each is
H times the ISO 13786 areal quantity). Temperatures vary as Re(θ̂ e^(iωt)), ω = 2π/T. With
Φ̂ᵢⱼ the complex heat flow into the section from environment i when environment j has unit
air-temperature amplitude and all others are held at 0:

- periodic coupling (ISO 13786 periodic thermal transmittance, per metre) of "a|b": the heat
  flow leaving the section into b per unit amplitude at a, Yab = −Φ̂ba (W/(m·K)); symmetric
  (Yab = Yba) by reciprocity; → L2D as T → ∞;
- admittance of a: Yaa = Φ̂aa, the heat flow into the section from a per unit amplitude at a;
- decrement factor of "a|b": |Yab| / Lab with Lab the steady coupling coefficient;
- heat capacity seen from a: κa = T/(2π) · |Σⱼ Φ̂aj|, the stored-heat amplitude per unit
  amplitude when every environment swings together; for a layered wall ISO 13786's
  κ1 = T/(2π)·|(Z11 − 1)/Z12| (J/(m·K));
- time shift: the lag of the response behind its cause, −arg(Y)·T/(2π) reduced to [0, T):
  a heat flow that leads its temperature (admittances, typically) lags by nearly a period.

Time constants: τ = 1/λ of K φ = λ C φ with every environment held at its air temperature
(design surface resistances), longest first. Transient: see ``coldseam.fem.transient``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from coldseam.errors import InvalidSection
from coldseam.fem.capacity import capacity_matrix
from coldseam.fem.dynamics import DynamicProblem
from coldseam.fem.indicators import residual_indicators
from coldseam.thermal.model import ThermalModel
from coldseam.thermal.solve import LevelSolution, Run, unit_ambient

HOUR = 3600.0
#: The certificate continues until these change by less than this fraction between levels.
DYNAMIC_TARGET = 5e-3
#: A transient run refines for the harmonic of this many time steps per period.
TRANSIENT_PERIODS = 4
#: Periodic requests start from level 0 refined so that no triangle side exceeds
#: PENETRATION_SIZE·δ + PENETRATION_GROWTH·d, δ = √(λT/(πρc)) the periodic penetration
#: depth of its material (ISO 13786) and d its distance from the exposed surfaces (the wave is
#: damped as e^(−d/δ) away from them, so the cap relaxes with depth): the damped wave through
#: massive layers is then resolved from the start, and the periodic figures settle within about
#: the levels of the steady certificate. Measured with bench/dynamics.py and the level counts
#: of the templates (see bench/notes.md).
PENETRATION_SIZE = 1.0
PENETRATION_GROWTH = 0.5


def volumetric_capacities(model: ThermalModel) -> np.ndarray:
    """ρc per material, J/(m³·K); 0 for an air cavity. InvalidSection (422) naming the first
    material without density or specific heat."""
    values = []
    for i, use in enumerate(model.materials):  # the section's, then one per cavity region
        if use.cavity:
            values.append(0.0)
            continue
        for name, value in (("density", use.density), ("specific_heat", use.specific_heat)):
            if value is None:
                raise InvalidSection(
                    f"material '{use.id}' needs a density (kg/m³) and a specific_heat "
                    "(J/(kg·K)) for the dynamic results: give them, or refer to a library "
                    "material", f"/section/materials/{i}/{name}")
        values.append(float(use.density) * float(use.specific_heat))
    return np.array(values)


def dynamic_problem(model: ThermalModel, run: Run) -> DynamicProblem:
    space = run.problem.space
    rho_c = volumetric_capacities(model)[space.mesh.material]
    dyn = DynamicProblem(run.problem, capacity_matrix(space, rho_c))
    dyn.volumetric = rho_c  # ρc per triangle, J/(m³·K)
    return dyn


def penetration_depths(model: ThermalModel, period_seconds: float) -> np.ndarray:
    """δ = √(λT/(πρc)) per material (m), with the smaller principal λ; ∞ without capacity
    (an air cavity)."""
    rho_c = volumetric_capacities(model)
    conductivity = np.min(np.reshape(model.conductivities, (len(rho_c), -1)), axis=1)
    out = np.full(len(rho_c), np.inf)
    stores = rho_c > 0
    out[stores] = np.sqrt(conductivity[stores] * period_seconds / (math.pi * rho_c[stores]))
    return out


def penetration_sizes(model: ThermalModel, period_seconds: float):
    """caps(mesh) -> (E,) the largest side allowed in each triangle for a periodic solve of
    that period (see PENETRATION_SIZE), for ``coldseam.fem.adapt.refine_to_sizes``."""
    delta = penetration_depths(model, period_seconds)

    def caps(mesh) -> np.ndarray:
        from scipy.spatial import cKDTree

        ends = mesh.points[mesh.boundary_edges]  # exposed sides: ends and midpoints sampled
        if len(ends) == 0:
            return np.full(mesh.elements, np.inf)
        tree = cKDTree(np.vstack([ends[:, 0], ends[:, 1], 0.5 * (ends[:, 0] + ends[:, 1])]))
        depth, _ = tree.query(mesh.points[mesh.triangles].mean(axis=1))
        return PENETRATION_SIZE * delta[mesh.material] + PENETRATION_GROWTH * depth

    return caps


@dataclass
class LevelDynamics:
    """Dynamic figures of one level: periodic complex flows and time constants."""

    period_hours: float | None
    harmonic_flows: np.ndarray | None  # (N, N) complex Φ̂ij
    time_constants: np.ndarray  # s, longest first
    watched: dict[str, float] = field(default_factory=dict)  # what the certificate compares
    transient: dict | None = None  # the transient block of this level (design run)
    #: The harmonic fields of this level for its refinement indicators, kept until asked:
    #: the final level is never refined, so its indicators are never computed.
    _fields: tuple | None = None

    def indicators(self) -> np.ndarray | None:
        """(E,) where to refine for the dynamic results (``_indicators``); the fields are
        dropped once used."""
        if self._fields is None:
            return None
        dyn, fields = self._fields
        self._fields = None
        return _indicators(dyn, fields)

    def forget_fields(self) -> None:
        self._fields = None


def level_dynamics(model: ThermalModel, solution: LevelSolution) -> LevelDynamics:
    request = model.request.dynamics
    dyn = dynamic_problem(model, solution.design)
    # The time constants are solved (and watched by the certificate) where they are reported:
    # asked for, or the only dynamic figure of the request.
    wanted = request.time_constants is not None or (request.periodic is None
                                                    and request.transient is None)
    count = request.time_constants.count if request.time_constants else 1
    taus = dyn.time_constants(count) if wanted else np.full(count, np.nan)
    flows, period, fields = None, None, []
    if request.periodic is not None:
        period = request.periodic.period_hours
        flows = harmonic_flows(model, dyn, 2 * math.pi / (period * HOUR), fields)
    watched = {"time_constant": float(taus[0])} if wanted else {}
    if flows is not None:
        for (a, b), value in _pairs(model, flows).items():
            watched[f"coupling {a}|{b}"] = abs(value)
        for k, env in enumerate(model.env_ids):
            watched[f"admittance {env}"] = abs(flows[k, k])
    series = None
    if request.transient is not None:
        from coldseam.thermal.transient import transient_block

        series = transient_block(model, dyn, solution.design)
        # the harmonic of period 4Δt: refines where the response within a step varies
        harmonic_flows(model, dyn, 2 * math.pi / (TRANSIENT_PERIODS *
                                                  request.transient.time_step_hours * HOUR),
                       fields)
    level = LevelDynamics(period, flows, taus, watched, series)
    level._fields = (dyn, fields) if fields else None
    return level


def _indicators(dyn: DynamicProblem, fields: list) -> np.ndarray | None:
    """Residual error indicators (E,) of the harmonic fields (real and imaginary parts, with
    the capacity term ρc·iωθ̂ as the element source), normalised to sum 1."""
    if not fields:
        return None
    p = dyn.problem
    space = p.space
    mean_dofs = space.cell_dofs[:, 3:] if space.order == 2 else space.cell_dofs
    volumetric = dyn.volumetric
    total = np.zeros(space.mesh.elements)
    for theta, ambient, omega in fields:
        mean = theta[mean_dofs].mean(axis=1)  # (E, N) complex: the exact triangle means
        source = np.hstack([-omega * volumetric[:, None] * mean.imag,
                            omega * volumetric[:, None] * mean.real])
        eta = residual_indicators(space, p.conductivity, p.conductance,
                                  np.hstack([theta.real, theta.imag]),
                                  np.hstack([ambient.real, ambient.imag]), source)
        total += eta.sum(axis=1)
    sum_ = total.sum()
    return total / sum_ if sum_ > 0 and np.isfinite(sum_) else None


def dynamic_change(previous: LevelDynamics, current: LevelDynamics) -> float:
    """Largest relative change between two levels of the watched figures, and of the
    transient series (minimum surface temperatures and heat flows, relative to the swing of
    their kind over the run)."""
    change = 0.0
    for key, value in current.watched.items():
        before = previous.watched.get(key)
        if before is None:
            return math.inf
        change = max(change, abs(value - before) / max(abs(value), 1e-300))
    if current.transient is not None and previous.transient is not None:
        for kind in ("min_surface_temperature", "heat_flows"):
            now = np.array(list(current.transient[kind].values()))
            then = np.array(list(previous.transient[kind].values()))
            swing = max(float(np.ptp(now, axis=1).max()), 1e-12)
            if kind == "min_surface_temperature":
                air = np.array(list(current.transient["air_temperatures"].values()))
                swing = max(swing, float(np.ptp(air, axis=1).max()))
            change = max(change, float(np.abs(now - then).max()) / swing)
    return change


def harmonic_flows(model: ThermalModel, dyn: DynamicProblem, omega: float,
                   fields: list | None = None) -> np.ndarray:
    """Φ̂ij (N, N): complex heat flow into the section from i for a unit harmonic at j
    (the fields θ̂ (D, N) are appended to ``fields`` with ω, for the error indicators)."""
    mesh = dyn.problem.space.mesh
    ambient = unit_ambient(model, mesh).astype(complex)
    theta = dyn.harmonic(ambient, omega)
    if fields is not None:
        fields.append((theta, ambient, omega))
    n_env = len(model.env_ids)
    groups = len(model.boundary_env)
    out = np.empty((n_env, n_env), complex)
    for j in range(n_env):
        per_group = dyn.harmonic_heat_flows(theta[:, j], ambient[:, j], omega, groups)
        out[:, j] = (np.bincount(model.boundary_env, per_group.real, n_env)
                     + 1j * np.bincount(model.boundary_env, per_group.imag, n_env))
    return out


def _pairs(model: ThermalModel, flows: np.ndarray) -> dict[tuple[str, str], complex]:
    """Yab = −Φ̂ba for every pair, keyed interior environment first (then by order)."""
    ids, interior = model.env_ids, model.env_interior
    out = {}
    for a in range(len(ids)):
        for b in range(a + 1, len(ids)):
            first, second = (b, a) if interior[b] and not interior[a] else (a, b)
            out[(ids[first], ids[second])] = complex(-flows[second, first])
    return out


def lag_hours(value: complex, period_hours: float) -> float:
    """The lag of a response behind its cause, −arg(value)·T/(2π), in [0, T) hours."""
    lag = (-np.angle(value) * period_hours / (2 * math.pi)) % period_hours
    return 0.0 if math.isclose(lag, period_hours) else float(lag)


def periodic_block(model: ThermalModel, level: LevelDynamics, run: Run) -> dict:
    period, flows = level.period_hours, level.harmonic_flows
    steady = 0.5 * (run.coupling + run.coupling.T)
    ids = model.env_ids
    block: dict = {"period_hours": period, "coupling": {}, "decrement_factor": {},
                   "admittance": {}, "heat_capacity": {}}
    for (a, b), value in _pairs(model, flows).items():
        key = f"{a}|{b}"
        block["coupling"][key] = {"modulus": abs(value), "time_shift_hours": lag_hours(value, period)}
        lab = steady[ids.index(a), ids.index(b)]
        block["decrement_factor"][key] = abs(value) / lab if lab > 0 else None
    for k, env in enumerate(ids):
        value = complex(flows[k, k])
        block["admittance"][env] = {"modulus": abs(value),
                                    "time_shift_hours": lag_hours(value, period)}
        block["heat_capacity"][env] = period * HOUR / (2 * math.pi) * abs(flows[k].sum())
    return block
