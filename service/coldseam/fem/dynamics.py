"""Dynamic conduction C θ' + K θ = f on one ConductionProblem: harmonic (complex) solves and
the slowest time constants. Pure numerics: the caller forms the physical quantities.

K is the problem's matrix (conduction plus Robin terms), C the consistent capacity matrix
(``coldseam.fem.capacity``). Known-temperature dofs follow their boundary temperature; the
dynamic equations hold at the free dofs. Dofs of zero capacity (cavities) are algebraic: every
method here copes with a singular C.
"""

from __future__ import annotations

import logging

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from coldseam.errors import SolveFailed
from coldseam.fem.solvers import NearbySolver, factorize
from coldseam.fem.system import ConductionProblem

log = logging.getLogger(__name__)
HARMONIC_TOLERANCE = 1e-12
#: Up to this many unknowns SuperLU's complex factorisation (symmetric mode, MMD on AᵀA + A) is
#: the faster. Measured on the balcony and ground-floor templates, two unit columns: 3k P2 dofs
#: 19 ms against 27 ms for the preconditioned GMRES, 11k 34 against 64 ms, 23k 0.6 against
#: 5.9 s, 32k 0.19 against 0.33 s; at 92k 8.6 against 5.8 s. (The 90 s once seen at 34k was
#: a factorisation without the symmetric mode.)
COMPLEX_DIRECT_LIMIT = 40_000


class DynamicProblem:
    """A ConductionProblem with its capacity matrix C (D, D) in J/K per metre."""

    def __init__(self, problem: ConductionProblem, capacity: sp.csr_matrix) -> None:
        self.problem = problem
        self.capacity = capacity.tocsr()
        free = problem.free
        self.c_ff = self.capacity[free][:, free].tocsc()
        self.k_ff = problem.matrix[free][:, free].tocsc()
        self._solver = None

    @property
    def solver(self):
        """A solver of K_ff: the problem's own, or a factorisation of its own where the
        problem's is a preconditioned iteration (dynamic runs solve many times)."""
        if self._solver is None:
            own = self.problem.solver
            self._solver = factorize(self.k_ff) if isinstance(own, NearbySolver) else own
        return self._solver

    def harmonic(self, ambient: np.ndarray, omega: float) -> np.ndarray:
        """Complex amplitudes θ̂ (D, k) for boundary amplitudes ``ambient`` (B, k) at angular
        frequency ω (rad/s): (K + iωC) θ̂ = f̂ at the free dofs.

        Solved by GMRES preconditioned with the real factorisation of K + ωC (one for all
        columns): in the modal basis the preconditioned operator is (1 + iωτ)/(1 + ωτ), on an
        arc of modulus ≥ 1/√2 and argument ≤ π/4 whatever the mesh, so a dozen iterations
        reach 1e-12 (measured 17-27). Small systems are factorised directly instead
        (COMPLEX_DIRECT_LIMIT). The residual is checked; a complex factorisation is the
        fallback."""
        p = self.problem
        theta = np.zeros((p.space.dofs, ambient.shape[1]), complex)
        theta[p.fixed] = ambient[p.fixed_owner[p.fixed]]
        system = (p.matrix + 1j * omega * self.capacity).tocsr()
        rhs = p.load(ambient.real) + 1j * p.load(ambient.imag) - system @ theta
        a_ff = system[p.free][:, p.free].tocsr()
        theta[p.free] = self._complex_solve(a_ff, rhs[p.free], omega)
        return theta

    def _complex_solve(self, a_ff: sp.csr_matrix, rhs: np.ndarray, omega: float) -> np.ndarray:
        n = a_ff.shape[0]
        if n <= COMPLEX_DIRECT_LIMIT:
            lu = spla.splu(a_ff.tocsc(), permc_spec="MMD_AT_PLUS_A", diag_pivot_thresh=0.0,
                           options={"SymmetricMode": True})
            return lu.solve(rhs)
        real = factorize((self.k_ff + omega * self.c_ff).tocsc())

        def precondition(v: np.ndarray) -> np.ndarray:
            both = real.solve(np.column_stack([v.real, v.imag]))
            return both[:, 0] + 1j * both[:, 1]

        inverse = spla.LinearOperator((n, n), matvec=precondition, dtype=complex)
        out = np.zeros(rhs.shape, complex)
        for k in range(rhs.shape[1]):
            b = rhs[:, k]
            norm = np.linalg.norm(b)
            if norm == 0:
                continue
            x, _ = spla.gmres(a_ff, b, M=inverse, rtol=HARMONIC_TOLERANCE, atol=0.0,
                              restart=60, maxiter=4)
            if np.linalg.norm(a_ff @ x - b) > 1e-10 * norm:
                log.warning("preconditioned GMRES stalled on the harmonic solve; factorising")
                lu = spla.splu(a_ff.tocsc(), permc_spec="MMD_AT_PLUS_A")
                x = lu.solve(b)
            out[:, k] = x
        return out

    def harmonic_heat_flows(self, theta: np.ndarray, ambient: np.ndarray, omega: float,
                            groups: int) -> np.ndarray:
        """Complex heat-flow amplitudes into the domain through each boundary group (W/m per
        unit amplitude) for one harmonic solution column ``theta`` (D,) and ``ambient`` (B,)."""
        real = self.heat_flows(theta.real, -omega * theta.imag, ambient.real, groups)
        imag = self.heat_flows(theta.imag, omega * theta.real, ambient.imag, groups)
        return real + 1j * imag

    def heat_flows(self, theta: np.ndarray, rate: np.ndarray, ambient: np.ndarray,
                   groups: int) -> np.ndarray:
        """Heat flow into the domain per group, W/m, for temperatures θ, their rate θ' (K/s)
        and boundary temperatures: the steady terms plus C θ' in the reactions of
        known-temperature dofs."""
        p = self.problem
        flows = p.heat_flows(theta, ambient, groups)
        if len(p.fixed):
            stored = (self.capacity @ rate)[p.fixed]
            owner = p.space.mesh.boundary_group[p.fixed_owner[p.fixed]]
            flows += np.bincount(owner, weights=stored, minlength=groups)
        return flows

    def time_constants(self, count: int) -> np.ndarray:
        """The ``count`` largest τ = 1/λ of K φ = λ C φ (free dofs), seconds, longest first.

        Solved as C φ = τ K φ (ARPACK, largest τ, K inverted by the problem's factorisation):
        the slow modes are the extreme end of that spectrum, and zero-capacity dofs give τ = 0
        instead of an infinite λ."""
        n = self.k_ff.shape[0]
        if n == 0 or self.c_ff.nnz == 0 or not np.any(self.c_ff.data):
            return np.zeros(count)
        solver = self.solver
        if count >= n - 1:
            return self._dense_time_constants(count)
        inverse = spla.LinearOperator((n, n), matvec=lambda v: solver.solve(v), dtype=float)
        try:
            values = spla.eigsh(self.c_ff, k=count, M=self.k_ff, Minv=inverse, which="LA",
                                ncv=min(n, max(2 * count + 1, 24)), tol=1e-12,
                                return_eigenvectors=False)
        except spla.ArpackNoConvergence as exc:
            raise SolveFailed("the time-constant eigen solver did not converge") from exc
        return np.sort(np.maximum(values, 0.0))[::-1]

    def _dense_time_constants(self, count: int) -> np.ndarray:
        import scipy.linalg as sla

        values = sla.eigh(self.c_ff.toarray(), self.k_ff.toarray(), eigvals_only=True)
        out = np.sort(np.maximum(values, 0.0))[::-1]
        return np.pad(out, (0, max(0, count - len(out))))[:count]
