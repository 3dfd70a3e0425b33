"""Transient response to boundary temperatures that are linear between series points.

With the unit fields U (θ = U T for steady boundary temperatures T) and W = K_ff⁻¹ (C U)_f,
θ(t) = U T(t) − W T'(t) + e(t) is exact for C θ' + K θ = f(T(t)) when e solves the free
decay C e' + K e = 0 and jumps by W ΔT' wherever the slope T' changes (at every series point;
at t = 0 from the steady state). The jumps are smooth fields (their modal components fall as
τₖ²), so e is represented with high accuracy in a small space V: the block Krylov space of
A = K_ff⁻¹ C_ff started at W, its rational counterpart with (K + C/Δt)⁻¹ for the
response within a step, plus the constant field (which makes the discrete energy balance
Σ heat flows = d(stored heat)/dt hold exactly in the reduced model). On V the decay is solved
exactly (Galerkin: eigenpairs of C_r s = τ K_r s), so each mode evolves as e^(−t/τ) between
series points; V grows until the outputs at the series times change by less than
``TOLERANCE`` of their swing. No time step of the engine's own is involved.
"""

from __future__ import annotations

import logging
from dataclasses import dataclass

import numpy as np
import scipy.linalg as sla

from coldseam.errors import SolveFailed

log = logging.getLogger(__name__)

#: Outputs must change by less than this fraction of their swing when V grows by one check.
TOLERANCE = 1e-5
BLOCKS_PER_CHECK = 3
MAX_BLOCKS = 300


@dataclass
class ReducedDecay:
    """The decay C e' + K e = 0 on the free dofs, on a K-orthonormal basis V (F, m)."""

    basis: np.ndarray  # V (F, m)
    tau: np.ndarray  # (m,) s, modal time constants of the reduced model
    modes: np.ndarray  # S (m, m): V S are the reduced modes, Sᵀ Vᵀ K V S = I
    jumps: np.ndarray  # (m, N): modal amplitudes of the jump W ΔT' per unit ΔT' of each env


class KrylovSpace:
    """A K-orthonormal basis of the constant field and the rational Krylov spaces
    span{W, A_σ W, …, A_σ^(blocks−1) W} with A_σ = (K + σC)⁻¹ C, one for each solver of
    K + σC in ``solves`` (F, m). σ = 0 resolves the slow modes (long runs), σ = 1/Δt the
    response within a step: together they need few vectors for both.

    ``grow(blocks)`` extends the basis it has (K V kept beside V), so a caller that checks its
    outputs every few blocks pays for each block once."""

    def __init__(self, k_ff, c_ff, solves, start: np.ndarray) -> None:
        self.k_ff, self.c_ff, self.solves = k_ff, c_ff, solves
        rows = start.shape[0]
        self.basis, self.k_basis = np.zeros((rows, 0)), np.zeros((rows, 0))
        self._add(np.ones((rows, 1)))
        first = self._add(start)
        self.last = [first for _ in solves]
        self.blocks = 1

    def grow(self, blocks: int) -> np.ndarray:
        """The basis with ``blocks`` blocks per shift (fewer where a space is invariant)."""
        while self.blocks < blocks:
            self.blocks += 1
            for k, solve in enumerate(self.solves):
                if self.last[k].shape[1] == 0:
                    continue  # an invariant subspace for this shift
                self.last[k] = self._add(solve(self.c_ff @ self.last[k]))
            if all(b.shape[1] == 0 for b in self.last):
                break
        return self.basis

    def _add(self, vectors: np.ndarray) -> np.ndarray:
        block = _orthonormal(self.k_ff, vectors, self.basis, self.k_basis)
        self.basis = np.hstack([self.basis, block])
        self.k_basis = np.hstack([self.k_basis, self.k_ff @ block])
        return block


def _orthonormal(k_ff, vectors: np.ndarray, basis: np.ndarray,
                 k_basis: np.ndarray) -> np.ndarray:
    """Columns of ``vectors`` made K-orthonormal to ``basis`` (``k_basis`` = K basis) and to
    each other (classical Gram–Schmidt twice); columns that are (nearly) in the span already
    are dropped."""
    kept = []
    for column in vectors.T:
        v = column.copy()
        size = np.sqrt(max(v @ (k_ff @ v), 0.0))
        for _ in range(2):
            if basis.shape[1]:
                v -= basis @ (k_basis.T @ v)
            for q in kept:
                v -= q * (q @ (k_ff @ v))
        norm = np.sqrt(max(v @ (k_ff @ v), 0.0))
        if size > 0 and norm > 1e-10 * size:
            kept.append(v / norm)
    return np.column_stack(kept) if kept else np.zeros((vectors.shape[0], 0))


def reduce(k_ff, c_ff, basis: np.ndarray, w_free: np.ndarray) -> ReducedDecay:
    """Exact modal solution of the decay projected on ``basis`` (Galerkin)."""
    k_r = basis.T @ (k_ff @ basis)
    c_r = basis.T @ (c_ff @ basis)
    k_r, c_r = 0.5 * (k_r + k_r.T), 0.5 * (c_r + c_r.T)
    tau, modes = sla.eigh(c_r, k_r)
    tau = np.maximum(tau, 0.0)
    jumps = modes.T @ (basis.T @ (k_ff @ w_free))
    return ReducedDecay(basis, tau, modes, jumps)


def decay_factors(tau: np.ndarray, dt: float) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Per mode over one step Δt: e^(−Δt/τ), ∫₀^Δt e^(−s/τ) ds, and 1/τ (0 where τ = 0:
    such a mode carries no amplitude, its jump being orthogonal to the null space of C)."""
    positive = tau > 0
    safe = np.where(positive, tau, 1.0)
    decay = np.where(positive, np.exp(-dt / safe), 0.0)
    integral = np.where(positive, safe * -np.expm1(-dt / safe), 0.0)
    rate = np.where(positive, 1.0 / safe, 0.0)
    return decay, integral, rate


def modal_amplitudes(reduced: ReducedDecay, slope_changes: np.ndarray, dt: float):
    """Amplitudes of the reduced modes just before each series time (n, m) and, per step
    from t_(n−1) to t_n, their time integrals (n, m); ``slope_changes`` (n, N) are the ΔT'
    at each series time (row n: the change at t_n, K/s)."""
    decay, integral, _ = decay_factors(reduced.tau, dt)
    n, m = len(slope_changes), len(reduced.tau)
    before, integrals = np.zeros((n, m)), np.zeros((n, m))
    after = np.zeros(m)
    for step in range(n):
        if step:
            before[step] = decay * after
            integrals[step] = integral * after
        after = before[step] + reduced.jumps @ slope_changes[step]
    return before, integrals


def check_growth(blocks: int) -> None:
    if blocks > MAX_BLOCKS:
        raise SolveFailed("the transient response did not converge in the reduced space "
                          f"({MAX_BLOCKS} Krylov blocks)")
