"""Result blocks of model-v1 computed from a solved level."""

from __future__ import annotations

import numpy as np

from coldseam.errors import InvalidSection
from coldseam.fem.system import log_conductivity_sensitivity
from coldseam.thermal import humidity
from coldseam.thermal.levels import LevelFigures
from coldseam.thermal.model import ThermalModel
from coldseam.thermal.psi import FlankingU
from coldseam.thermal.singular import Meaning
from coldseam.thermal.solve import LevelSolution, Run

BALANCE = 1e-4  # ISO 10211: Σ flows / (½ Σ |flows|)


def psi_pair(model: ThermalModel) -> tuple[int, int] | None:
    """Environments (a, b) whose coupling is L2D: the ψ request's pair, or the only two."""
    ids = model.env_ids
    psi = model.request.psi
    if psi is not None and psi.environments is not None:
        for k, env in enumerate(psi.environments):
            if env not in ids:
                raise InvalidSection(f"environment '{env}' is not among the environments "
                                     f"({', '.join(ids)})", f"/psi/environments/{k}")
        a, b = (ids.index(e) for e in psi.environments)
        if a == b:
            raise InvalidSection("ψ needs two different environments", "/psi/environments")
        return a, b
    if len(ids) == 2:
        interior = np.flatnonzero(model.env_interior)
        a = int(interior[0]) if len(interior) == 1 else 0
        return a, 1 - a
    if psi is not None:
        raise InvalidSection("with more than two environments, say between which two ψ is "
                             "computed: psi.environments = [interior id, exterior id]",
                             "/psi/environments")
    return None


def primary_interior(model: ThermalModel) -> int | None:
    """The interior environment the fRsi check is about: the warmest one."""
    interior = np.flatnonzero(model.env_interior)
    if len(interior) == 0:
        return None
    return int(interior[np.argmax(model.env_temperature[interior])])


def interior_minimum(model: ThermalModel, run: Run) -> tuple[float, int] | None:
    """Lowest temperature on the surfaces of the primary (warmest) interior environment
    (actual temperatures) and its dof."""
    space = run.problem.space
    primary = primary_interior(model)
    interior_edge = model.boundary_env[space.mesh.boundary_group] == primary
    dofs = np.unique(space.edge_dofs[interior_edge])
    if len(dofs) == 0:
        return None
    theta = run.theta
    k = int(dofs[np.argmin(theta[dofs])])
    return float(theta[k]), k


def level_figures(model, solution: LevelSolution, flanking: list[FlankingU], pair,
                  meaning: Meaning | None = None):
    """The figures of one level the certificate compares; minima that a known temperature
    fixes by construction (``meaning``, see ``coldseam.thermal.singular``) are left out."""
    run = solution.design
    coupling = run.coupling
    upper = coupling[np.triu_indices(len(coupling), 1)]
    sum_ul = sum(f.u_value * f.length for f in flanking)
    psi = float(coupling[pair] - sum_ul) if (pair and model.request.psi) else None
    checked = solution.condensation or run
    minimum = None if meaning and meaning.frsi else interior_minimum(model, checked)
    design_minimum = None if meaning and meaning.design_minimum else interior_minimum(model, run)
    return LevelFigures(
        nodes=solution.mesh.nodes, dofs=solution.space.dofs, elements=solution.mesh.elements,
        heat_flow=float(0.5 * np.abs(run.heat_flows).sum()), coupling_sum=float(upper.sum()),
        psi=None if meaning and meaning.singular else psi,
        min_temperature=None if minimum is None else minimum[0],
        design_min_temperature=None if design_minimum is None else design_minimum[0],
        probe_values=tuple(float(v) for v in run.theta[solution.probe_nodes]))


def heat_flow_block(model: ThermalModel, solution: LevelSolution) -> dict:
    run = solution.design
    ids = model.env_ids
    out: dict = {"heat_flows": dict(zip(ids, run.heat_flows.tolist(), strict=True))}
    coupling = run.coupling
    if len(ids) == 2:
        out["L2D"] = float(0.5 * (coupling[0, 1] + coupling[1, 0]))
    else:
        out["coupling_coefficients"] = {"environments": ids,
                                        "matrix": (0.5 * (coupling + coupling.T)).tolist()}
    return out


def psi_block(model, solution, flanking: list[FlankingU], pair) -> dict | None:
    psi = model.request.psi
    if psi is None or pair is None:
        return None
    coupling = solution.design.coupling
    l2d = float(0.5 * (coupling[pair] + coupling[pair[::-1]]))
    sum_ul = sum(f.u_value * f.length for f in flanking)
    ids = model.env_ids
    out = {
        "value": l2d - sum_ul, "L2D": l2d, "sum_UL": sum_ul, "dimensions": psi.dimensions,
        "environments": [ids[pair[0]], ids[pair[1]]],
        "flanking": [_flanking_dict(model, f) for f in flanking],
    }
    if psi.frame is not None:
        out["frame"] = frame_block(psi.frame, l2d, model.section.scale)
    return out


def frame_block(frame, l2d: float, scale: float) -> dict:
    """U_f = (L2D − U_p·b_p) / b_f, W/(m²·K) (ISO 10077-2 calibration panel); widths in m."""
    panel_width, frame_width = frame.panel.width * scale, frame.frame_width * scale
    panel_flow = frame.panel.u_value * panel_width
    return {"u_frame": (l2d - panel_flow) / frame_width, "L2D": l2d,
            "frame_width": frame_width, "panel": {"width": panel_width,
                                                  "u_value": frame.panel.u_value,
                                                  "UL": panel_flow},
            "source": "U_f = (L2D − U_p·b_p)/b_f, ISO 10077-2 calibration-panel method"}


def _flanking_dict(model, f: FlankingU) -> dict:
    out = {"id": f.id, "u_value": f.u_value, "length": f.length, "UL": f.u_value * f.length}
    if f.layers:
        out["layers"] = [{"material": model.materials[layer.material].id,
                          "thickness": layer.thickness, "conductivity": layer.conductivity}
                         for layer in f.layers]
        out["surface_resistances"] = list(f.surface_resistances)
        out["source"] = "cut: U = 1/(Rs + Σ d/λ + Rs), ISO 6946"
    else:
        out["source"] = "given"
    return out


def probe_block(model, solution: LevelSolution) -> dict:
    theta = solution.design.theta
    return {p.id: float(theta[k]) for p, k in
            zip(model.section.probes, solution.probe_nodes, strict=True)}


def surface_block(model, solution: LevelSolution) -> dict:
    run = solution.design
    space = run.problem.space
    theta = run.theta
    env_of_edge = model.boundary_env[space.mesh.boundary_group]
    out = {}
    for k, env in enumerate(model.section.environments):
        dofs = np.unique(space.edge_dofs[env_of_edge == k])
        low, high = int(dofs[np.argmin(theta[dofs])]), int(dofs[np.argmax(theta[dofs])])
        length = float(run.problem.lengths[env_of_edge == k].sum())
        out[env.id] = {"side": env.side, "min_temperature": float(theta[low]),
                       "at": space.dof_points[low].tolist(),
                       "max_temperature": float(theta[high]), "length": length}
    return out


def condensation_block(model: ThermalModel, solution: LevelSolution) -> dict | None:
    run = solution.condensation
    if run is None:
        return None
    temperatures = model.env_temperature
    minimum = interior_minimum(model, run)
    if minimum is None:
        return None
    theta_min, k = minimum
    weights = run.unit[k]
    exterior = np.flatnonzero(~model.env_interior)
    primary = primary_interior(model)
    theta_i = float(temperatures[primary])
    theta_e = float(temperatures[exterior].min())
    if not theta_i > theta_e:
        return None  # no heating case to judge; skipped with a warning (energy_warnings)
    if len(temperatures) == 2:
        frsi = float(weights[primary])
    else:
        frsi = (theta_min - theta_e) / (theta_i - theta_e)
    block = humidity.assess_condensation(frsi, model.request.condensation, theta_i, theta_e)
    block["at"] = run.problem.space.dof_points[k].tolist()
    block["min_temperature_section"] = theta_min
    block["temperature_weighting"] = dict(zip(model.env_ids, weights.tolist(), strict=True))
    block["environment"] = model.env_ids[primary]
    if len(temperatures) > 2:
        block["environments"] = interior_weightings(model, run)
    return block


def interior_weightings(model: ThermalModel, run: Run) -> dict:
    """Per interior environment: the lowest surface temperature and its ISO 10211 temperature
    weighting factors g (θsi = Σ gj θj, Σ g = 1)."""
    space = run.problem.space
    env_of_edge = model.boundary_env[space.mesh.boundary_group]
    theta = run.theta
    out = {}
    for env in np.flatnonzero(model.env_interior):
        dofs = np.unique(space.edge_dofs[env_of_edge == env])
        k = int(dofs[np.argmin(theta[dofs])])
        out[model.env_ids[env]] = {
            "min_temperature": float(theta[k]), "at": space.dof_points[k].tolist(),
            "temperature_weighting": dict(zip(model.env_ids, run.unit[k].tolist(), strict=True))}
    return out


def materials_block(model) -> list[dict]:
    """The section's materials with λ and source; a cavity material's λeq is per cavity
    (listed under ``cavities``), so its conductivity here is None."""
    out = []
    for section_material, use in zip(model.section.materials, model.materials, strict=False):
        cavity = section_material.cavity is not None
        entry = {"id": use.id, "conductivity": None if cavity else list(use.conductivity),
                 "source": use.source, **({"cavity": True} if cavity else {})}
        if not cavity and use.density is not None and use.specific_heat is not None:
            entry.update(density=use.density, specific_heat=use.specific_heat,
                         capacity_source=use.capacity_source)
        out.append(entry)
    return out


def sensitivities(model, solution: LevelSolution, flanking, pair) -> list[dict]:
    """∂L2D/∂ln λ and, when ψ is requested, ∂ψ/∂ln λ per material (W/(m·K) per unit
    relative change of λ)."""
    run = solution.design
    a, b = pair
    groups = np.flatnonzero(model.boundary_env == a)
    n = len(model.materials)
    # The adjoint of environment a's heat flow is a's unit solution: no extra solve.
    dflow = log_conductivity_sensitivity(run.problem, run.unit[:, b], groups, n,
                                         weight=run.unit[:, a])
    dl2d = -dflow  # L_ab = −Φ_a with θ_b = 1
    dsum_ul = sum((f.length * f.dU_dlnlambda(n) for f in flanking), np.zeros(n))
    with_psi = model.request.psi is not None  # without a ψ request there is no ψ to move
    cavity_bases = {k for k, m in enumerate(model.section.materials) if m.cavity is not None}
    return [{"material": m.id, "dL2D_dlnlambda": float(dl2d[i]),
             "dpsi_dlnlambda": float(dl2d[i] - dsum_ul[i]) if with_psi else None}
            for i, m in enumerate(model.materials)
            if i not in cavity_bases]  # a cavity material's λ is per cavity, listed as such


def energy_warnings(model, solution: LevelSolution) -> list[str]:
    out = []
    unit_flows = solution.design.unit_flows  # columns: one environment at 1 K, others at 0
    scale = 0.5 * np.abs(unit_flows).sum(axis=0)
    imbalance = float(np.max(np.abs(unit_flows.sum(axis=0)) / np.maximum(scale, 1e-300)))
    if imbalance > BALANCE:
        out.append(f"energy balance off by {imbalance:.1e} of the heat flow "
                   "(ISO 10211 asks for under 1e-4)")
    if model.has_condensation_run():
        temperatures = model.env_temperature
        if not temperatures[model.env_interior].max() > temperatures[~model.env_interior].min():
            out.append("no fRsi / condensation check: in this section no interior environment "
                       "is warmer than the exterior, so a temperature factor means nothing")
    return out


def cutoff_warnings(model, solution: LevelSolution) -> list[str]:
    from coldseam.thermal.cutoff import check_cutoffs

    return check_cutoffs(model, solution)
