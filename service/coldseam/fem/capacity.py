"""Heat-capacity (consistent mass) matrices C for P1 and P2 triangles.

Cᵉᵢⱼ = ρc ∫ φᵢ φⱼ dA in J/K per metre of section, with ρc (J/(m³·K)) constant per triangle.
A zero ρc is allowed (an air cavity stores no heat): its dofs are then algebraic in the
dynamic equations C θ' + K θ = f.
"""

from __future__ import annotations

from itertools import product
from math import factorial

import numpy as np
import scipy.sparse as sp

from coldseam.fem.space import Space, barycentric_gradients


def _monomial_integral(powers: tuple[int, int, int]) -> float:
    """(1/area) ∫ λ₀^a λ₁^b λ₂^c dA = 2 a! b! c! / (a + b + c + 2)!, exact."""
    a, b, c = powers
    return 2.0 * factorial(a) * factorial(b) * factorial(c) / factorial(a + b + c + 2)


def _p2_basis() -> list[dict[tuple[int, int, int], float]]:
    """The six P2 basis functions as polynomials in the barycentric coordinates."""
    def unit(i: int, power: int) -> tuple[int, int, int]:
        e = [0, 0, 0]
        e[i] = power
        return tuple(e)

    basis = [{unit(i, 2): 2.0, unit(i, 1): -1.0} for i in range(3)]  # λᵢ(2λᵢ − 1)
    for i, j in [(0, 1), (1, 2), (2, 0)]:
        powers = [0, 0, 0]
        powers[i] = powers[j] = 1
        basis.append({tuple(powers): 4.0})  # 4 λᵢ λⱼ
    return basis


def _reference_mass(basis: list[dict[tuple[int, int, int], float]]) -> np.ndarray:
    k = len(basis)
    mass = np.zeros((k, k))
    for i, j in product(range(k), range(k)):
        mass[i, j] = sum(ci * cj * _monomial_integral(tuple(np.add(pi, pj)))
                         for (pi, ci), (pj, cj) in product(basis[i].items(), basis[j].items()))
    return mass


#: (1/area) ∫ φᵢ φⱼ dA on a triangle, per family order.
REFERENCE_MASS = {
    1: _reference_mass([{(1, 0, 0): 1.0}, {(0, 1, 0): 1.0}, {(0, 0, 1): 1.0}]),
    2: _reference_mass(_p2_basis()),
}


def local_capacity(space: Space, volumetric: np.ndarray) -> np.ndarray:
    """Element capacity matrices (E, k, k) in J/K per metre for ρc (E,) in J/(m³·K)."""
    _, area = barycentric_gradients(space.mesh)
    return (area * volumetric)[:, None, None] * REFERENCE_MASS[space.order][None]


def capacity_matrix(space: Space, volumetric: np.ndarray) -> sp.csr_matrix:
    """The assembled consistent capacity matrix C (D, D) in J/K per metre of section."""
    from coldseam.fem.system import assemble

    return assemble(space.cell_dofs, local_capacity(space, volumetric), space.dofs)
