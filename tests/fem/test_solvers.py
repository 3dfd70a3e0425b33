"""The linear solvers agree with each other and refuse unconverged answers."""

import numpy as np
import pytest
import scipy.sparse as sp

from coldseam.errors import SolveFailed
from coldseam.fem import solvers


def conduction_like(n=40, contrast=1e3):
    """A 2D five-point SPD matrix with a strong coefficient jump and a Robin-like shift."""
    k = np.ones((n, n))
    k[:, n // 2:] = 1.0 / contrast
    idx = np.arange(n * n).reshape(n, n)
    rows, cols, vals = [], [], []
    for (a, b), w in [((idx[:, :-1], idx[:, 1:]), np.minimum(k[:, :-1], k[:, 1:])),
                      ((idx[:-1], idx[1:]), np.minimum(k[:-1], k[1:]))]:
        for i, j, v in zip(a.ravel(), b.ravel(), w.ravel(), strict=True):
            rows += [i, j, i, j]
            cols += [j, i, i, j]
            vals += [-v, -v, v, v]
    matrix = sp.coo_matrix((vals, (rows, cols)), shape=(n * n, n * n)).tocsc()
    return (matrix + sp.eye(n * n, format="csc") * 1e-3).tocsc()


def test_every_solver_meets_the_residual():
    matrix = conduction_like()
    rhs = np.random.default_rng(1).normal(size=(matrix.shape[0], 2))
    candidates = [solvers.DirectSolver(matrix), solvers.MultigridSolver(matrix)]
    cholmod = solvers._cholmod()
    if cholmod is not None:
        candidates.append(solvers.CholeskySolver(matrix, cholmod))
    qdldl = solvers._qdldl()
    if qdldl is not None:
        candidates.append(solvers.LdlSolver(matrix, qdldl))
    for solver in candidates:
        x = solver.solve(rhs)
        residual = np.linalg.norm(rhs - matrix @ x, axis=0) / np.linalg.norm(rhs, axis=0)
        assert residual.max() < 1e-8, type(solver).__name__


def test_without_cholmod_or_qdldl_the_lu_solver_is_used(monkeypatch):
    monkeypatch.setattr(solvers, "_cholmod", lambda: None)
    monkeypatch.setattr(solvers, "_qdldl", lambda: None)
    assert isinstance(solvers.factorize(conduction_like(10)), solvers.DirectSolver)


def test_the_plain_install_factorises_by_ldl_and_agrees_with_lu(monkeypatch):
    """COLDSEAM_CHOLMOD=0 takes the path of a plain pip install (QDLDL, a regular dependency)."""
    monkeypatch.setenv("COLDSEAM_CHOLMOD", "0")
    matrix = conduction_like(20)
    solver = solvers.factorize(matrix)
    assert isinstance(solver, solvers.LdlSolver)
    rhs = np.random.default_rng(3).normal(size=(matrix.shape[0], 3))
    expected = solvers.DirectSolver(matrix).solve(rhs)
    assert np.abs(solver.solve(rhs) - expected).max() < 1e-10 * np.abs(expected).max()
    assert np.abs(solver.solve(rhs[:, 1]) - expected[:, 1]).max() < 1e-10 * np.abs(
        expected).max()


def test_the_upper_triangle_is_scipys():
    matrix = conduction_like(12)
    upper = solvers.upper_triangle(matrix)
    expected = sp.triu(matrix, format="csc")
    assert upper.has_sorted_indices
    assert abs(upper - expected).max() == 0 and upper.nnz >= expected.nnz


def test_a_singular_matrix_falls_back_from_ldl_to_lu(monkeypatch):
    monkeypatch.setenv("COLDSEAM_CHOLMOD", "0")
    singular = sp.csc_matrix(np.array([[1.0, -1.0], [-1.0, 1.0]]))
    judged = []
    monkeypatch.setattr(solvers, "DirectSolver", lambda matrix: judged.append(matrix) or "LU")
    assert solvers.factorize(singular) == "LU"
    assert len(judged) == 1


def test_an_unconverged_iterative_solve_is_an_error(monkeypatch):
    matrix = conduction_like(30, contrast=1e6)
    solver = solvers.MultigridSolver(matrix)
    original = solver.hierarchy.solve
    monkeypatch.setattr(solver.hierarchy, "solve",
                        lambda b, **kw: original(b, **{**kw, "maxiter": 1}))
    with pytest.raises(SolveFailed):
        solver.solve(np.ones(matrix.shape[0]))


def layered_problem(refinements=5):
    """P2 problem on a unit square split into a conductor and an insulator, Robin on one side
    and a known temperature on the other."""
    from coldseam.fem.mesh import Mesh, refine_uniform
    from coldseam.fem.system import ConductionProblem, make_space

    points = np.array([[0, 0], [0.5, 0], [1, 0], [1, 1], [0.5, 1], [0, 1]], float)
    triangles = np.array([[0, 1, 4], [0, 4, 5], [1, 2, 3], [1, 3, 4]])
    edges = np.array([[0, 5], [2, 3]])
    mesh = Mesh(points, triangles, np.array([0, 0, 1, 1]), edges, np.array([0, 1]))
    for _ in range(refinements):
        mesh = refine_uniform(mesh)
    lam = np.array([[160.0, 160.0], [0.03, 0.03]])[mesh.material]
    conductance = np.where(mesh.boundary_group == 0, 7.7, np.inf)
    return ConductionProblem(make_space(mesh, 2), lam, conductance)


def test_two_level_p2_solver_matches_the_direct_solve(monkeypatch):
    problem = layered_problem()
    ambient = (problem.space.mesh.boundary_group == 0).astype(float)
    direct = problem.solve(ambient)
    iterative = layered_problem()
    monkeypatch.setattr(solvers, "DIRECT_LIMIT", 100)
    monkeypatch.setattr(solvers, "CHOLESKY_LIMIT", 100)
    theta = iterative.solve(ambient)
    from coldseam.fem.pmultigrid import TwoLevelSolver

    assert isinstance(iterative.solver, TwoLevelSolver)
    assert np.abs(theta - direct).max() < 1e-7


def design_then_condensation():
    """A layered problem solved, then the same with another surface resistance on the warm
    side (the condensation run's situation): both problems, ambient, conductance, its field."""
    design = layered_problem(4)
    ambient = (design.space.mesh.boundary_group == 0).astype(float)
    design.solve(ambient)
    conductance = np.where(design.space.mesh.boundary_group == 0, 4.0, np.inf)
    condensation = design.with_conductance(conductance)
    return design, condensation, ambient, conductance, condensation.solve(ambient)


def test_other_surface_resistances_are_solved_through_the_nearby_factorisation():
    design, condensation, ambient, conductance, theta = design_then_condensation()
    assert isinstance(condensation.solver, solvers.NearbySolver)
    from coldseam.fem.system import ConductionProblem

    fresh = ConductionProblem(design.space, design.conductivity, conductance)
    assert np.abs(theta - fresh.solve(ambient)).max() < 1e-9


def test_other_surface_resistances_reuse_the_two_level_coarse_factorisation(monkeypatch):
    monkeypatch.setattr(solvers, "DIRECT_LIMIT", 100)
    monkeypatch.setattr(solvers, "CHOLESKY_LIMIT", 100)
    design, condensation, ambient, conductance, theta = design_then_condensation()
    assert condensation.solver.coarse is design.solver.coarse
    assert condensation.solver.matrix is not design.solver.matrix
    monkeypatch.setattr(solvers, "DIRECT_LIMIT", 300_000)
    monkeypatch.setattr(solvers, "CHOLESKY_LIMIT", 1_500_000)
    from coldseam.fem.system import ConductionProblem

    fresh = ConductionProblem(design.space, design.conductivity, conductance)
    assert np.abs(theta - fresh.solve(ambient)).max() < 1e-7
