"""Newest-vertex bisection and the residual indicators that drive it."""

from __future__ import annotations

import numpy as np
import pytest

from coldseam.fem.adapt import longest_edge_first, refine_marked
from coldseam.fem.indicators import residual_indicators
from coldseam.fem.mesh import Mesh, refine_uniform, signed_areas, unique_edges
from coldseam.fem.system import ConductionProblem, make_space


def square(n: int = 4) -> Mesh:
    """Unit square, n × n cells each cut into two triangles; left edge group 0, right 1."""
    x = np.linspace(0.0, 1.0, n + 1)
    xx, yy = np.meshgrid(x, x)
    points = np.column_stack([xx.ravel(), yy.ravel()])
    index = np.arange((n + 1) ** 2).reshape(n + 1, n + 1)
    a, b = index[:-1, :-1].ravel(), index[:-1, 1:].ravel()
    c, d = index[1:, 1:].ravel(), index[1:, :-1].ravel()
    triangles = np.concatenate([np.stack([a, b, c], 1), np.stack([a, c, d], 1)])
    left = np.stack([index[1:, 0], index[:-1, 0]], 1)
    right = np.stack([index[:-1, -1], index[1:, -1]], 1)
    return Mesh(points, triangles, np.zeros(len(triangles), int),
                np.concatenate([left, right]), np.repeat([0, 1], n))


def min_angle(mesh: Mesh) -> float:
    p = mesh.points[mesh.triangles]
    angles = []
    for k in range(3):
        u, v = p[:, (k + 1) % 3] - p[:, k], p[:, (k + 2) % 3] - p[:, k]
        cos = np.einsum("ed,ed->e", u, v) / np.linalg.norm(u, axis=1) / np.linalg.norm(v, axis=1)
        angles.append(np.degrees(np.arccos(np.clip(cos, -1, 1))))
    return float(np.min(angles))


def assert_conforming(mesh: Mesh) -> None:
    edges, tri_edges = unique_edges(mesh.triangles)
    count = np.bincount(tri_edges.ravel(), minlength=len(edges))
    assert count.max() <= 2
    # A hanging node would leave a long side seen once inside the square: every side seen once
    # must lie on the square's outline.
    lonely = edges[count == 1]
    mid = 0.5 * (mesh.points[lonely[:, 0]] + mesh.points[lonely[:, 1]])
    on_outline = np.isclose(mid, 0.0).any(axis=1) | np.isclose(mid, 1.0).any(axis=1)
    assert on_outline.all()
    assert np.isclose(signed_areas(mesh.points, mesh.triangles).sum(), 1.0)


def test_marking_everything_is_the_uniform_split():
    mesh = longest_edge_first(square())
    refined, parent = refine_marked(mesh, np.ones(mesh.elements, bool))
    uniform = refine_uniform(mesh)
    assert refined.nodes == uniform.nodes and refined.elements == uniform.elements
    assert np.allclose(np.sort(refined.points, axis=0), np.sort(uniform.points, axis=0))
    assert np.array_equal(np.bincount(parent), np.full(mesh.elements, 4))
    assert len(refined.boundary_edges) == 2 * len(mesh.boundary_edges)


def test_local_refinement_stays_conforming_keeps_nodes_and_shapes():
    mesh = longest_edge_first(square())
    start_angle = min_angle(mesh)
    for _ in range(12):  # refine towards the corner (0, 0) twelve times
        centroid = mesh.points[mesh.triangles].mean(axis=1)
        marked = np.zeros(mesh.elements, bool)
        marked[np.argsort(np.linalg.norm(centroid, axis=1))[:3]] = True
        before = mesh.points.copy()
        mesh, parent = refine_marked(mesh, marked)
        assert np.array_equal(mesh.points[:len(before)], before)  # old nodes keep their index
        assert_conforming(mesh)
    # Newest-vertex bisection keeps every triangle within a few similarity classes of its
    # ancestor: the smallest angle cannot decay however deep the refinement goes.
    assert min_angle(mesh) >= 0.5 * start_angle
    smallest = np.sqrt(2 * signed_areas(mesh.points, mesh.triangles).min())
    assert smallest < 0.25 / 2 ** 10  # it did refine deeply at the corner
    # Boundary edges were split with their group: still one unit of length per side.
    lengths = np.linalg.norm(mesh.points[mesh.boundary_edges[:, 1]] -
                             mesh.points[mesh.boundary_edges[:, 0]], axis=1)
    assert np.allclose(np.bincount(mesh.boundary_group, weights=lengths), [1.0, 1.0])


@pytest.mark.parametrize("order", [1, 2])
def test_indicators_vanish_for_an_exactly_represented_field(order):
    """A wall with Robin sides left and right and adiabatic top and bottom: the exact field is
    linear, which both element families represent, so every residual is rounding."""
    mesh = longest_edge_first(square())
    space = make_space(mesh, order)
    conductivity = np.full((mesh.elements, 2), 0.8)
    conductance = np.array([1 / 0.13] * 4 + [1 / 0.04] * 4)
    ambient = np.repeat([[1.0], [0.0]], 4, axis=0)
    theta = ConductionProblem(space, conductivity, conductance).solve(ambient)
    eta = residual_indicators(space, conductivity, conductance, theta, ambient)[:, 0]
    flow = 1 / (0.13 + 1 / 0.8 + 0.04)
    assert eta.max() < 1e-20 * flow


@pytest.mark.parametrize("order", [1, 2])
def test_indicators_point_at_the_reentrant_corner(order):
    """An L-shaped conductor (the square without its upper-right quarter), hot on the left
    side, cold at the end of its lower arm, adiabatic elsewhere: the heat turns round the
    re-entrant corner (½, ½), where the field is singular and the largest indicator sits."""
    mesh = longest_edge_first(square(8))
    centroid = mesh.points[mesh.triangles].mean(axis=1)
    keep = ~((centroid[:, 0] > 0.5) & (centroid[:, 1] > 0.5))
    used = np.unique(mesh.triangles[keep])
    renumber = np.full(mesh.nodes, -1)
    renumber[used] = np.arange(len(used))
    points = mesh.points[used]
    left = [(renumber[a], renumber[b]) for a, b in mesh.boundary_edges[mesh.boundary_group == 0]]
    lower_right = [(renumber[a], renumber[b]) for a, b in
                   mesh.boundary_edges[mesh.boundary_group == 1]
                   if mesh.points[[a, b], 1].max() <= 0.5]
    edges = np.array(left + lower_right)
    group = np.array([0] * len(left) + [1] * len(lower_right))
    lshape = Mesh(points, renumber[mesh.triangles[keep]], np.zeros(keep.sum(), int), edges, group)
    space = make_space(lshape, order)
    conductivity = np.ones((lshape.elements, 2))
    conductance = np.full(len(edges), 25.0)
    ambient = (group == 0).astype(float)[:, None]
    theta = ConductionProblem(space, conductivity, conductance).solve(ambient)
    eta = residual_indicators(space, conductivity, conductance, theta, ambient)[:, 0]
    worst = lshape.points[lshape.triangles[np.argmax(eta)]]
    assert np.isclose(worst, [0.5, 0.5]).all(axis=1).any()


def test_closed_form_vertex_gradients_match_the_basis_functions():
    """The indicator's closed-form P2 vertex gradients against the element's own basis."""
    from coldseam.fem import p2
    from coldseam.fem.indicators import vertex_gradients
    from coldseam.fem.space import barycentric_gradients

    mesh = longest_edge_first(square(3))
    space = make_space(mesh, 2)
    theta = np.random.default_rng(7).normal(size=(space.dofs, 2))
    grad_lambda, _ = barycentric_gradients(mesh)
    closed = vertex_gradients(space, theta, grad_lambda)
    for a in range(3):
        lam = np.eye(3)[a]
        basis = p2.basis_gradients(grad_lambda, lam)  # (E, 6, 2)
        direct = np.einsum("eid,eik->edk", basis, theta[space.cell_dofs])
        assert np.allclose(closed[:, a], direct, atol=1e-12)

