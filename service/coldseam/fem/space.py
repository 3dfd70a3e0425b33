"""Lagrange spaces on a triangle mesh: the degrees of freedom an element family needs."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from coldseam.fem.mesh import Mesh


@dataclass(frozen=True)
class Space:
    """Degrees of freedom of one element family on one mesh.

    dof_points: (D, 2) location of every dof, metres (vertices first, then edge midpoints).
    cell_dofs: (E, 3) for P1, (E, 6) for P2 (vertices 0,1,2 then sides 01, 12, 20).
    edge_dofs: (B, 2) for P1, (B, 3) for P2 (ends, then midpoint) of each boundary edge.
    """

    mesh: Mesh
    order: int
    dof_points: np.ndarray
    cell_dofs: np.ndarray
    edge_dofs: np.ndarray

    @property
    def dofs(self) -> int:
        return len(self.dof_points)


def edge_lengths(points: np.ndarray, edges: np.ndarray) -> np.ndarray:
    return np.linalg.norm(points[edges[:, 1]] - points[edges[:, 0]], axis=1)


def barycentric_gradients(mesh: Mesh) -> tuple[np.ndarray, np.ndarray]:
    """Gradients (E, 3, 2) of the barycentric coordinates, and areas (E,) in m²."""
    p = mesh.points[mesh.triangles]  # (E, 3, 2)
    x, y = p[..., 0], p[..., 1]
    area = 0.5 * ((x[:, 1] - x[:, 0]) * (y[:, 2] - y[:, 0])
                  - (x[:, 2] - x[:, 0]) * (y[:, 1] - y[:, 0]))
    j, k = [1, 2, 0], [2, 0, 1]
    grad = np.empty(p.shape)
    grad[..., 0] = (y[:, j] - y[:, k]) / (2 * area[:, None])
    grad[..., 1] = (x[:, k] - x[:, j]) / (2 * area[:, None])
    return grad, area
