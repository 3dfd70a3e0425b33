"""Linear (P1) triangles: space, conduction stiffness and boundary-edge weights."""

from __future__ import annotations

import numpy as np

from coldseam.fem.mesh import Mesh
from coldseam.fem.space import Space, barycentric_gradients

#: Boundary edge mass ∫ φi φj ds / ℓ and load ∫ φi ds / ℓ for the two end dofs.
EDGE_MASS = np.array([[2.0, 1.0], [1.0, 2.0]]) / 6.0
EDGE_LOAD = np.array([0.5, 0.5])


def space(mesh: Mesh) -> Space:
    return Space(mesh, 1, mesh.points, mesh.triangles, mesh.boundary_edges)


def local_stiffness(space: Space, conductivity: np.ndarray) -> np.ndarray:
    """Element conduction matrices (E, 3, 3) in W/K for λ = (E, 2) [λx, λy] in W/(m·K).

    Kᵉᵢⱼ = A (λx ∂xλᵢ ∂xλⱼ + λy ∂yλᵢ ∂yλⱼ), exact for P1.
    """
    grad, area = barycentric_gradients(space.mesh)
    scaled = grad * conductivity[:, None, :]
    return np.einsum("eid,ejd->eij", scaled, grad) * area[:, None, None]


def element_products(space: Space, conductivity: np.ndarray, w: np.ndarray,
                     theta: np.ndarray) -> np.ndarray:
    """wₑᵀ Kᵉ θₑ per triangle (E,) in W/K·(units of w·θ), without forming Kᵉ:
    A (λx ∂xw ∂xθ + λy ∂yw ∂yθ) with the constant gradients of the two P1 functions."""
    grad, area = barycentric_gradients(space.mesh)
    grad_w = np.einsum("eid,ei->ed", grad, w[space.cell_dofs])
    grad_theta = np.einsum("eid,ei->ed", grad, theta[space.cell_dofs])
    return np.einsum("ed,ed,ed->e", conductivity, grad_w, grad_theta) * area
