"""Steady conduction with Robin (surface-resistance) and known-temperature boundaries.

Weak form: find θ with ∫ ∇v·Λ∇θ dA + ∫_R h θ v ds = ∫_R h θ∞ v ds for all v, θ = θ∞ on the
known-temperature edges (surface resistance 0). One factorisation serves every right-hand side
(new boundary temperatures, adjoint loads).
"""

from __future__ import annotations

import logging
from dataclasses import InitVar, dataclass, field

import numpy as np
import scipy.sparse as sp

from coldseam.fem import p1, p2
from coldseam.fem.mesh import Mesh
from coldseam.fem.pmultigrid import TwoLevelSolver
from coldseam.fem.solvers import NearbySolver, factorize, is_direct
from coldseam.fem.space import Space, edge_lengths

log = logging.getLogger(__name__)

FAMILIES = {1: p1, 2: p2}


def make_space(mesh: Mesh, order: int) -> Space:
    return FAMILIES[order].space(mesh)


def assemble(cell_dofs: np.ndarray, local: np.ndarray, size: int) -> sp.csr_matrix:
    """Sum element matrices (E, k, k) into a (size, size) CSR matrix.

    The indices are made in the index type scipy keeps (int32 below 2³¹ rows): with int64 it
    copied both index arrays once more (E·k² entries each: 74M for P2 at 1e6 nodes)."""
    k = cell_dofs.shape[1]
    dofs = cell_dofs.astype(np.int32 if size < 2**31 else np.int64, copy=False)
    rows = np.repeat(dofs, k, axis=1).ravel()
    cols = np.tile(dofs, (1, k)).ravel()
    return sp.coo_matrix((local.ravel(), (rows, cols)), shape=(size, size)).tocsr()


def pattern_positions(indices: np.ndarray, indptr: np.ndarray, part: sp.csr_matrix) -> np.ndarray:
    """Index into the values of a CSR matrix (``indices``, ``indptr``; sorted within rows) of
    every stored entry of ``part``, whose pattern must lie inside it."""
    rows = np.repeat(np.arange(part.shape[0]), np.diff(part.indptr))
    touched = np.unique(rows)
    starts, counts = indptr[touched], indptr[touched + 1] - indptr[touched]
    first = np.repeat(np.cumsum(counts) - counts, counts)
    slots = np.repeat(starts, counts) + (np.arange(counts.sum()) - first)
    n = np.int64(part.shape[1])
    keys = np.repeat(touched, counts).astype(np.int64) * n + indices[slots]
    wanted = rows.astype(np.int64) * n + part.indices
    where = np.minimum(np.searchsorted(keys, wanted), len(keys) - 1)
    if len(wanted) and np.any(keys[where] != wanted):
        raise ValueError("an entry lies outside the matrix pattern")
    return slots[where]


def _without_zeros(matrix: sp.csr_matrix, keep: np.ndarray):
    """CSR arrays (data, indices, indptr) of ``matrix`` without its exact zeros except at the
    value positions ``keep``, and the new positions of those. Exact zeros are common: 26 % of
    the P2 entries on meshes of right-angled triangles (``stiffness + edge`` dropped them)."""
    kept = matrix.data != 0
    kept[keep] = True
    before = np.zeros(len(kept) + 1, dtype=np.int32 if len(kept) < 2**31 else np.int64)
    np.cumsum(kept, out=before[1:])
    indptr = before[matrix.indptr].astype(matrix.indptr.dtype)
    return matrix.data[kept], matrix.indices[kept], indptr, before[keep]


@dataclass
class ConductionProblem:
    """The discrete problem on one space with fixed conductivities and surface conductances.

    conductivity: (E, 2) [λx, λy] per triangle, W/(m·K).
    conductance: (B,) h = 1/Rs per boundary edge, W/(m²·K); ``np.inf`` for Rs = 0.
    like: a problem on the same space with the same conductivities whose conduction matrix
    is reused (``with_conductance``); assembled here otherwise.

    Only ``matrix`` (conduction plus boundary term) is kept: the conduction matrix alone is its
    values with the boundary entries put back (``_stiffness_at_edges``), and the problems made
    by ``with_conductance`` share its index arrays.
    """

    space: Space
    conductivity: np.ndarray
    conductance: np.ndarray
    like: InitVar[ConductionProblem | None] = None
    matrix: sp.csr_matrix = field(init=False)
    fixed: np.ndarray = field(init=False)
    _solver: object = field(init=False, default=None)
    _nearby: ConductionProblem | None = field(init=False, default=None)

    def __post_init__(self, like: ConductionProblem | None) -> None:
        family = FAMILIES[self.space.order]
        n = self.space.dofs
        self.lengths = edge_lengths(self.space.mesh.points, self.space.mesh.boundary_edges)
        robin = np.isfinite(self.conductance)
        self.h = np.where(robin, self.conductance, 0.0)
        weight = self.h * self.lengths
        edge = assemble(self.space.edge_dofs, weight[:, None, None] * family.EDGE_MASS[None], n)
        if like is None:
            stiffness = assemble(self.space.cell_dofs,
                                 family.local_stiffness(self.space, self.conductivity), n)
            positions = pattern_positions(stiffness.indices, stiffness.indptr, edge)
            data, indices, indptr, positions = _without_zeros(stiffness, positions)
        else:  # the conduction matrix of ``like``: its values with the boundary entries reset
            data, indices, indptr = like.matrix.data.copy(), like.matrix.indices, like.matrix.indptr
            positions = pattern_positions(indices, indptr, edge)
            data[like._edge_positions] = like._stiffness_at_edges
        self._edge_positions, self._stiffness_at_edges = positions, data[positions]
        data[positions] += edge.data  # the same single addition per entry as stiffness + edge
        self.matrix = sp.csr_matrix((data, indices, indptr), shape=(n, n))
        self.matrix.has_canonical_format = True
        self.robin = robin
        self.fixed_owner = self._fixed_owner()
        self.fixed = np.flatnonzero(self.fixed_owner >= 0)
        self.free = np.flatnonzero(self.fixed_owner < 0)
        self._family = family

    def with_conductance(self, conductance: np.ndarray) -> ConductionProblem:
        """The same space and conductivities with other surface conductances (the conduction
        matrix is shared, not assembled again). When the known-temperature dofs are the same,
        its solves are preconditioned by this problem's factorisation (see NearbySolver), or
        reuse its two-level solver's coarse factorisation (TwoLevelSolver.nearby)."""
        other = ConductionProblem(self.space, self.conductivity, conductance, like=self)
        if np.array_equal(other.free, self.free):
            other._nearby = self
        return other

    def _fixed_owner(self) -> np.ndarray:
        """For each dof, the last known-temperature edge it lies on, or -1."""
        owner = np.full(self.space.dofs, -1)
        edges = np.flatnonzero(~self.robin)
        for column in range(self.space.edge_dofs.shape[1]):
            owner[self.space.edge_dofs[edges, column]] = edges
        return owner

    def release(self) -> None:
        """Drop the factorisation (and the link to a nearby problem's): solves after this
        factorise again. Frees the largest block of memory once all solves are done."""
        self._solver = None
        self._nearby = None

    @property
    def solver(self):
        if self._solver is None:
            every = len(self.free) == self.space.dofs  # no known temperatures: no slicing
            a_ff = self.matrix if every else self.matrix[self.free][:, self.free]
            prolongation = self._prolongation if self.space.order == 2 else None
            near = self._nearby
            if near is not None and near._solver is not None and is_direct(near._solver):
                self._solver = NearbySolver(a_ff, near._solver,
                                            lambda: factorize(a_ff, prolongation))
            elif near is not None and isinstance(near._solver, TwoLevelSolver):
                self._solver = near._solver.nearby(a_ff)
            else:
                self._solver = factorize(a_ff, prolongation)
        return self._solver

    def _prolongation(self) -> sp.csr_matrix:
        """P1-in-P2 embedding restricted to the free dofs (free vertices as coarse dofs)."""
        full = p2.vertex_prolongation(self.space)
        vertices = self.free[self.free < self.space.mesh.nodes]
        return full[self.free][:, vertices].tocsr()

    def load(self, ambient: np.ndarray) -> np.ndarray:
        """Right-hand side ∫_R h θ∞ φ ds for boundary temperatures ``ambient`` (B,) in °C."""
        weight = (self.h * self.lengths).reshape((-1,) + (1,) * (ambient.ndim - 1)) * ambient
        rhs = np.zeros((self.space.dofs,) + ambient.shape[1:])
        load = self._family.EDGE_LOAD.reshape((1, -1) + (1,) * (ambient.ndim - 1))
        np.add.at(rhs, self.space.edge_dofs, weight[:, None] * load)
        return rhs

    def solve(self, ambient: np.ndarray) -> np.ndarray:
        """Temperatures at every dof (°C) for boundary temperatures ``ambient`` (B,), or
        (D, k) for k sets of boundary temperatures given as (B, k)."""
        theta = np.zeros((self.space.dofs,) + ambient.shape[1:])
        theta[self.fixed] = ambient[self.fixed_owner[self.fixed]]
        rhs = self.load(ambient) - self.matrix @ theta
        theta[self.free] = self.solver.solve(rhs[self.free])
        return theta

    def edge_means(self, theta: np.ndarray) -> np.ndarray:
        """Mean temperature along each boundary edge (exact for the element's polynomial)."""
        return theta[self.space.edge_dofs] @ (self._family.EDGE_LOAD)

    def heat_flows(self, theta: np.ndarray, ambient: np.ndarray, groups: int) -> np.ndarray:
        """Heat flow into the domain through each boundary group, W/m.

        Robin edges: ∫ h (θ∞ − θ) ds, integrated exactly. Known-temperature edges: the
        reaction (Aθ − b) at their dofs, which is the consistent boundary flux.
        """
        group = self.space.mesh.boundary_group
        robin_flow = self.h * (ambient - self.edge_means(theta)) * self.lengths
        flows = np.bincount(group, weights=robin_flow, minlength=groups)
        if len(self.fixed):
            residual = self.matrix @ theta - self.load(ambient)
            owner_group = group[self.fixed_owner[self.fixed]]
            flows += np.bincount(owner_group, weights=residual[self.fixed], minlength=groups)
        return flows

    def flow_functional(self, groups: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Linear functional of the heat flow through some groups: Φ = c·θ + d·θ∞ terms.

        Returns (c, explicit) where c (D,) is ∂Φ/∂θ and ``explicit`` marks the fixed dofs whose
        reaction enters Φ (their element matrices depend on λ explicitly).
        """
        group = self.space.mesh.boundary_group
        c = np.zeros(self.space.dofs)
        in_group = np.isin(group, groups) & self.robin
        weight = -(self.h * self.lengths)[in_group]
        np.add.at(c, self.space.edge_dofs[in_group], weight[:, None] * self._family.EDGE_LOAD[None])
        explicit = np.zeros(self.space.dofs)
        owned = self.fixed[np.isin(group[self.fixed_owner[self.fixed]], groups)]
        explicit[owned] = 1.0
        c += self.matrix.T @ explicit
        return c, explicit


def log_conductivity_sensitivity(problem: ConductionProblem, theta: np.ndarray,
                                 groups: np.ndarray, materials: int,
                                 weight: np.ndarray | None = None) -> np.ndarray:
    """∂Φ/∂ln λₘ for the heat flow Φ through some groups, per material index m, in W/m.

    One adjoint solve: A_ff z = c_f with c = ∂Φ/∂θ; then ∂Φ/∂ln λₘ = Σ_{e∈m} wₑᵀ Kₑ θₑ with
    w = e − z (e marks fixed dofs whose reaction is part of Φ), because ∂A/∂ln λₘ = Kₘ.
    Both conductivity components of a material scale together. When Φ is the heat flow from
    one environment, w is that environment's own unit-temperature solution (the problem is
    symmetric: c is minus its load); a caller holding it passes it as ``weight`` and no solve
    is made.
    """
    if weight is not None:
        w = weight
    else:
        c, explicit = problem.flow_functional(np.atleast_1d(groups))
        w = explicit.copy()
        w[problem.free] -= problem.solver.solve(c[problem.free])
    family = FAMILIES[problem.space.order]
    per_element = family.element_products(problem.space, problem.conductivity, w, theta)
    return np.bincount(problem.space.mesh.material, weights=per_element, minlength=materials)


def element_heat_flux(space: Space, conductivity: np.ndarray, theta: np.ndarray) -> np.ndarray:
    """Heat-flux density vector q = −Λ∇θ (E, 2) at each triangle's centroid, W/m²."""
    from coldseam.fem.space import barycentric_gradients

    grad_lambda, _ = barycentric_gradients(space.mesh)
    if space.order == 1:
        grads = grad_lambda
    else:
        grads = p2.basis_gradients(grad_lambda, np.full(3, 1.0 / 3.0))
    gradient = np.einsum("eid,ei->ed", grads, theta[space.cell_dofs])
    return -conductivity * gradient
