"""The `dynamics` block of an evaluation request (model-v1 additions §2): periodic (ISO 13786)
quantities, thermal time constants and a transient run. Names are fixed by the contract."""

from __future__ import annotations

from typing import Annotated, Literal

from pydantic import Field, model_validator

from coldseam.errors import InvalidSection
from coldseam.schema.section import Section, _Strict

#: Longest transient series taken (a year of hourly values).
MAX_SERIES = 8761
AirTemperature = Annotated[float, Field(ge=-100, le=200)]


class PeriodicRequest(_Strict):
    period_hours: float = Field(default=24.0, gt=0, le=8760,
                                description="Period T of the harmonic, in hours.")


class TimeConstantsRequest(_Strict):
    count: int = Field(default=3, ge=1, le=20, description="How many of the slowest "
                       "thermal time constants to report.")


class TransientRequest(_Strict):
    time_step_hours: float = Field(default=1.0, gt=0, le=744,
                                   description="Time between the values of every series, h.")
    initial: Literal["steady"] = Field(
        default="steady", description="'steady': start from the steady state at the first "
        "values of the series.")
    temperatures: dict[str, list[AirTemperature]] = Field(
        min_length=1, description="Air temperature series in °C per environment id, at "
        "t = 0, Δt, 2Δt, … (linear in between); other environments keep their temperature.")

    @model_validator(mode="after")
    def _series_lengths(self) -> TransientRequest:
        lengths = {len(series) for series in self.temperatures.values()}
        if len(lengths) > 1:
            raise ValueError("every temperature series needs the same number of values "
                             f"(got {', '.join(str(n) for n in sorted(lengths))})")
        n = lengths.pop()
        if not 2 <= n <= MAX_SERIES:
            raise ValueError(f"a temperature series needs 2 to {MAX_SERIES} values, got {n}")
        return self


class DynamicsRequest(_Strict):
    periodic: PeriodicRequest | None = None
    time_constants: TimeConstantsRequest | None = None
    transient: TransientRequest | None = None


def check_dynamics(dynamics: DynamicsRequest | None, section: Section) -> None:
    """Raise InvalidSection when a transient series names an environment the section lacks."""
    if dynamics is None or dynamics.transient is None:
        return
    ids = [e.id for e in section.environments]
    for env in dynamics.transient.temperatures:
        if env not in ids:
            raise InvalidSection(f"a temperature series is given for environment '{env}', "
                                 f"which is not among the environments ({', '.join(ids)})",
                                 f"/dynamics/transient/temperatures/{env}")
