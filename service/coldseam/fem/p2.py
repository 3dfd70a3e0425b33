"""Quadratic (P2) triangles: space, conduction stiffness and boundary-edge weights."""

from __future__ import annotations

import numpy as np
import scipy.sparse as sp

from coldseam.fem.mesh import Mesh, edge_lookup, unique_edges
from coldseam.fem.space import Space, barycentric_gradients

#: ∫ φi φj ds / ℓ and ∫ φi ds / ℓ on an edge for dofs (end a, end b, midpoint).
EDGE_MASS = np.array([[4.0, -1.0, 2.0], [-1.0, 4.0, 2.0], [2.0, 2.0, 16.0]]) / 30.0
EDGE_LOAD = np.array([1.0, 1.0, 4.0]) / 6.0

#: Edge-midpoint quadrature (exact for degree 2): barycentric coordinates, weight 1/3 each.
_QUAD = np.array([[0.5, 0.5, 0.0], [0.0, 0.5, 0.5], [0.5, 0.0, 0.5]])
_SIDES = [(0, 1), (1, 2), (2, 0)]


def space(mesh: Mesh) -> Space:
    edges, tri_edges = unique_edges(mesh.triangles)
    n = mesh.nodes
    midpoints = 0.5 * (mesh.points[edges[:, 0]] + mesh.points[edges[:, 1]])
    cell_dofs = np.hstack([mesh.triangles, tri_edges + n])
    bmid = edge_lookup(edges, mesh.boundary_edges) + n
    edge_dofs = np.column_stack([mesh.boundary_edges, bmid])
    return Space(mesh, 2, np.vstack([mesh.points, midpoints]), cell_dofs, edge_dofs)


def vertex_prolongation(space: Space) -> sp.csr_matrix:
    """(D, N) embedding of P1 (vertex values) in P2: vertices copied, midpoints averaged."""
    n = space.mesh.nodes
    sides = np.array([[3 + s, i, j] for s, (i, j) in enumerate(_SIDES)])
    triples = space.cell_dofs[:, sides.ravel()].reshape(-1, 3)
    triples = triples[np.unique(triples[:, 0], return_index=True)[1]]
    rows = np.concatenate([np.arange(n), triples[:, 0], triples[:, 0]])
    cols = np.concatenate([np.arange(n), triples[:, 1], triples[:, 2]])
    values = np.concatenate([np.ones(n), np.full(2 * len(triples), 0.5)])
    return sp.csr_matrix((values, (rows, cols)), shape=(space.dofs, n))


def basis_gradients(grad_lambda: np.ndarray, lam: np.ndarray) -> np.ndarray:
    """Gradients (E, 6, 2) of the six P2 basis functions at barycentric point ``lam``."""
    g = grad_lambda
    out = np.empty((g.shape[0], 6, 2))
    for i in range(3):
        out[:, i] = (4.0 * lam[i] - 1.0) * g[:, i]
    for s, (i, j) in enumerate(_SIDES):
        out[:, 3 + s] = 4.0 * (lam[j] * g[:, i] + lam[i] * g[:, j])
    return out


def _derivative_table(lam: np.ndarray) -> np.ndarray:
    """∂φᵢ/∂λₐ (6, 3) of the six basis functions at barycentric point ``lam``."""
    d = np.zeros((6, 3))
    for i in range(3):
        d[i, i] = 4.0 * lam[i] - 1.0
    for s, (i, j) in enumerate(_SIDES):
        d[3 + s, i], d[3 + s, j] = 4.0 * lam[j], 4.0 * lam[i]
    return d


def _reference_tensor() -> np.ndarray:
    """(9, 36): Kᵉ = area · Σₐᵦ (∇λₐ·Λ∇λᵦ) Mᵃᵇ with Mᵃᵇᵢⱼ = (1/area) ∫ ∂φᵢ/∂λₐ ∂φⱼ/∂λᵦ dA,
    integrated exactly by the edge-midpoint rule (the integrand has degree 2)."""
    tables = [_derivative_table(lam) for lam in _QUAD]
    m = sum(np.einsum("ia,jb->abij", d, d) for d in tables) / 3.0
    return m.reshape(9, 36)


_TENSOR = _reference_tensor()


def local_stiffness(space: Space, conductivity: np.ndarray) -> np.ndarray:
    """Element conduction matrices (E, 6, 6) in W/K for λ = (E, 2) [λx, λy] in W/(m·K).

    Exact: the metric terms ∇λₐ·Λ∇λᵦ are constant per triangle, the rest is a fixed tensor.
    """
    grad_lambda, area = barycentric_gradients(space.mesh)
    metric = np.einsum("ead,ebd->eab", grad_lambda * conductivity[:, None, :], grad_lambda)
    metric *= area[:, None, None]
    # einsum, not matmul: a BLAS call here started OpenBLAS threads whose spinning doubled
    # the wall time of whole evaluations on a busy 2-core machine (and starves a 2nd worker).
    return np.einsum("ea,ab->eb", metric.reshape(-1, 9), _TENSOR).reshape(-1, 6, 6)


def element_products(space: Space, conductivity: np.ndarray, w: np.ndarray,
                     theta: np.ndarray) -> np.ndarray:
    """wₑᵀ Kᵉ θₑ per triangle (E,) without forming Kᵉ (E×36 values): ∫ ∇w·Λ∇θ dA by the
    edge-midpoint rule, exact because both gradients are linear."""
    grad_lambda, area = barycentric_gradients(space.mesh)
    w_e, theta_e = w[space.cell_dofs], theta[space.cell_dofs]
    total = np.zeros(len(area))
    for lam in _QUAD:
        d = _derivative_table(lam)  # (6, 3): ∂φᵢ/∂λₐ at this point
        grad_w = np.einsum("ea,ead->ed", np.einsum("ei,ia->ea", w_e, d), grad_lambda)
        grad_theta = np.einsum("ea,ead->ed", np.einsum("ei,ia->ea", theta_e, d), grad_lambda)
        total += np.einsum("ed,ed,ed->e", conductivity, grad_w, grad_theta)
    return total * area / 3.0
