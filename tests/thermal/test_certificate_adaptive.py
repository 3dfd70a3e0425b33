"""The adaptive level sequence and its certificate on junctions with singular corners."""

from __future__ import annotations

import pytest

from coldseam.schema import parse_request
from coldseam.templates import build
from coldseam.thermal.evaluate import evaluate
from coldseam.thermal.levels import mesh_levels
from coldseam.thermal.model import prepare
from coldseam.thermal.results import interior_minimum
from coldseam.thermal.solve import solve_level

FLOW_TARGET, TEMPERATURE_TARGET = 1e-3, 0.01  # the engine's default targets


@pytest.mark.parametrize("template_id", ["balcony", "window_reveal"])
def test_reentrant_corner_junctions_are_certified_on_nested_levels(template_id):
    """Junctions whose re-entrant corners made uniform splits run out of levels are certified
    at the default target, and the levels behave as nested Galerkin spaces must: with two
    environments the heat flow at unit temperature difference is the minimum of the energy,
    so it can only decrease from one level to the next."""
    result = evaluate(parse_request(build(template_id, {}))).result
    mesh = result["mesh"]
    assert mesh["target_met"] and mesh["converged"], mesh
    assert not any("level limit" in w for w in result["warnings"])
    levels = mesh["levels"]
    flows = [level["coupling_sum"] for level in levels]
    assert all(b <= a * (1 + 1e-12) for a, b in zip(flows, flows[1:], strict=False)), flows
    growth = [b["nodes"] / a["nodes"] for a, b in zip(levels, levels[1:], strict=False)]
    assert min(growth) >= 1.8, growth  # about one doubling of cells per level (ISO 10211)
    assert mesh["compared_with_nodes"] == levels[-2]["nodes"]


def test_certified_balcony_agrees_with_an_independent_uniform_sequence():
    """The adaptive answer against the older, independent sequence of uniform splits solved to
    ~25k nodes (P2): within the certificate's target plus that reference's own uncertainty,
    the change over its last doubling of cells."""
    request = parse_request(build("balcony", {}))
    result = evaluate(request).result
    model = prepare(request)
    meshes = []
    for mesh, probes in mesh_levels(model.classified):
        if mesh.nodes > 30_000:
            break
        meshes.append((mesh, probes))
    fine, coarser = (solve_level(model, *meshes[k], 2) for k in (-1, -3))
    l2d = [s.design.coupling[0, 1] for s in (fine, coarser)]
    theta = [interior_minimum(model, s.condensation)[0] for s in (fine, coarser)]
    flow_uncertainty = abs(l2d[0] - l2d[1])
    assert abs(result["L2D"] - l2d[0]) <= FLOW_TARGET * l2d[0] + flow_uncertainty
    temperature_uncertainty = abs(theta[0] - theta[1])
    assert (abs(result["condensation"]["min_temperature"] - theta[0])
            <= TEMPERATURE_TARGET + temperature_uncertainty)
    # The comparison has teeth only if the reference is fine enough: its own uncertainty must
    # be of the order of the target, not far above it.
    assert flow_uncertainty < 2 * FLOW_TARGET * l2d[0]
    assert temperature_uncertainty < 2 * TEMPERATURE_TARGET
