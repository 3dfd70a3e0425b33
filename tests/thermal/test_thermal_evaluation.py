"""ψ, fRsi, several environments, sensitivities and the convergence certificate."""

import numpy as np
import pytest
from sections import corner, layered_wall, run, total_resistance

from coldseam.schema import parse_request
from coldseam.thermal.levels import mesh_levels
from coldseam.thermal.model import prepare
from coldseam.thermal.results import psi_pair, sensitivities
from coldseam.thermal.solve import solve_level

WALL = [("render", 0.87, 12.0), ("eps", 0.032, 140.0), ("concrete", 2.3, 180.0)]


def test_plain_wall_frsi_is_one_minus_rsi_over_rt():
    # ISO 13788 definition: for a 1D wall fRsi = 1 − Rsi/RT with RT taken with Rsi = 0.25.
    result = run(layered_wall(WALL))
    rt = total_resistance(WALL, rsi=0.25)
    assert result["condensation"]["fRsi"] == pytest.approx(1 - 0.25 / rt, rel=1e-9)


def test_plain_wall_psi_is_zero_and_cut_u_matches_iso_6946():
    section = layered_wall(WALL, height=1200)
    request = {"section": section,
               "psi": {"flanking": [{"id": "wall", "length": 1200, "cut": [[0, 600], [332, 600]]}]}}
    result = run(request)
    flanking = result["psi"]["flanking"][0]
    # ISO 6946: U = 1 / (Rsi + Σ d/λ + Rse)
    assert flanking["u_value"] == pytest.approx(1 / total_resistance(WALL), rel=1e-9)
    assert [layer["material"] for layer in flanking["layers"]] == ["render", "eps", "concrete"]
    assert abs(result["psi"]["value"]) < 1e-6


def test_cut_through_an_orthotropic_layer_uses_the_conductivity_along_the_cut():
    section = layered_wall([("a", 0.5, 100.0), ("b", 1.0, 200.0)])
    section["materials"][0]["conductivity"] = [0.5, 0.05]  # λx across the wall
    request = {"section": section,
               "psi": {"flanking": [{"id": "w", "length": 1000, "cut": [[0, 500], [300, 500]]}]}}
    u = run(request)["psi"]["flanking"][0]["u_value"]
    assert u == pytest.approx(1 / (0.13 + 0.04 + 0.1 / 0.5 + 0.2 / 1.0), rel=1e-12)


def corner_psi(dimensions, rsi=0.13, rse=0.04):
    t, leg = 300.0, 2000.0
    section = corner(thickness=t, leg=leg, lam=0.8, rsi=rsi, rse=rse)
    length = leg - t if dimensions == "internal" else leg
    cut_a = [[1000, 0], [1000, 300]]
    cut_b = [[0, 1000], [300, 1000]]
    return run({"section": section, "psi": {"dimensions": dimensions, "flanking": [
        {"id": "wall-a", "length": length, "cut": cut_a},
        {"id": "wall-b", "length": length, "cut": cut_b}]}})


def test_external_corner_identity_psi_e_equals_psi_i_minus_2Ut():
    # ISO 13789 / ISO 14683 dimension systems: same L2D, lengths differ by the thickness t.
    internal, external = corner_psi("internal"), corner_psi("external")
    u = internal["psi"]["flanking"][0]["u_value"]
    assert external["psi"]["dimensions"] == "external"
    assert external["psi"]["value"] == pytest.approx(internal["psi"]["value"] - 2 * u * 0.3,
                                                     abs=1e-9)


def test_corner_psi_against_the_textbook_shape_factor():
    # Incropera & DeWitt, Table 4.1: edge of two adjoining walls, S = 0.54·D per unit length
    # (approximate, ±5 %); isothermal faces give ψi = λ·0.54.
    section = corner(thickness=200, leg=2000, lam=1.0)
    request = {"section": section, "psi": {"flanking": [
        {"id": "a", "length": 1800, "u_value": 5.0}, {"id": "b", "length": 1800, "u_value": 5.0}]}}
    assert run(request)["psi"]["value"] == pytest.approx(0.54, rel=0.05)


def three_environments():
    """External wall with a partition: heated room, unheated stair, outside."""
    return {
        "unit": "mm",
        "materials": [{"id": "brick", "conductivity": 0.77}, {"id": "min-wool", "conductivity": 0.035},
                      {"id": "block", "conductivity": 0.5}],
        "regions": [
            {"material": "min-wool", "polygon": [[0, 0], [100, 0], [100, 2000], [0, 2000]]},
            {"material": "brick", "polygon": [[100, 0], [340, 0], [340, 2000], [100, 2000]]},
            {"material": "block", "polygon": [[340, 950], [1400, 950], [1400, 1050], [340, 1050]]}],
        "environments": [{"id": "room", "temperature": 21, "side": "interior"},
                         {"id": "stair", "temperature": 8, "side": "interior"},
                         {"id": "outside", "temperature": -3, "side": "exterior"}],
        "boundaries": [
            {"environment": "outside", "surface_resistance": 0.04, "path": [[0, 0], [0, 2000]]},
            {"environment": "room", "surface_resistance": 0.13,
             "path": [[340, 0], [340, 950], [1400, 950]]},
            {"environment": "stair", "surface_resistance": 0.13,
             "path": [[1400, 1050], [340, 1050], [340, 2000]]}],
    }


def test_three_environments_reciprocity_weights_and_superposition():
    request = parse_request(three_environments())
    model = prepare(request)
    mesh, probes = next(mesh_levels(model.classified))
    level = solve_level(model, mesh, probes, 2)
    coupling = level.design.coupling
    np.testing.assert_allclose(coupling, coupling.T, rtol=1e-9)  # Lij = Lji (ISO 10211)
    # superposition of unit solves equals a direct solve with the actual temperatures
    problem = level.design.problem
    ambient = model.env_temperature[model.boundary_env[mesh.boundary_group]]
    np.testing.assert_allclose(level.design.theta, problem.solve(ambient), atol=1e-10)
    result = run(three_environments())
    assert "coupling_coefficients" in result and "L2D" not in result
    weights = result["condensation"]["temperature_weighting"]
    assert sum(weights.values()) == pytest.approx(1.0, abs=1e-9)
    assert abs(sum(result["heat_flows"].values())) < 1e-8


def test_psi_with_three_environments_needs_the_pair():
    from coldseam.errors import InvalidSection

    request = {"section": three_environments(),
               "psi": {"flanking": [{"id": "w", "length": 1000, "u_value": 0.3}]}}
    with pytest.raises(InvalidSection) as err:
        run(request)
    assert err.value.field == "/psi/environments"
    request["psi"]["environments"] = ["room", "outside"]
    assert run(request)["psi"]["environments"] == ["room", "outside"]


def bridged_section():
    section = layered_wall(WALL, height=1000)
    section["materials"].append({"id": "steel", "conductivity": 50.0})
    section["regions"].append({"material": "steel",
                               "polygon": [[0, 495], [200, 495], [200, 505], [0, 505]]})
    return {"section": section, "psi": {"flanking": [
        {"id": "wall", "length": 1000, "cut": [[0, 200], [332, 200]]}]}}


def test_adjoint_sensitivities_equal_finite_differences():
    request = parse_request(bridged_section())
    model = prepare(request)
    mesh, probes = next(mesh_levels(model.classified))
    from coldseam.thermal.psi import flanking_values

    flanking = flanking_values(model)
    pair = psi_pair(model)
    adjoint = sensitivities(model, solve_level(model, mesh, probes, 2), flanking, pair)
    eps = 1e-5
    for k, material in enumerate(model.materials):
        values = []
        for sign in (1, -1):
            original = material.conductivity
            material.conductivity = tuple(c * np.exp(sign * eps) for c in original)
            level = solve_level(model, mesh, probes, 2)
            flank = flanking_values(model)
            values.append(level.design.coupling[pair] - sum(f.u_value * f.length for f in flank))
            material.conductivity = original
        fd = (values[0] - values[1]) / (2 * eps)
        assert adjoint[k]["dpsi_dlnlambda"] == pytest.approx(fd, rel=1e-4, abs=1e-9), material.id


def test_certificate_levels_shrink_and_final_value_is_within_target_of_a_fine_reference():
    result = run(bridged_section())
    levels = result["mesh"]["levels"]
    changes = [level["relative_change"] for level in levels[1:]]
    assert result["mesh"]["target_met"] and result["mesh"]["converged"]
    assert changes[-1] < changes[0]
    assert levels[-1]["nodes"] / result["mesh"]["compared_with_nodes"] > 1.5  # ~half the nodes
    fine = fine_reference(bridged_section())
    assert abs(result["L2D"] - fine["L2D"]) / fine["L2D"] < 1e-3
    assert abs(result["condensation"]["min_temperature"]
               - fine["condensation"]["min_temperature"]) < 0.01


def fine_reference(request):
    import coldseam.thermal.levels as levels

    saved = levels.TARGETS["default"]
    levels.TARGETS["default"] = (2e-5, 2e-4)
    try:
        return run({**request, "options": {"max_levels": 12}})
    finally:
        levels.TARGETS["default"] = saved


def test_humidity_class_and_fixed_criterion_verdicts():
    section = bridged_section()
    passing = run({**section, "condensation": {"indoor": {"relative_humidity": 0.5}}})
    assert passing["condensation"]["verdict"] == "pass"
    strict = run({**section, "condensation": {"criterion": 0.999}})
    assert strict["condensation"]["verdict"] == "fail"
    assert strict["condensation"]["margin"] < 0
    classed = run({**section, "condensation": {"indoor": {"humidity_class": 4}}})
    assert classed["condensation"]["fRsi_critical"] > passing["condensation"]["fRsi_critical"]
    assert "caution" in passing and "competent person" in passing["caution"]


def test_without_a_psi_request_only_l2d_sensitivities_are_given():
    result = run({"section": layered_wall([("eps", 0.035, 100.0), ("concrete", 2.3, 200.0)])})
    assert result["psi"] is None
    for entry in result["sensitivities"]:
        assert entry["dpsi_dlnlambda"] is None and entry["dL2D_dlnlambda"] > 0
