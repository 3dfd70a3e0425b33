"""Residual error indicators of a conduction solution, per triangle.

For a solution θh (P1 or P2) of ∇·(Λ∇θ) = 0 with Robin and known-temperature boundaries, the
error in the energy norm (whose square is the error of the heat flow between environments at
unit temperature difference) is bounded by Σ ηₖ² with

    ηₖ² = hₖ²/λₖ ‖∇·Λ∇θh‖²ₖ + Σ_{sides E of K} w_E h_E/λ_E ‖r_E‖²_E

r_E: the jump of the normal heat flux across an interior side (w_E = ½, λ_E the larger
neighbour λ), q·n − h(θ − θ∞) on a Robin side, q·n on an adiabatic side, nothing on a
known-temperature side (w_E = 1, the triangle's λ). Flux residuals are linear (P2) or constant
(P1) along a side and are integrated by Simpson's rule; the element residual vanishes for P1.
Scaling by 1/λ makes the indicator measure the energy error whatever the conductivity
contrast (a steel bridge in insulation).
"""

from __future__ import annotations

import numpy as np

from coldseam.fem import p2
from coldseam.fem.mesh import edge_lookup
from coldseam.fem.space import Space, barycentric_gradients

_SIDES = [(0, 1), (1, 2), (2, 0)]


def _vertex_and_midpoint_gradients(space: Space, theta: np.ndarray, grad_lambda):
    """∇θh (E, 3 vertices, 2, k) and (E, 3 side midpoints, 2, k)."""
    values = theta[space.cell_dofs]  # (E, n, k)
    if space.order == 1:
        g = np.einsum("eid,eik->edk", grad_lambda, values)
        same = np.repeat(g[:, None], 3, axis=1)
        return same, same
    at_vertices = []
    for i in range(3):
        lam = np.zeros(3)
        lam[i] = 1.0
        at_vertices.append(np.einsum("eid,eik->edk", p2.basis_gradients(grad_lambda, lam), values))
    at_mids = []
    for i, j in _SIDES:
        lam = np.zeros(3)
        lam[i] = lam[j] = 0.5
        at_mids.append(np.einsum("eid,eik->edk", p2.basis_gradients(grad_lambda, lam), values))
    return np.stack(at_vertices, axis=1), np.stack(at_mids, axis=1)


def _laplacian(space: Space, theta: np.ndarray, grad_lambda, conductivity) -> np.ndarray:
    """∇·Λ∇θh (E, k), constant on each P2 triangle."""
    values = theta[space.cell_dofs]
    g = grad_lambda
    hessian = np.zeros((len(g), 2, 2, theta.shape[1]))
    for i in range(3):
        hessian += 4.0 * np.einsum("ed,ef,ek->edfk", g[:, i], g[:, i], values[:, i])
    for s, (i, j) in enumerate(_SIDES):
        outer = np.einsum("ed,ef->edf", g[:, i], g[:, j])
        hessian += 4.0 * np.einsum("edf,ek->edfk", outer + outer.transpose(0, 2, 1),
                                   values[:, 3 + s])
    return (conductivity[:, 0, None] * hessian[:, 0, 0] +
            conductivity[:, 1, None] * hessian[:, 1, 1])


def residual_indicators(space: Space, conductivity: np.ndarray, conductance: np.ndarray,
                        theta: np.ndarray, ambient: np.ndarray) -> np.ndarray:
    """ηₖ² (E, k) of each of the k solutions θ (D, k) with boundary temperatures (B, k)."""
    mesh = space.mesh
    theta = theta.reshape(len(theta), -1)
    ambient = ambient.reshape(len(ambient), -1)
    grad_lambda, area = barycentric_gradients(mesh)
    at_vertices, at_mids = _vertex_and_midpoint_gradients(space, theta, grad_lambda)
    pts = mesh.points[mesh.triangles]
    mean_lambda = np.sqrt(conductivity[:, 0] * conductivity[:, 1])
    edges, tri_edges = mesh.sides
    count = np.bincount(tri_edges.ravel(), minlength=len(edges))

    # Normal flux q·n (outward of the owning triangle) at (start, middle, end) of every side,
    # with start/end in the edge's global orientation (lower node first).
    jump = np.zeros((len(edges), 3, theta.shape[1]))
    lam_edge = np.zeros(len(edges))
    for s, (i, j) in enumerate(_SIDES):
        d = pts[:, j] - pts[:, i]
        normal = np.column_stack([d[:, 1], -d[:, 0]]) / np.linalg.norm(d, axis=1)[:, None]
        flux_normal = [
            -np.einsum("ed,edk->ek", normal * conductivity, grads)
            for grads in (at_vertices[:, i], at_mids[:, s], at_vertices[:, j])
        ]
        forward = mesh.triangles[:, i] < mesh.triangles[:, j]
        first = np.where(forward[:, None], flux_normal[0], flux_normal[2])
        last = np.where(forward[:, None], flux_normal[2], flux_normal[0])
        np.add.at(jump, tri_edges[:, s], np.stack([first, flux_normal[1], last], axis=1))
        np.maximum.at(lam_edge, tri_edges[:, s], mean_lambda)

    # Exposed sides: subtract the surface flux h(θ − θ∞), or drop the side (known θ).
    if len(mesh.boundary_edges):
        index = edge_lookup(edges, mesh.boundary_edges)
        ends = theta[space.edge_dofs[:, :2]]  # (B, 2, k)
        middle = (theta[space.edge_dofs[:, 2]] if space.order == 2 else ends.mean(axis=1))
        forward = mesh.boundary_edges[:, 0] < mesh.boundary_edges[:, 1]
        start = np.where(forward[:, None], ends[:, 0], ends[:, 1])
        end = np.where(forward[:, None], ends[:, 1], ends[:, 0])
        surface = np.stack([start, middle, end], axis=1) - ambient[:, None, :]
        known = ~np.isfinite(conductance)
        h = np.where(known, 0.0, conductance)
        jump[index] -= h[:, None, None] * surface
        jump[index[known]] = 0.0

    length = np.linalg.norm(mesh.points[edges[:, 1]] - mesh.points[edges[:, 0]], axis=1)
    squared = (jump[:, 0] ** 2 + 4 * jump[:, 1] ** 2 + jump[:, 2] ** 2) * length[:, None] / 6
    share = np.where(count == 2, 0.5, 1.0)
    per_edge = (share * length / np.maximum(lam_edge, 1e-300))[:, None] * squared
    eta = per_edge[tri_edges].sum(axis=1)
    if space.order == 2:
        diameter = np.max(np.stack([np.linalg.norm(pts[:, j] - pts[:, i], axis=1)
                                    for i, j in _SIDES], axis=1), axis=1)
        residual = _laplacian(space, theta, grad_lambda, conductivity) ** 2
        eta += (diameter ** 2 / mean_lambda * area)[:, None] * residual
    return eta
