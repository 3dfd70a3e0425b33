"""The prepared model of one request: classified geometry plus per-boundary physics."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from coldseam.geometry.outline import Classified, classify
from coldseam.geometry.partition import build_partition
from coldseam.schema.evaluation import EvaluationRequest
from coldseam.schema.section import Section
from coldseam.thermal.cavities import apply_cavities, check_cavity_regions
from coldseam.thermal.cavity_formula import C1
from coldseam.thermal.cavity_split import split_narrowings
from coldseam.thermal.cavity_vent import open_ventilated


@dataclass
class MaterialUse:
    id: str
    conductivity: tuple[float, float]  # [λx, λy] W/(m·K)
    source: str
    density: float | None = None  # ρ, kg/m³
    specific_heat: float | None = None  # c, J/(kg·K)
    capacity_source: str = ""
    #: An air cavity (a cavity material, or one cavity's own λeq entry): no heat capacity.
    cavity: bool = False


@dataclass
class ThermalModel:
    request: EvaluationRequest
    classified: Classified
    materials: list[MaterialUse]
    env_temperature: np.ndarray  # (N,) °C per environment
    env_interior: np.ndarray  # (N,) bool
    boundary_env: np.ndarray  # (Bd,) environment index per section boundary
    boundary_resistance: np.ndarray  # (Bd,) design Rs, m²K/W
    boundary_condensation_resistance: np.ndarray  # (Bd,) Rs for the fRsi run
    cavities: list[dict] = field(default_factory=list)  # result entries, see thermal.cavities

    @property
    def section(self) -> Section:
        return self.request.section

    @property
    def conductivities(self) -> np.ndarray:
        return np.array([m.conductivity for m in self.materials], float)

    @property
    def env_ids(self) -> list[str]:
        return [e.id for e in self.section.environments]

    def has_condensation_run(self) -> bool:
        return bool(self.env_interior.any() and (~self.env_interior).any())


def resolve_materials(section: Section) -> list[MaterialUse]:
    uses = []
    library_ids = [m for m in section.materials if m.conductivity is None and m.cavity is None]
    resolved = {}
    if library_ids:
        from coldseam.materials import resolve_materials as from_library

        resolved = from_library(section)
    for m in section.materials:
        if m.cavity is not None:  # λeq per cavity: see coldseam.thermal.cavities
            uses.append(MaterialUse(m.id, (C1, C1), "air cavity", cavity=True))
        elif m.conductivity is not None:
            lam = m.conductivity if isinstance(m.conductivity, tuple) else (m.conductivity,) * 2
            source = "given in the request"
            if m.library:
                source += f" (overrides library '{m.library}')"
            uses.append(MaterialUse(m.id, (float(lam[0]), float(lam[1])), source))
        else:
            lx, ly, source = resolved[m.id]
            uses.append(MaterialUse(m.id, (float(lx), float(ly)), source))
    _add_capacities(section, uses)
    return uses


def _add_capacities(section: Section, uses: list[MaterialUse]) -> None:
    """ρ, c and their source on every material that has them (dynamic evaluations)."""
    from coldseam.materials import resolve_capacities

    capacities = resolve_capacities(section)
    for use in uses:
        density, specific_heat, source = capacities[use.id]
        use.density, use.specific_heat, use.capacity_source = density, specific_heat, source


def prepare(request: EvaluationRequest) -> ThermalModel:
    section = request.section
    materials = resolve_materials(section)
    check_cavity_regions(section)
    partition = build_partition(section)
    cavity_kinds = {k for k, m in enumerate(section.materials) if m.cavity is not None}
    ventilated: list[dict] = []
    if cavity_kinds:
        split_narrowings(partition, cavity_kinds)
        section, ventilated = open_ventilated(section, partition)
        request = request.model_copy(update={"section": section})
    classified = classify(section, partition)
    env_index = {e.id: k for k, e in enumerate(section.environments)}
    default_rsi = (request.condensation.interior_surface_resistance
                   if request.condensation else 0.25)
    interior = np.array([e.side == "interior" for e in section.environments])
    boundary_env = np.array([env_index[b.environment] for b in section.boundaries], int)
    design = np.array([b.surface_resistance for b in section.boundaries], float)
    condensation = np.array([
        (b.condensation_surface_resistance if b.condensation_surface_resistance is not None
         else default_rsi) if interior[boundary_env[k]] else b.surface_resistance
        for k, b in enumerate(section.boundaries)], float)
    model = ThermalModel(request, classified, materials,
                         np.array([e.temperature for e in section.environments], float),
                         interior, boundary_env, design, condensation)
    model.cavities = apply_cavities(model) + ventilated
    return model
