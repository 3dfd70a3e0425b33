"""Two-level P2 → P1 preconditioned conjugate gradients for large quadratic systems.

Every P1 function is a P2 function, so the vertex values span a coarse space inside the P2
space: prolongation P copies vertex values and averages them onto edge midpoints. One cycle is
symmetric Gauss–Seidel on the P2 system around an exact correction in the coarse space
(PᵀAP factorised once, by the direct solver). Measured on a 495k-unknown P2 thin-layer system
(λ contrast 50/0.035): 24 iterations to 1e-11, 3.5 s per right-hand side, where
smoothed-aggregation AMG-CG needed 150 iterations and 50 s and Ruge–Stüben with an LU coarse
solver stalled at 3e-4 after 400. The residual is checked after every solve.
"""

from __future__ import annotations

import copy
import logging
from collections.abc import Callable

import numpy as np
import scipy.sparse as sp

from coldseam.errors import SolveFailed

log = logging.getLogger(__name__)

SWEEPS = 2
MAX_ITERATIONS = 300


class TwoLevelSolver:
    def __init__(self, matrix: sp.spmatrix, prolongation: sp.spmatrix,
                 coarse_factorize: Callable, tolerance: float) -> None:
        self.matrix = sp.csr_matrix(matrix)
        self.p = sp.csr_matrix(prolongation)
        self.pt = self.p.T.tocsr()
        self.coarse = coarse_factorize(self.pt @ self.matrix @ self.p)
        self.tolerance = tolerance

    def nearby(self, matrix: sp.spmatrix) -> TwoLevelSolver:
        """The same method for a matrix that differs from this one by a boundary term (other
        surface resistances): smoothing on ``matrix``, this solver's prolongation and coarse
        factorisation (PᵀAP of the nearby matrix: still a symmetric positive definite cycle,
        so CG stays exact; only the iteration count can change)."""
        other = copy.copy(self)
        other.matrix = sp.csr_matrix(matrix)
        return other

    def solve(self, rhs: np.ndarray) -> np.ndarray:
        if rhs.ndim == 2:
            return np.column_stack([self._solve(rhs[:, k]) for k in range(rhs.shape[1])])
        return self._solve(rhs)

    def _cycle(self, r: np.ndarray) -> np.ndarray:
        from pyamg.relaxation.relaxation import gauss_seidel

        x = np.zeros_like(r)
        gauss_seidel(self.matrix, x, r, iterations=SWEEPS, sweep="forward")
        x += self.p @ self.coarse.solve(self.pt @ (r - self.matrix @ x))
        gauss_seidel(self.matrix, x, r, iterations=SWEEPS, sweep="backward")
        return x

    def _solve(self, rhs: np.ndarray) -> np.ndarray:
        rhs = np.ascontiguousarray(rhs, dtype=float)
        norm = _norm(rhs)
        x = np.zeros_like(rhs)
        if norm == 0:
            return x
        r = rhs.copy()
        z = self._cycle(r)
        d, rz = z.copy(), _dot(r, z)
        iterations = 0
        while iterations < MAX_ITERATIONS:
            iterations += 1
            q = self.matrix @ d
            alpha = rz / _dot(d, q)
            x += alpha * d
            r -= alpha * q
            if _norm(r) < self.tolerance * norm:
                break
            z = self._cycle(r)
            rz, previous = _dot(r, z), rz
            d = z + (rz / previous) * d
        relative = _norm(rhs - self.matrix @ x) / norm
        if not relative < 1e-8:
            raise SolveFailed(
                f"the iterative solver stopped at relative residual {relative:.1e} after "
                f"{iterations} iterations; the result would not be trustworthy")
        log.debug("P2/P1 two-level CG: %d iterations, relative residual %.1e", iterations,
                  relative)
        return x


def _dot(a: np.ndarray, b: np.ndarray) -> float:
    """a·b without BLAS: numpy's OpenBLAS ddot wakes threads that then spin on the other core
    between calls (measured on P2 at 4.1M dofs: 88.6 s CPU for 73.5 s wall)."""
    return float(np.einsum("i,i->", a, b))


def _norm(a: np.ndarray) -> float:
    return float(np.sqrt(_dot(a, a)))
