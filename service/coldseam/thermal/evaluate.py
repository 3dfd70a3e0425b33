"""Evaluation of one request: geometry, mesh levels, solves, ψ, fRsi, certificate.

    evaluate(request, progress=None) -> Evaluation

``Evaluation.result`` is the JSON-able result document of model-v1 (without ``id``; the API and
CLI add ``id = request_digest(request)``). ``Evaluation.field`` is the temperature field of the
final mesh for drawing (see ``coldseam.thermal.field``). ``progress(stage, fraction)`` is called
with stages "geometry", "meshing", "solving", "post-processing" and a fraction 0..1.
"""

from __future__ import annotations

import logging
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from coldseam import CAUTION, ENGINE_VERSION
from coldseam.errors import LimitExceeded
from coldseam.meshing.estimate import check_coarsest
from coldseam.schema.evaluation import EvaluationRequest
from coldseam.thermal import dynamics_result, results, singular, units
from coldseam.thermal.field import field_arrays, plain
from coldseam.thermal.levels import (
    ISO_RULE,
    TARGETS,
    LevelFigures,
    compare,
    first_factor,
    first_level,
    iso_comparison,
    met,
    next_level,
    tail_estimate,
)
from coldseam.thermal.model import ThermalModel, prepare
from coldseam.thermal.psi import FlankingU, flanking_values
from coldseam.thermal.solve import LevelSolution, error_indicators, solve_level

log = logging.getLogger(__name__)
Progress = Callable[[str, float], None]


@dataclass
class Evaluation:
    result: dict
    arrays: dict  # the field, its large members as numpy arrays (coldseam.thermal.field)

    @property
    def field(self) -> dict:
        """The field document with plain lists, made on first use."""
        if self._field is None:
            self._field = plain(self.arrays)
        return self._field

    _field = None


def evaluate(request: EvaluationRequest, progress: Progress | None = None) -> Evaluation:
    report = progress or (lambda stage, fraction: None)
    report("geometry", 0.0)
    model = prepare(request)
    flanking = flanking_values(model)
    pair = results.psi_pair(model)
    report("meshing", 0.05)
    # the estimate of the mesh level 0 really makes (its plan is kept for first_level)
    check_coarsest(model.classified, request.options.max_nodes,
                   first_factor(model.classified, request.options.accuracy))
    meaning = singular.assess(model)
    levels, solution, warnings, watch = _certify(model, flanking, pair, report, meaning)
    report("post-processing", 0.9)
    result = _result(model, flanking, pair, levels, solution, warnings)
    if watch is not None:
        result.update(_jsonable(dynamics_result.block(model, solution, watch)))
    if meaning.singular or meaning.frsi:
        result = _jsonable(_without_meaningless(result, meaning, levels, model))
    _release_solvers(solution)  # the field needs temperatures only: free the factorisations
    field = field_arrays(model, solution)
    report("post-processing", 1.0)
    return Evaluation(result, field)


def _certify(model: ThermalModel, flanking: list[FlankingU], pair, report: Progress,
             meaning: singular.Meaning):
    options = model.request.options
    order = 2 if options.element == "P2" else 1
    levels: list[LevelFigures] = []
    warnings: list[str] = []
    solution: LevelSolution | None = None
    watch = dynamics_result.Watch.start(model)  # None without a dynamics block
    mesh, probes = first_level(model.classified, options.accuracy)
    if watch is not None:
        mesh = watch.first_mesh(model, mesh)  # finer where the periodic wave needs it
    for k in range(options.max_levels):
        if mesh.nodes > options.max_nodes:
            if solution is None:
                raise LimitExceeded(
                    f"even the coarsest mesh needs {mesh.nodes} nodes, above the limit of "
                    f"{options.max_nodes}", "/options/max_nodes")
            warnings.append(f"refinement stopped at {levels[-1].nodes} nodes: the next level "
                            f"would exceed the node limit of {options.max_nodes}")
            break
        solution = solve_level(model, mesh, probes, order)
        figures = results.level_figures(model, solution, flanking, pair, meaning)
        if levels:
            compare(levels[-1], figures)
        levels.append(figures)
        if watch is not None:
            watch.add(model, solution, figures)  # the dynamic figures of this level
        report("solving", 0.1 + 0.8 * (1 - 0.6 ** (k + 1)))
        if met(levels, options.accuracy, meaning.singular) and (watch is None or watch.settled()):
            break
        if k + 1 >= options.max_levels:
            warnings.append(f"refinement stopped at the level limit ({options.max_levels}) "
                            "before the accuracy target was met")
            break
        eta = error_indicators(model, solution)
        mesh = next_level(mesh, eta if watch is None else watch.indicators(eta), order)
    return levels, solution, warnings, watch


def _release_solvers(solution: LevelSolution) -> None:
    for run in (solution.design, solution.condensation):
        if run is not None:
            run.problem.release()


def _result(model, flanking, pair, levels, solution: LevelSolution, warnings) -> dict:
    options = model.request.options
    final = levels[-1]
    flow_target, temperature_target = TARGETS[options.accuracy]
    iso = iso_comparison(levels)
    out = results.heat_flow_block(model, solution)
    out["psi"] = results.psi_block(model, solution, flanking, pair)
    out["probes"] = results.probe_block(model, solution)
    out["surfaces"] = results.surface_block(model, solution)
    out["condensation"] = results.condensation_block(model, solution)
    out["mesh"] = {
        "nodes": int(final.nodes), "elements": int(final.elements), "dofs": int(final.dofs),
        "element": options.element,
        "relative_change": None if iso is None else iso[0],
        "converged": bool(iso is not None and iso[0] < ISO_RULE),
        "target": {"relative_change": flow_target, "temperature_change": temperature_target},
        "target_met": met(levels, options.accuracy),
        "estimated_remaining_change": tail_estimate(
            [level.coupling_sum for level in levels], relative=True),
        "compared_with_nodes": None if iso is None else iso[1],
        "levels": [level.as_dict() for level in levels],
    }
    if options.sensitivities and pair is not None:
        out["sensitivities"] = results.sensitivities(model, solution, flanking, pair)
    warnings = warnings + results.energy_warnings(model, solution)
    warnings += results.cutoff_warnings(model, solution)
    warnings = units.plausibility_warnings(model.section) + warnings
    out["materials"] = results.materials_block(model)
    out["cavities"] = [{k: v for k, v in c.items() if k != "material_index" and k[0] != "_"}
                       for c in model.cavities]
    out["warnings"] = warnings
    out["caution"] = CAUTION
    out["engine_version"] = ENGINE_VERSION
    out["name"] = model.section.name
    return units.add_section_coordinates(_jsonable(out), model.section)


def _without_meaningless(out: dict, meaning: singular.Meaning, levels, model) -> dict:
    """Figures the known temperatures make meaningless become null with the reason: the heat
    flow (and L2D, ψ, sensitivities) of a singular section, whose certificate is then on
    temperatures; fRsi and the verdict where the interior surface meets a known temperature."""
    notes = []
    if meaning.singular:
        reason = singular.heat_flow_reason(meaning.heat_flow)
        notes.append("heat flow singular: " + reason)
        out["heat_flows"] = {env: None for env in out["heat_flows"]}
        if "L2D" in out:
            out["L2D"] = None
        if "coupling_coefficients" in out:
            out["coupling_coefficients"] = None
        if out.get("psi"):
            out["psi"].update(value=None, L2D=None, not_given=reason)
        out.pop("sensitivities", None)
        out["mesh"] = _temperature_certificate(out["mesh"], levels, model, meaning)
        if not model.section.probes and levels[-1].design_min_temperature is None and \
                levels[-1].min_temperature is None:
            notes.append("no temperature to certify the mesh on: add probes (section.probes) "
                         "where the temperatures are wanted")
    if meaning.frsi and out.get("condensation"):
        reason = singular.frsi_reason(meaning.frsi)
        notes.append("no fRsi: " + reason)
        keep = ("environment", "indoor_temperature", "outdoor_temperature",
                "indoor_relative_humidity", "interior_surface_resistance")
        block = out["condensation"]
        out["condensation"] = {**{k: block[k] for k in keep if k in block},
                               "fRsi": None, "fRsi_critical": None, "min_temperature": None,
                               "at": None, "verdict": None, "not_assessed": reason}
    out["warnings"] = notes + out["warnings"]
    return out


def _temperature_certificate(mesh: dict, levels, model, meaning) -> dict:
    """``mesh`` of a singular section: converged and target_met on the temperatures."""
    accuracy = model.request.options.accuracy
    certificate = {**mesh, "relative_change": None, "estimated_remaining_change": None,
                     "compared_with_nodes": None}
    certificate.update(
        certified_on="temperatures",
        heat_flow_singular=singular.singular_block(meaning.heat_flow),
        converged=met(levels, "iso", singular=True),
        target_met=met(levels, accuracy, singular=True),
        probe_change=levels[-1].probe_change,
        temperature_change=levels[-1].temperature_change,
        levels=[{**level, "heat_flow": None, "coupling_sum": None, "relative_change": None}
                for level in mesh["levels"]])
    return certificate


def _jsonable(value):
    if isinstance(value, dict):
        return {k: _jsonable(v) for k, v in value.items()}
    if isinstance(value, list | tuple):
        return [_jsonable(v) for v in value]
    if isinstance(value, np.ndarray):
        return _jsonable(value.tolist())
    if isinstance(value, np.floating | float):
        return float(value)
    if isinstance(value, np.integer):
        return int(value)
    return value
