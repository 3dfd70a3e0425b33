"""The air-cavity description of a material (model-v1 additions §1).

A material with ``cavity`` is an air cavity, not a solid: every region of it is one cavity
whose equivalent conductivity λeq Coldseam computes from the cavity's own geometry
(ISO 10077-2 unventilated cavities; see ``coldseam.thermal.cavities``).
"""

from __future__ import annotations

from typing import Literal

from pydantic import BaseModel, ConfigDict, Field, field_validator

#: ISO 10077-2 defaults [recalled from memory]: ΔT = 10 K across the cavity, Tm = 10 °C.
DEFAULT_TEMPERATURE_DIFFERENCE = 10.0
DEFAULT_MEAN_TEMPERATURE = 10.0
#: The emissivity of ordinary (non-low-e) building surfaces, ISO 10077-2 default [from memory].
DEFAULT_EMISSIVITY = 0.9


class Cavity(BaseModel):
    model_config = ConfigDict(extra="forbid", allow_inf_nan=False)

    ventilation: Literal["unventilated", "slightly_ventilated", "well_ventilated"] = Field(
        default="unventilated",
        description="'unventilated': closed cavity; 'slightly_ventilated': open through a slit "
        "of about 2-10 mm (twice the unventilated λeq); 'well_ventilated': open wider, its "
        "faces exposed to the environment it opens onto.")
    emissivity: float | tuple[float, float] = Field(
        default=DEFAULT_EMISSIVITY,
        description="Hemispherical emissivity of the cavity faces: one number for both, or "
        "[ε1, ε2] (ε1 on the warm face); each in (0, 1].")
    temperature_difference: float = Field(
        default=DEFAULT_TEMPERATURE_DIFFERENCE, gt=0, le=100,
        description="Temperature difference ΔT across the cavity in K (convection term).")
    mean_temperature: float = Field(
        default=DEFAULT_MEAN_TEMPERATURE, ge=-100, le=200,
        description="Mean temperature Tm of the cavity in °C (radiation term).")
    heat_flow_direction: Literal["horizontal", "upward", "downward"] | None = Field(
        default=None,
        description="Direction of the heat flow through the cavity; default: from the "
        "positions of the warmest and coldest environments' exposed surfaces.")

    @field_validator("emissivity")
    @classmethod
    def _emissivity_range(cls, value: float | tuple[float, float]):
        for eps in value if isinstance(value, tuple) else (value,):
            if not 0 < eps <= 1:
                raise ValueError(f"emissivity must lie in (0, 1] (0.9 for ordinary surfaces, "
                                 f"about 0.05-0.2 for low-e coatings or bare aluminium), "
                                 f"got {eps:g}")
        return value

    @property
    def emissivities(self) -> tuple[float, float]:
        e = self.emissivity
        return (float(e[0]), float(e[1])) if isinstance(e, tuple) else (float(e), float(e))
