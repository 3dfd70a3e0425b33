"""Linear solvers for the symmetric positive definite conduction systems.

Direct: sparse Cholesky (CHOLMOD through scikit-sparse, AMD ordering) when it is installed —
measured 1.6–3.5× faster than SuperLU on these systems (7k–500k unknowns); otherwise the
LDLᵀ factorisation of QDLDL (AMD ordering; a regular dependency that installs from wheels),
measured 1.6–2.8× faster to factorise than SuperLU on the same systems (2k–160k unknowns) and
faster to substitute; SuperLU (minimum-degree ordering on AᵀA+..., no pivoting, symmetric mode,
the fastest SuperLU options measured) when neither is there or QDLDL meets a zero pivot. Above the direct limit: conjugate gradients
preconditioned by a two-level P2/P1 cycle for quadratic elements (coldseam.fem.pmultigrid),
by smoothed-aggregation AMG (pyamg) for linear ones, with the residual checked after every
solve: an unconverged solve is an error.
"""

from __future__ import annotations

import logging
import os
from collections.abc import Callable

import numpy as np
import scipy.sparse as sp

from coldseam.errors import SolveFailed

log = logging.getLogger(__name__)

DIRECT_LIMIT = 300_000
#: With CHOLMOD the direct solver stays cheaper than AMG-CG much further (measured on P2
#: thin-layer systems: 495k unknowns, 7 s to factorise against 50 s per AMG-CG solve).
CHOLESKY_LIMIT = 1_500_000
RELATIVE_TOLERANCE = 1e-11


def _qdldl():
    """The QDLDL module, or None when it is not installed or ``COLDSEAM_QDLDL=0``."""
    if os.environ.get("COLDSEAM_QDLDL", "1") == "0":
        return None
    try:
        import qdldl
    except ImportError:
        return None
    return qdldl


def _cholmod():
    """scikit-sparse's CHOLMOD module, or None when it is not installed or switched off by
    ``COLDSEAM_CHOLMOD=0`` in the environment (to measure and test the plain-install path)."""
    if os.environ.get("COLDSEAM_CHOLMOD", "1") == "0":
        return None
    try:
        from sksparse import cholmod
    except ImportError:
        return None
    return cholmod


#: Below this many unknowns CHOLMOD's simplicial factorisation beats its supernodal one
#: (measured on P2 levels: 2.2k dofs 6.5 -> 2.9 ms, 3.5k 7.8 -> 5.1 ms, 7k 17.4 -> 16.0 ms to
#: factorise, substitutions 2-5x faster; at 97k supernodal factorises in 0.59 s against 0.95).
SIMPLICIAL_LIMIT = 50_000


class CholeskySolver:
    """Sparse Cholesky factorisation (CHOLMOD, AMD ordering) of an SPD matrix."""

    def __init__(self, matrix: sp.csc_matrix, cholmod) -> None:
        mode = "simplicial" if matrix.shape[0] < SIMPLICIAL_LIMIT else "supernodal"
        self.factor = cholmod.cholesky(matrix, ordering_method="amd", mode=mode)

    def solve(self, rhs: np.ndarray) -> np.ndarray:
        return self.factor(rhs)


class LdlSolver:
    """LDLᵀ factorisation (QDLDL, AMD ordering) of an SPD matrix. QDLDL does not pivot: a
    zero pivot (a singular matrix) raises RuntimeError, and the caller falls back to LU."""

    def __init__(self, matrix: sp.csc_matrix, qdldl) -> None:
        self.factor = qdldl.Solver(upper_triangle(matrix), upper=True)

    def solve(self, rhs: np.ndarray) -> np.ndarray:
        if rhs.ndim == 1:
            return self.factor.solve(rhs)
        out = np.empty(rhs.shape)
        for k in range(rhs.shape[1]):
            out[:, k] = self.factor.solve(np.ascontiguousarray(rhs[:, k]))
        return out


class DirectSolver:
    def __init__(self, matrix: sp.csc_matrix) -> None:
        import scipy.sparse.linalg as spla  # here: with CHOLMOD a cold start never needs it

        self.lu = spla.splu(matrix, permc_spec="MMD_AT_PLUS_A", diag_pivot_thresh=0.0,
                            options={"SymmetricMode": True})

    def solve(self, rhs: np.ndarray) -> np.ndarray:
        return self.lu.solve(rhs)


class MultigridSolver:
    """CG with a smoothed-aggregation AMG preconditioner (pyamg), residual-checked."""

    def __init__(self, matrix: sp.csc_matrix) -> None:
        import pyamg

        self.matrix = matrix.tocsr()
        self.hierarchy = pyamg.smoothed_aggregation_solver(self.matrix, symmetry="symmetric")

    def solve(self, rhs: np.ndarray) -> np.ndarray:
        if rhs.ndim == 2:
            return np.column_stack([self._solve(rhs[:, k]) for k in range(rhs.shape[1])])
        return self._solve(rhs)

    def _solve(self, rhs: np.ndarray) -> np.ndarray:
        norm = np.linalg.norm(rhs)
        if norm == 0:
            return np.zeros_like(rhs)
        residuals: list[float] = []
        x = self.hierarchy.solve(rhs, tol=RELATIVE_TOLERANCE, accel="cg", maxiter=400,
                                 residuals=residuals)
        relative = np.linalg.norm(rhs - self.matrix @ x) / norm
        if not relative < 1e-8:
            raise SolveFailed(
                f"the iterative solver stopped at relative residual {relative:.1e} after "
                f"{len(residuals)} iterations; the result would not be trustworthy")
        log.debug("AMG-CG: %d iterations, relative residual %.1e", len(residuals), relative)
        return x


def is_direct(solver) -> bool:
    return isinstance(solver, CholeskySolver | LdlSolver | DirectSolver)


class NearbySolver:
    """Block CG on A preconditioned by the direct solver of a nearby matrix B: the same
    conduction matrix with other surface resistances on some boundary edges, so A − B is a
    boundary term of low rank and the iteration converges in a few steps (measured 8–10 to
    1e-12 for the condensation run, Rsi 0.13 -> 0.25). Cheaper than a second factorisation:
    7k dofs 19.9 -> 15.9 ms, 97k 1.44 -> 0.88 s, 147k 1.65 -> 1.08 s. Falls back to
    ``fallback()`` (a factorisation of A) if it does not converge; the residual is checked."""

    TOLERANCE = 1e-13
    MAX_ITERATIONS = 60

    def __init__(self, matrix: sp.csr_matrix, near, fallback: Callable) -> None:
        self.matrix, self.near, self.fallback = matrix, near, fallback
        self._direct = None

    def solve(self, rhs: np.ndarray) -> np.ndarray:
        if self._direct is not None:
            return self._direct.solve(rhs)
        block = rhs.reshape(rhs.shape[0], -1)
        x = self._cg(block)
        norm = np.linalg.norm(block, axis=0)
        residual = np.linalg.norm(block - self.matrix @ x, axis=0)
        if np.all(residual <= 1e-10 * np.maximum(norm, 1e-300)):
            return x.reshape(rhs.shape)
        log.debug("nearby-preconditioned CG stopped at %.1e; factorising", residual.max())
        self._direct = self.fallback()
        return self._direct.solve(rhs)

    def _cg(self, b: np.ndarray) -> np.ndarray:
        x, r = np.zeros_like(b), b.copy()
        z = self.near.solve(r).reshape(b.shape)
        d, rz = z.copy(), np.einsum("ij,ij->j", r, z)
        goal = self.TOLERANCE * np.linalg.norm(b, axis=0)
        for _ in range(self.MAX_ITERATIONS):
            q = self.matrix @ d
            dq = np.einsum("ij,ij->j", d, q)
            alpha = np.divide(rz, dq, out=np.zeros_like(rz), where=dq != 0)
            x += alpha * d
            r -= alpha * q
            if np.all(np.linalg.norm(r, axis=0) <= goal):
                break
            z = self.near.solve(r).reshape(b.shape)
            rz_new = np.einsum("ij,ij->j", r, z)
            beta = np.divide(rz_new, rz, out=np.zeros_like(rz), where=rz != 0)
            d, rz = z + beta * d, rz_new
        return x


def upper_triangle(matrix: sp.csc_matrix) -> sp.csc_matrix:
    """The upper triangle (row ≤ column) of a symmetric CSC matrix, by a mask on its arrays
    (scipy's ``triu`` goes through COO: 4× slower at 4k unknowns); indices sorted."""
    if not matrix.has_sorted_indices:
        matrix = matrix.sorted_indices()
    n = matrix.shape[0]
    column = np.repeat(np.arange(n, dtype=matrix.indices.dtype), np.diff(matrix.indptr))
    keep = matrix.indices <= column
    indptr = np.zeros(n + 1, dtype=matrix.indptr.dtype)
    np.cumsum(np.bincount(column[keep], minlength=n), out=indptr[1:])
    return sp.csc_matrix((matrix.data[keep], matrix.indices[keep], indptr), shape=matrix.shape)


def symmetric_view(matrix: sp.spmatrix, layout: str) -> sp.spmatrix:
    """A symmetric CSR or CSC matrix in the other layout without copying: the CSR arrays of A
    are the CSC arrays of Aᵀ = A (``tocsc`` copied all of it: 0.5 s and 0.7 GB at 4M P2 dofs)."""
    if matrix.format == layout:
        return matrix
    if matrix.format not in ("csr", "csc"):
        return matrix.asformat(layout)
    if not matrix.has_sorted_indices:  # products such as PᵀAP come unsorted
        matrix = matrix.sorted_indices()
    kind = sp.csc_matrix if layout == "csc" else sp.csr_matrix
    return kind((matrix.data, matrix.indices, matrix.indptr), shape=matrix.shape)


def factorize(matrix: sp.spmatrix, prolongation: Callable[[], sp.spmatrix] | None = None):
    """A solver for the SPD ``matrix`` (CSR or CSC): direct below the limits, else iterative —
    the P2/P1 two-level method when ``prolongation`` (the P1-in-P2 embedding on the free dofs,
    built on demand) is given, smoothed-aggregation AMG otherwise."""
    csc = symmetric_view(matrix, "csc")
    cholmod = _cholmod()
    if cholmod is not None and matrix.shape[0] <= max(DIRECT_LIMIT, CHOLESKY_LIMIT):
        try:
            return CholeskySolver(csc, cholmod)
        except cholmod.CholmodError as exc:  # not positive definite: let SuperLU judge
            log.warning("Cholesky factorisation failed (%s); using LU", exc)
    if matrix.shape[0] <= DIRECT_LIMIT:
        qdldl = _qdldl()
        if qdldl is not None:
            try:
                return LdlSolver(csc, qdldl)
            except RuntimeError as exc:  # a zero pivot: let SuperLU judge
                log.warning("LDLᵀ factorisation failed (%s); using LU", exc)
        return DirectSolver(csc)
    csr = symmetric_view(matrix, "csr")
    if prolongation is not None:
        from coldseam.fem.pmultigrid import TwoLevelSolver

        return TwoLevelSolver(csr, prolongation(), factorize, RELATIVE_TOLERANCE)
    return MultigridSolver(csr)
