"""The dynamics hook of an evaluation: dynamic figures per mesh level for the certificate
(periodic moduli and the slowest time constant must change by < 0.5 % between levels), and
the `dynamics` result block of the final level."""

from __future__ import annotations

import numpy as np
from threadpoolctl import ThreadpoolController

from coldseam.fem.adapt import refine_to_sizes
from coldseam.fem.mesh import Mesh
from coldseam.thermal.dynamics import (
    DYNAMIC_TARGET,
    HOUR,
    LevelDynamics,
    dynamic_change,
    dynamic_problem,
    level_dynamics,
    penetration_sizes,
    periodic_block,
    volumetric_capacities,
)
from coldseam.thermal.levels import LevelFigures
from coldseam.thermal.model import ThermalModel
from coldseam.thermal.solve import LevelSolution
from coldseam.thermal.transient import transient_block

_CONTROLLER: ThreadpoolController | None = None


def one_blas_thread():
    """A context with one BLAS thread. The controller (which finds the loaded BLAS libraries,
    ~2 ms each time) is made once per process."""
    global _CONTROLLER
    if _CONTROLLER is None:
        _CONTROLLER = ThreadpoolController()
    return _CONTROLLER.limit(limits=1, user_api="blas")


class Watch:
    """The dynamic figures of every level so far."""

    def __init__(self) -> None:
        self.levels: list[LevelDynamics] = []
        self.change: float | None = None
        self.changes: list[float] = []

    @classmethod
    def start(cls, model: ThermalModel) -> Watch | None:
        if model.request.dynamics is None:
            return None
        volumetric_capacities(model)  # 422 before any meshing when ρ or c is missing
        return cls()

    def add(self, model: ThermalModel, solution: LevelSolution, figures: LevelFigures) -> None:
        with one_blas_thread():  # small products: threads only spin
            current = level_dynamics(model, solution)
        if "time_constant" in current.watched:
            figures.slowest_time_constant_hours = float(current.time_constants[0] / HOUR)
        if self.levels:
            self.change = dynamic_change(self.levels[-1], current)
            self.changes.append(self.change)
            figures.dynamic_change = self.change
            self.levels[-1].forget_fields()  # a level is refined once, or never
        self.levels.append(current)

    @staticmethod
    def first_mesh(model: ThermalModel, mesh: Mesh) -> Mesh:
        """Level 0 of a periodic request: refined where its triangles are coarse against the
        periodic penetration depth (``coldseam.thermal.dynamics.penetration_sizes``)."""
        periodic = model.request.dynamics.periodic
        if periodic is None:
            return mesh
        return refine_to_sizes(mesh, penetration_sizes(model, periodic.period_hours * HOUR))

    def indicators(self, steady: np.ndarray) -> np.ndarray:
        """The steady refinement weights plus those of the dynamic fields of the last level."""
        extra = self.levels[-1].indicators()
        return steady if extra is None else steady + extra

    def settled(self) -> bool:
        """The last two changes under the target: one small change alone can be luck (a
        level that refined where the dynamic fields do not care)."""
        return len(self.changes) >= 2 and max(self.changes[-2:]) < DYNAMIC_TARGET


def block(model: ThermalModel, solution: LevelSolution, watch: Watch) -> dict:
    """{"dynamics": {...}} of the final level (the watch's last entry)."""
    with one_blas_thread():
        return _block(model, solution, watch)


def _block(model: ThermalModel, solution: LevelSolution, watch: Watch) -> dict:
    request, last = model.request.dynamics, watch.levels[-1]
    out: dict = {"certificate": {"target": DYNAMIC_TARGET, "relative_change": watch.change,
                                 "target_met": watch.settled()}}
    if request.periodic is not None:
        out["periodic"] = periodic_block(model, last, solution.design)
    if request.time_constants is not None:
        out["time_constants_hours"] = (last.time_constants / HOUR).tolist()
    if request.transient is not None:
        design = solution.design
        out["transient"] = dict(last.transient)
        fr_si = solution.condensation
        if fr_si is not None and fr_si is not design:
            extra = transient_block(model, dynamic_problem(model, fr_si), fr_si)
            out["transient"]["condensation_min_surface_temperature"] = \
                extra["min_surface_temperature"]
    return {"dynamics": _finite(out)}


def _finite(value):
    if isinstance(value, dict):
        return {k: _finite(v) for k, v in value.items()}
    if isinstance(value, list):
        return [_finite(v) for v in value]
    if isinstance(value, float | np.floating) and not np.isfinite(value):
        return None
    return value
