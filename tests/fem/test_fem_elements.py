"""Element matrices a person can check by hand, and mesh refinement invariants."""

import numpy as np
import pytest

from coldseam.fem import p1, p2
from coldseam.fem.mesh import Mesh, refine_uniform, signed_areas
from coldseam.fem.system import ConductionProblem, make_space


def unit_triangle(lam=(1.0, 1.0)):
    points = np.array([[0.0, 0.0], [1.0, 0.0], [0.0, 1.0]])
    mesh = Mesh(points, np.array([[0, 1, 2]]), np.array([0]), np.array([[0, 1]]),
                np.array([0]))
    return mesh, np.array([lam], float)


def test_p1_stiffness_of_the_unit_right_triangle():
    # By hand: ∇λ0 = (-1,-1), ∇λ1 = (1,0), ∇λ2 = (0,1), area 1/2.
    mesh, lam = unit_triangle()
    k = p1.local_stiffness(p1.space(mesh), lam)[0]
    expected = 0.5 * np.array([[2.0, -1.0, -1.0], [-1.0, 1.0, 0.0], [-1.0, 0.0, 1.0]])
    np.testing.assert_allclose(k, expected, atol=1e-15)


def test_p1_orthotropic_stiffness_scales_each_direction():
    mesh, lam = unit_triangle((2.0, 3.0))
    k = p1.local_stiffness(p1.space(mesh), lam)[0]
    # x-part: 0.5·2·[[1,-1,0],[-1,1,0],[0,0,0]]; y-part: 0.5·3·[[1,0,-1],[0,0,0],[-1,0,1]]
    expected = np.array([[1 + 1.5, -1, -1.5], [-1, 1, 0], [-1.5, 0, 1.5]])
    np.testing.assert_allclose(k, expected, atol=1e-14)


@pytest.mark.parametrize("family", [p1, p2])
def test_stiffness_is_symmetric_and_annihilates_constants(family):
    mesh, lam = unit_triangle((0.7, 1.9))
    k = family.local_stiffness(family.space(mesh), lam)[0]
    np.testing.assert_allclose(k, k.T, atol=1e-14)
    np.testing.assert_allclose(k.sum(axis=1), 0.0, atol=1e-13)


def test_p2_stiffness_reproduces_a_quadratic_energy():
    # θ = x² on the unit triangle: ∫|∇θ|² = ∫ 4x² dA = 4·(1/12) = 1/3 (exact by hand).
    mesh, lam = unit_triangle()
    space = p2.space(mesh)
    theta = space.dof_points[:, 0] ** 2
    k = p2.local_stiffness(space, lam)[0]
    dofs = space.cell_dofs[0]
    assert theta[dofs] @ k @ theta[dofs] == pytest.approx(1.0 / 3.0, rel=1e-13)


def test_edge_weights_integrate_polynomials_exactly():
    # ∫₀¹ φᵢ φⱼ ds rows sum to ∫ φᵢ ds (partition of unity), for both families.
    for family in (p1, p2):
        np.testing.assert_allclose(family.EDGE_MASS.sum(axis=1), family.EDGE_LOAD, atol=1e-15)
        assert family.EDGE_LOAD.sum() == pytest.approx(1.0)


def test_refinement_keeps_area_nodes_and_boundary_length():
    mesh, _ = unit_triangle()
    fine = refine_uniform(refine_uniform(mesh))
    assert fine.elements == 16
    assert signed_areas(fine.points, fine.triangles).sum() == pytest.approx(0.5)
    np.testing.assert_array_equal(fine.points[:3], mesh.points)
    lengths = np.linalg.norm(np.diff(fine.points[fine.boundary_edges], axis=1)[:, 0], axis=1)
    assert lengths.sum() == pytest.approx(1.0)
    assert len(fine.boundary_edges) == 4


def test_mesh_refuses_clockwise_triangles():
    points = np.array([[0.0, 0.0], [1.0, 0.0], [0.0, 1.0]])
    with pytest.raises(ValueError, match="counter-clockwise"):
        Mesh(points, np.array([[0, 2, 1]]), np.array([0]), np.zeros((0, 2), int),
             np.zeros(0, int))


@pytest.mark.parametrize("order", [1, 2])
def test_known_temperature_edges_fix_their_dofs(order):
    mesh, lam = unit_triangle()
    mesh = refine_uniform(mesh)
    problem = ConductionProblem(make_space(mesh, order), np.repeat(lam, mesh.elements, axis=0),
                                np.full(len(mesh.boundary_edges), np.inf))
    theta = problem.solve(np.full(len(mesh.boundary_edges), 7.5))
    np.testing.assert_allclose(theta, 7.5, atol=1e-12)  # one fixed edge, rest adiabatic
