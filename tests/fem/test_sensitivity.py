"""Sensitivities ∂Φ/∂ln λ: the adjoint of an environment's heat flow is known without a solve."""

from __future__ import annotations

import numpy as np
import pytest
from test_adapt import square

from coldseam.fem.adapt import longest_edge_first
from coldseam.fem.mesh import Mesh
from coldseam.fem.system import ConductionProblem, make_space


@pytest.mark.parametrize("left_resistance", [0.13, 0.0])
def test_the_adjoint_of_an_environments_heat_flow_is_its_unit_solution(left_resistance):
    """∂Φ/∂ln λ with the adjoint solved, and with the environment's own unit solution in its
    place (the shortcut the engine takes): equal, for a surface resistance and for a known
    temperature (reactions) alike."""
    from coldseam.fem.system import log_conductivity_sensitivity

    mesh = longest_edge_first(square(5))
    material = (mesh.points[mesh.triangles].mean(axis=1)[:, 0] > 0.5).astype(int)
    mesh = Mesh(mesh.points, mesh.triangles, material, mesh.boundary_edges, mesh.boundary_group)
    space = make_space(mesh, 2)
    conductivity = np.where(material[:, None] == 1, [[0.04, 0.04]], [[1.7, 0.9]])
    h_left = np.inf if left_resistance == 0 else 1 / left_resistance
    conductance = np.where(mesh.boundary_group == 0, h_left, 25.0)
    problem = ConductionProblem(space, conductivity, conductance)
    units = problem.solve(np.stack([mesh.boundary_group == 0, mesh.boundary_group == 1],
                                   axis=1).astype(float))
    solved = log_conductivity_sensitivity(problem, units[:, 1], np.array([0]), 2)
    shortcut = log_conductivity_sensitivity(problem, units[:, 1], np.array([0]), 2,
                                            weight=units[:, 0])
    assert np.abs(solved).min() > 0
    assert np.allclose(shortcut, solved, rtol=1e-10, atol=0)
