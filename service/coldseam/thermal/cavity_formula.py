"""Equivalent thermal conductivity of an air cavity (ISO 10077-2, unventilated cavities).

    λeq = d · (ha + hr)                                   W/(m·K)

with d the cavity's thickness along the heat flow and b its width across it (metres). Every
constant below is recalled from memory of ISO 10077-2 (and its agreement with the ISO 6946
air-layer table), not copied from the text: check it against the standard before relying on it.

>>> round(equivalent_conductivity(0.025, 1.0, "horizontal", 0.9, 0.9, 10.0, 10.0).conductivity, 4)
0.1436
"""

from __future__ import annotations

import math
from dataclasses import dataclass

#: Stefan-Boltzmann constant, W/(m²·K⁴) (CODATA 2018).
SIGMA = 5.670374419e-8
#: Conduction through still air, C1/d: C1 = 0.025 W/(m·K) [recalled from memory, ISO 10077-2].
C1 = 0.025
#: Convection, horizontal heat flow (and upward for b/d ≤ 1): C2·ΔT^(1/3), C2 = 0.73
#: W/(m²·K^(4/3)) [recalled from memory, ISO 10077-2; 0.73·5^(1/3) = 1.25 is ISO 6946's ha].
C2 = 0.73
#: Convection, upward heat flow with b/d > 5: C3 = 1.14 W/(m²·K^(4/3)); linear in b/d between
#: b/d = 1 and 5 [recalled from memory, ISO 10077-2; 1.14·5^(1/3) = 1.95 is ISO 6946's ha up].
C3 = 1.14
#: A cavity narrower than this across the heat flow (b < 5 mm) has no convection in horizontal
#: heat flow: ha = C1/d [recalled from memory, ISO 10077-2].
NARROW = 0.005
#: Downward heat flow: ha = C1/d (stable stratification, no convection) [recalled from memory].
KELVIN = 273.15


@dataclass(frozen=True)
class CavityCoefficients:
    """ha and hr in W/(m²·K), λeq in W/(m·K)."""

    convection: float
    radiation: float
    conductivity: float


def convection(d: float, b: float, direction: str, temperature_difference: float) -> float:
    """ha in W/(m²·K) for a cavity d thick along and b wide across the heat flow (m)."""
    conduction = C1 / d
    if direction == "downward" or (direction == "horizontal" and b < NARROW):
        return conduction
    cube_root = temperature_difference ** (1.0 / 3.0)
    if direction == "horizontal":
        return max(conduction, C2 * cube_root)
    ratio = b / d
    c = C2 if ratio <= 1 else C3 if ratio >= 5 else C2 + (C3 - C2) * (ratio - 1) / 4
    return max(conduction, c * cube_root)


def view_factor(d: float, b: float) -> float:
    """F = ½(1 + √(1 + (d/b)²) − d/b): exchange between the two faces b wide, d apart, with
    re-radiating side walls [recalled from memory, ISO 10077-2]; 1 for a wide flat cavity."""
    x = d / b
    return 0.5 * (1.0 + math.sqrt(1.0 + x * x) - x)


def radiation(d: float, b: float, eps1: float, eps2: float, mean_temperature: float) -> float:
    """hr = 4σTm³ / (1/ε1 + 1/ε2 − 2 + 1/F) in W/(m²·K), Tm in °C [recalled from memory]."""
    t = mean_temperature + KELVIN
    return 4 * SIGMA * t ** 3 / (1 / eps1 + 1 / eps2 - 2 + 1 / view_factor(d, b))


def equivalent_conductivity(d: float, b: float, direction: str, eps1: float, eps2: float,
                            temperature_difference: float, mean_temperature: float,
                            ventilation: str = "unventilated") -> CavityCoefficients:
    """λeq = d(ha + hr); a slightly ventilated cavity takes twice the unventilated λeq
    [recalled from memory, ISO 10077-2]. d, b in m; ΔT in K; Tm in °C."""
    if not (d > 0 and b > 0):
        raise ValueError(f"cavity extent must be positive, got d = {d}, b = {b} m")
    ha = convection(d, b, direction, temperature_difference)
    hr = radiation(d, b, eps1, eps2, mean_temperature)
    factor = 2.0 if ventilation == "slightly_ventilated" else 1.0
    return CavityCoefficients(ha, hr, factor * d * (ha + hr))
