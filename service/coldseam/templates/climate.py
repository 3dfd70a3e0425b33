"""The design climate every template takes as parameters (indoor and outdoor temperature,
indoor humidity or ISO 13788 class, Rsi of the fRsi run) and how it enters a template's
request; the defaults are ``coldseam.climate``'s, shared with the DXF import."""

from __future__ import annotations

from typing import Any

from coldseam.templates.base import (
    INDOOR_RELATIVE_HUMIDITY,
    INSIDE_TEMPERATURE,
    LEAST_TEMPERATURE_DIFFERENCE,
    OUTSIDE_TEMPERATURE,
    RSI_CONDENSATION,
    Parameter,
    invalid,
)

CLIMATE_PARAMETERS = (
    Parameter("indoor_temperature", "°C", INSIDE_TEMPERATURE,
              "Indoor air temperature θi", "number", 5.0, 40.0),
    Parameter("outdoor_temperature", "°C", OUTSIDE_TEMPERATURE,
              "Outdoor design temperature θe (below θi)", "number", -40.0, 15.0),
    Parameter("indoor_relative_humidity", "%", INDOOR_RELATIVE_HUMIDITY * 100,
              "Indoor relative humidity φi (used unless a humidity class is given)",
              "number", 1.0, 99.0),
    Parameter("humidity_class", "", 0, "ISO 13788 internal humidity class 1–5, from the "
              "outdoor temperature (0: use the indoor relative humidity)", "integer", 0, 5),
    Parameter("condensation_surface_resistance", "m²·K/W", RSI_CONDENSATION,
              "Interior surface resistance Rsi of the fRsi run on opaque parts (ISO 13788: "
              "0.25; glazing and frames keep 0.13)", "number", 0.04, 1.0),
)
CLIMATE_NAMES = frozenset(p.name for p in CLIMATE_PARAMETERS)


def apply_climate(built: dict[str, Any], p: dict[str, Any]) -> dict[str, Any]:
    """``built`` (a template's request) with the climate parameters of ``p`` applied: the
    interior and exterior environments' temperatures and the condensation block."""
    theta_i, theta_e = p["indoor_temperature"], p["outdoor_temperature"]
    if theta_i - theta_e < LEAST_TEMPERATURE_DIFFERENCE:
        raise invalid("outdoor_temperature", f"outdoor_temperature must be at least "
                      f"{LEAST_TEMPERATURE_DIFFERENCE:g} K below indoor_temperature "
                      f"({theta_i:g} °C); got {theta_e:g} °C")
    if p["humidity_class"]:
        _check_humidity_class(int(p["humidity_class"]), theta_i, theta_e)
    for environment in built["section"]["environments"]:
        environment["temperature"] = theta_i if environment["side"] == "interior" else theta_e
    indoor: dict[str, Any] = (
        {"humidity_class": int(p["humidity_class"])} if p["humidity_class"]
        else {"relative_humidity": round(p["indoor_relative_humidity"] / 100.0, 6)})
    built["condensation"] = {"interior_surface_resistance": p["condensation_surface_resistance"],
                             "indoor": indoor}
    return built


def _check_humidity_class(humidity_class: int, theta_i: float, theta_e: float) -> None:
    """A humidity class whose indoor vapour pressure reaches saturation is refused here, so
    the message names the template parameter."""
    from coldseam.schema.evaluation import OutdoorClimate
    from coldseam.thermal.humidity import indoor_vapour_pressure, saturation_pressure

    rh_e = OutdoorClimate().relative_humidity
    p_i = indoor_vapour_pressure(humidity_class, theta_e, rh_e)
    if p_i >= float(saturation_pressure(theta_i)):
        raise invalid("humidity_class", f"humidity class {humidity_class} at {theta_e:g} °C "
                      f"outdoors gives an indoor vapour pressure of {p_i:.0f} Pa, at or above "
                      f"saturation at {theta_i:g} °C indoors: choose a lower class or a "
                      "warmer interior")
