"""ISO 13788 surface-humidity assessment: saturation pressure, dew point, internal humidity
classes, the critical temperature factor and the mould / condensation verdict.

Pure functions; temperatures θ in °C, vapour pressures p in Pa, relative humidity φ as 0..1.

>>> round(float(saturation_pressure(20.0)), 1)
2337.0
>>> round(float(dew_point(20.0, 0.5)), 1)
9.3
"""

from __future__ import annotations

import logging

import numpy as np
from numpy.typing import ArrayLike

from coldseam import climate
from coldseam.errors import InvalidSection
from coldseam.schema.evaluation import CondensationRequest

logger = logging.getLogger(__name__)

#: ISO 13788 saturation-pressure formula: p0, and (a, b) over water (θ ≥ 0) and over ice.
P0 = 610.5
WATER = (17.269, 237.3)
ICE = (21.875, 265.5)

#: Vapour-pressure excess Δp in Pa at θe ≤ 0 °C of the five ISO 13788 internal humidity
#: classes; it falls linearly to 0 at θe = 20 °C.
HUMIDITY_CLASS_EXCESS = {1: 270.0, 2: 540.0, 3: 810.0, 4: 1080.0, 5: 1350.0}
#: ISO 13788 multiplies the class Δp by this factor when it derives the indoor vapour pressure.
SAFETY_FACTOR = 1.10

MOULD_LIMIT = 0.8
CONDENSATION_LIMIT = 1.0
DEFAULT_INDOOR_RH = climate.INDOOR_RELATIVE_HUMIDITY


def saturation_pressure(theta: ArrayLike) -> np.ndarray:
    """Saturation vapour pressure in Pa at θ °C, over water for θ ≥ 0 and over ice below.

    psat = 610.5·exp(a·θ / (b + θ)), (a, b) = (17.269, 237.3) or (21.875, 265.5) (ISO 13788).
    """
    theta = np.asarray(theta, dtype=float)
    a = np.where(theta >= 0.0, WATER[0], ICE[0])
    b = np.where(theta >= 0.0, WATER[1], ICE[1])
    return P0 * np.exp(a * theta / (b + theta))


def temperature_for_pressure(p: ArrayLike) -> np.ndarray:
    """The θ °C whose saturation pressure is ``p`` Pa: the inverse of saturation_pressure."""
    p = np.asarray(p, dtype=float)
    if np.any(p <= 0.0):
        raise ValueError("a vapour pressure must be above 0 Pa")
    log_ratio = np.log(p / P0)
    a = np.where(p >= P0, WATER[0], ICE[0])
    b = np.where(p >= P0, WATER[1], ICE[1])
    return b * log_ratio / (a - log_ratio)


def dew_point(theta: ArrayLike, rh: ArrayLike) -> np.ndarray:
    """Dew-point (or frost-point below 0 °C) temperature in °C of air at θ °C and φ = rh."""
    return temperature_for_pressure(np.asarray(rh, dtype=float) * saturation_pressure(theta))


def vapour_pressure_excess(humidity_class: int, theta_e: ArrayLike) -> np.ndarray:
    """Internal vapour-pressure excess Δp in Pa of an ISO 13788 humidity class (1..5).

    Δp is the class value at θe ≤ 0 °C, falling linearly to 0 at θe ≥ 20 °C. The safety
    factor 1.10 is not included here; :func:`indoor_vapour_pressure` applies it.
    """
    if humidity_class not in HUMIDITY_CLASS_EXCESS:
        raise ValueError(f"humidity class must be 1..5, got {humidity_class!r}")
    theta_e = np.asarray(theta_e, dtype=float)
    share = np.clip((20.0 - theta_e) / 20.0, 0.0, 1.0)
    return HUMIDITY_CLASS_EXCESS[humidity_class] * share


def indoor_vapour_pressure(humidity_class: int, theta_e: float, rh_e: float) -> float:
    """Indoor vapour pressure pi = pe + 1.10·Δp in Pa (ISO 13788) from a humidity class."""
    p_e = rh_e * float(saturation_pressure(theta_e))
    return p_e + SAFETY_FACTOR * float(vapour_pressure_excess(humidity_class, theta_e))


def critical_frsi(theta_i: float, theta_e: float, p_indoor: float,
                  limit_rh: float = MOULD_LIMIT) -> float:
    """Critical temperature factor for a surface-humidity limit (0.8 mould, 1.0 condensation).

    θsi,min = the θ with psat(θ) = pi / limit_rh; fRsi,crit = (θsi,min − θe) / (θi − θe).
    """
    if not theta_i > theta_e:
        raise ValueError("the indoor temperature must be above the outdoor temperature")
    theta_required = float(temperature_for_pressure(p_indoor / limit_rh))
    return (theta_required - theta_e) / (theta_i - theta_e)


def assess_condensation(frsi: float, request: CondensationRequest | None,
                        section_interior_temperature: float,
                        section_exterior_temperature: float) -> dict:
    """The ``condensation`` result block for a junction of temperature factor ``frsi``.

    ``frsi`` is (θsi,min − θe) / (θi − θe) from the run with the ISO 13788 interior surface
    resistance; the section's environment temperatures are the default design climate. The
    verdict is "pass" when fRsi ≥ fRsi,critical (mould, surface RH 0.8, unless the request
    fixes a ``criterion``). ``at`` is left None for the caller to fill.
    """
    request = request or CondensationRequest()
    assumptions: list[str] = []
    theta_i, theta_e = _design_climate(request, section_interior_temperature,
                                       section_exterior_temperature, assumptions)
    p_i, rh_i = _indoor_humidity(request, theta_i, theta_e, assumptions)
    f_mould = critical_frsi(theta_i, theta_e, p_i, MOULD_LIMIT)
    f_condensation = critical_frsi(theta_i, theta_e, p_i, CONDENSATION_LIMIT)
    critical = f_mould if request.criterion is None else request.criterion
    if request.criterion is not None:
        assumptions.append(f"judged against the fixed critical fRsi {request.criterion:g} of the "
                           f"request; the indoor climate gives {f_mould:.3f} for mould")
    if f_mould >= 1.0:
        assumptions.append("the indoor air is so humid that surface humidity exceeds 80 % even "
                           "at the indoor air temperature: no surface can meet the mould limit")
    return {
        "fRsi": frsi,
        "min_temperature": theta_e + frsi * (theta_i - theta_e),
        "at": None,
        "fRsi_critical": critical,
        "fRsi_critical_mould": f_mould,
        "fRsi_critical_condensation": f_condensation,
        "criterion": "mould" if request.criterion is None else "fixed",
        "verdict": "pass" if frsi >= critical else "fail",
        "margin": frsi - critical,
        "surface_condensation": bool(frsi < f_condensation),
        "indoor_temperature": theta_i,
        "outdoor_temperature": theta_e,
        "indoor_relative_humidity": rh_i,
        "indoor_vapour_pressure": p_i,
        "dew_point": float(temperature_for_pressure(p_i)),
        "min_temperature_required": float(temperature_for_pressure(p_i / MOULD_LIMIT)),
        "interior_surface_resistance": request.interior_surface_resistance,
        "assumptions": assumptions,
    }


def _design_climate(request: CondensationRequest, section_theta_i: float,
                    section_theta_e: float, assumptions: list[str]) -> tuple[float, float]:
    theta_i = request.indoor.temperature
    if theta_i is None:
        theta_i = section_theta_i
        assumptions.append(f"indoor temperature {theta_i:g} °C: the interior environment's")
    theta_e = request.outdoor.temperature
    if theta_e is None:
        theta_e = section_theta_e
        assumptions.append(f"outdoor temperature {theta_e:g} °C: the exterior environment's")
    if not theta_i > theta_e:
        field = ("/condensation/indoor/temperature" if request.indoor.temperature is not None
                 else "/condensation/outdoor/temperature")
        raise InvalidSection(
            f"the indoor temperature ({theta_i:g} °C) must be above the outdoor temperature "
            f"({theta_e:g} °C) for a temperature factor fRsi to mean anything", field)
    return float(theta_i), float(theta_e)


def _indoor_humidity(request: CondensationRequest, theta_i: float, theta_e: float,
                     assumptions: list[str]) -> tuple[float, float]:
    """Indoor vapour pressure in Pa and relative humidity 0..1."""
    indoor = request.indoor
    p_sat_i = float(saturation_pressure(theta_i))
    if indoor.humidity_class is not None:
        rh_e = request.outdoor.relative_humidity
        p_i = indoor_vapour_pressure(indoor.humidity_class, theta_e, rh_e)
        assumptions.append(
            f"indoor vapour pressure from ISO 13788 humidity class {indoor.humidity_class}: "
            f"pe + 1.10·Δp with outdoor relative humidity {rh_e:g} ({p_i:.0f} Pa)")
        if p_i >= p_sat_i:
            raise InvalidSection(
                f"humidity class {indoor.humidity_class} at {theta_e:g} °C outdoors gives an "
                f"indoor vapour pressure of {p_i:.0f} Pa, at or above saturation at "
                f"{theta_i:g} °C indoors: choose a lower class or a warmer interior",
                "/condensation/indoor/humidity_class")
        return p_i, p_i / p_sat_i
    rh_i = indoor.relative_humidity
    if rh_i is None:
        rh_i = DEFAULT_INDOOR_RH
        assumptions.append(f"indoor relative humidity not given: {DEFAULT_INDOOR_RH * 100:g} "
                           "% assumed (common practice)")
    return rh_i * p_sat_i, float(rh_i)
