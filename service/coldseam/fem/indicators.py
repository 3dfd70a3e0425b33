"""Residual error indicators of a conduction solution, per triangle.

For a solution θh (P1 or P2) of ∇·(Λ∇θ) = 0 with Robin and known-temperature boundaries, the
error in the energy norm (whose square is the error of the heat flow between environments at
unit temperature difference) is bounded by Σ ηₖ² with

    ηₖ² = hₖ²/λₖ ‖∇·Λ∇θh‖²ₖ + Σ_{sides E of K} w_E h_E/λ_E ‖r_E‖²_E

r_E: the jump of the normal heat flux across an interior side (w_E = ½, λ_E the larger
neighbour λ), q·n − h(θ − θ∞) on a Robin side, q·n on an adiabatic side, nothing on a
known-temperature side (w_E = 1, the triangle's λ). Flux residuals are linear (P2) or constant
(P1) along a side and are integrated by Simpson's rule (exact for them); the element residual
vanishes for P1.
Scaling by 1/λ makes the indicator measure the energy error whatever the conductivity
contrast (a steel bridge in insulation).
"""

from __future__ import annotations

import numpy as np

from coldseam.fem.mesh import edge_lookup
from coldseam.fem.space import Space, barycentric_gradients

_SIDES = [(0, 1), (1, 2), (2, 0)]
#: _SIDE_OF[a][b]: the local side joining vertices a and b.
_SIDE_OF = {(i, j): s for s, (i, j) in enumerate(_SIDES)} | {
    (j, i): s for s, (i, j) in enumerate(_SIDES)}


def vertex_gradients(space: Space, theta: np.ndarray, grad_lambda: np.ndarray) -> np.ndarray:
    """∇θh (E, 3, 2, k) at each triangle's three vertices.

    P2: θ = Σ θᵢ λᵢ(2λᵢ − 1) + Σ 4 θ_ij λᵢλⱼ, so at vertex a, ∂θ/∂λ_a = 3θ_a and
    ∂θ/∂λ_b = 4θ_ab − θ_b (b ≠ a); ∇θ = Σ_b ∂θ/∂λ_b ∇λ_b. The gradient of a P2 field is linear
    on the triangle, so these three values define it everywhere. P1: constant.
    """
    values = theta[space.cell_dofs]  # (E, n, k)
    g = grad_lambda[..., None]  # (E, 3, 2, 1)
    if space.order == 1:
        constant = sum(g[:, b] * values[:, None, b] for b in range(3))
        return np.repeat(constant[:, None], 3, axis=1)
    out = np.empty((len(values), 3, 2, values.shape[2]))
    for a in range(3):
        total = 3.0 * values[:, None, a] * g[:, a]
        for b in range(3):
            if b != a:
                total = total + (4.0 * values[:, None, 3 + _SIDE_OF[a, b]] -
                                 values[:, None, b]) * g[:, b]
        out[:, a] = total
    return out


def _divergence(space: Space, theta: np.ndarray, grad_lambda, conductivity) -> np.ndarray:
    """∇·Λ∇θh (E, k), constant on each P2 triangle: Σ_ab ∂²θ/∂λ_a∂λ_b (∇λ_a·Λ∇λ_b) with
    ∂²θ/∂λ_a² = 4θ_a and ∂²θ/∂λ_a∂λ_b = 4θ_ab."""
    values = theta[space.cell_dofs]
    scaled = grad_lambda * conductivity[:, None, :]

    def metric(a: int, b: int) -> np.ndarray:
        return (scaled[:, a] * grad_lambda[:, b]).sum(axis=1)[:, None]

    out = sum(4.0 * values[:, a] * metric(a, a) for a in range(3))
    return out + sum(8.0 * values[:, 3 + s] * metric(i, j) for s, (i, j) in enumerate(_SIDES))


def _accumulate(index: np.ndarray, values: np.ndarray, size: int) -> np.ndarray:
    """Σ of the rows of ``values`` (n, m) with equal ``index`` (n,), as (size, m)."""
    return np.stack([np.bincount(index, weights=values[:, c], minlength=size)
                     for c in range(values.shape[1])], axis=1)


def residual_indicators(space: Space, conductivity: np.ndarray, conductance: np.ndarray,
                        theta: np.ndarray, ambient: np.ndarray,
                        source: np.ndarray | None = None) -> np.ndarray:
    """ηₖ² (E, k) of each of the k solutions θ (D, k) with boundary temperatures (B, k);
    ``conductance`` h (B,) for all of them, or (B, k) per solution (solutions of problems
    that differ in their surface resistances only, indicated in one pass).

    ``source`` (E, k): a right-hand side s of ∇·(Λ∇θ) = s, constant per triangle, taken off
    the element residual (dynamic problems: s = ρc θ' at the triangle's mean)."""
    mesh = space.mesh
    theta = theta.reshape(len(theta), -1)
    ambient = ambient.reshape(len(ambient), -1)
    k = theta.shape[1]
    grad_lambda, area = barycentric_gradients(mesh)
    gradient = vertex_gradients(space, theta, grad_lambda)  # (E, 3, 2, k)
    flux = -gradient * conductivity[:, None, :, None]
    pts = mesh.points[mesh.triangles]
    mean_lambda = np.sqrt(conductivity[:, 0] * conductivity[:, 1])
    edges, tri_edges = mesh.sides
    count = np.bincount(tri_edges.ravel(), minlength=len(edges))

    # Normal flux q·n (outward of the owning triangle) at both ends of every side, in the
    # edge's global orientation (lower node first); summed over the owners it is the jump.
    ends = []
    for i, j in _SIDES:
        d = pts[:, j] - pts[:, i]
        normal = (np.column_stack([d[:, 1], -d[:, 0]]) /
                  np.linalg.norm(d, axis=1)[:, None])[..., None]
        at_i = (flux[:, i] * normal).sum(axis=1)
        at_j = (flux[:, j] * normal).sum(axis=1)
        forward = (mesh.triangles[:, i] < mesh.triangles[:, j])[:, None]
        ends.append(np.hstack([np.where(forward, at_i, at_j), np.where(forward, at_j, at_i)]))
    index = tri_edges.T.ravel()
    jump = _accumulate(index, np.concatenate(ends), len(edges)).reshape(-1, 2, k)
    lam_edge = np.zeros(len(edges))
    np.maximum.at(lam_edge, index, np.tile(mean_lambda, 3))

    # Simpson's rule on (start, middle, end): exact for the linear jumps inside; on exposed
    # sides the surface flux h(θ − θ∞) is subtracted (quadratic along a P2 side), and sides
    # of known temperature drop out.
    jump = np.stack([jump[:, 0], 0.5 * (jump[:, 0] + jump[:, 1]), jump[:, 1]], axis=1)
    if len(mesh.boundary_edges):
        where = edge_lookup(edges, mesh.boundary_edges)
        values = theta[space.edge_dofs[:, :2]]  # (B, 2, k)
        middle = theta[space.edge_dofs[:, 2]] if space.order == 2 else values.mean(axis=1)
        forward = (mesh.boundary_edges[:, 0] < mesh.boundary_edges[:, 1])[:, None]
        surface = np.stack([np.where(forward, values[:, 0], values[:, 1]), middle,
                            np.where(forward, values[:, 1], values[:, 0])], axis=1)
        surface = surface - ambient[:, None, :]
        h = np.broadcast_to(conductance.reshape(len(conductance), -1), (len(where), k))
        known = ~np.isfinite(h)
        jump[where] -= np.where(known, 0.0, h)[:, None, :] * surface
        for c in range(k):
            jump[where[known[:, c]], :, c] = 0.0

    length = np.linalg.norm(mesh.points[edges[:, 1]] - mesh.points[edges[:, 0]], axis=1)
    squared = (jump[:, 0] ** 2 + 4 * jump[:, 1] ** 2 + jump[:, 2] ** 2) * length[:, None] / 6
    share = np.where(count == 2, 0.5, 1.0)
    per_edge = (share * length / np.maximum(lam_edge, 1e-300))[:, None] * squared
    eta = per_edge[tri_edges].sum(axis=1)
    if space.order == 2:
        diameter = np.max(np.stack([np.linalg.norm(pts[:, j] - pts[:, i], axis=1)
                                    for i, j in _SIDES], axis=1), axis=1)
        residual = _divergence(space, theta, grad_lambda, conductivity)
        if source is not None:
            residual = residual - source
        eta += (diameter ** 2 / mean_lambda * area)[:, None] * residual ** 2
    elif source is not None:
        diameter = np.max(np.stack([np.linalg.norm(pts[:, j] - pts[:, i], axis=1)
                                    for i, j in _SIDES], axis=1), axis=1)
        eta += (diameter ** 2 / mean_lambda * area)[:, None] * source ** 2
    return eta
