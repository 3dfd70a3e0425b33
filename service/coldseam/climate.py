"""The design climate Coldseam assumes wherever a user does not give one: templates, the
spreadsheet endpoint, DXF environment layers and the condensation check all read it here.

θi 20 °C, θe −5 °C and 50 % indoor relative humidity are a common design condition for the
surface-condensation and mould check (common practice; ISO 13788 leaves the climate to the
user). L2D and ψ do not depend on the temperatures, θsi,min and the verdict do.
"""

from __future__ import annotations

#: Indoor and outdoor air temperature θi, θe in °C.
INDOOR_TEMPERATURE = 20.0
OUTDOOR_TEMPERATURE = -5.0
#: Indoor relative humidity φi, 0..1.
INDOOR_RELATIVE_HUMIDITY = 0.5
#: ISO 13788 interior surface resistance of the fRsi run on opaque parts, m²·K/W; glazing and
#: frames use 0.13.
CONDENSATION_RSI = 0.25
CONDENSATION_RSI_FRAME = 0.13
#: ISO 6946 surface resistances (horizontal heat flow) of DXF environment layers that give
#: none, m²·K/W [from memory].
INTERIOR_RS = 0.13
EXTERIOR_RS = 0.04


def temperature_for(side: str) -> float:
    """The default air temperature of an environment on ``side`` ("interior"/"exterior")."""
    return INDOOR_TEMPERATURE if side == "interior" else OUTDOOR_TEMPERATURE


def surface_resistance_for(side: str) -> float:
    """The default surface resistance of an environment on ``side``, m²·K/W."""
    return INTERIOR_RS if side == "interior" else EXTERIOR_RS


def defaults() -> dict:
    """The defaults as a JSON-able document (for the page and the API)."""
    return {"indoor_temperature": INDOOR_TEMPERATURE, "outdoor_temperature": OUTDOOR_TEMPERATURE,
            "indoor_relative_humidity": INDOOR_RELATIVE_HUMIDITY,
            "condensation_surface_resistance": CONDENSATION_RSI,
            "surface_resistance": {"interior": INTERIOR_RS, "exterior": EXTERIOR_RS}}
