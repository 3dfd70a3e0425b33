"""The evaluation request of the public contract (model-v1): a section plus the ψ and
condensation blocks, and Coldseam's own engine options."""

from __future__ import annotations

from typing import Any, Literal

from pydantic import Field, ValidationError, field_validator, model_validator

from coldseam import climate
from coldseam.errors import InvalidSection
from coldseam.schema.dynamics import DynamicsRequest, check_dynamics
from coldseam.schema.section import (
    MAX_COORDINATE,
    Point,
    Section,
    _Strict,
    check_references,
    check_surface_resistance,
)


class Flanking(_Strict):
    id: str = Field(min_length=1, max_length=80)
    length: float = Field(gt=0, description="Length lj over which Uj counts, in the section "
                          "unit, in the dimension system the user chose.")
    u_value: float | None = Field(default=None, gt=0, le=100,
                                  description="U-value of the plain element in W/(m²·K).")
    cut: tuple[Point, Point] | None = Field(
        default=None,
        description="A line across the plain part of the element, from one exposed surface to "
        "another; its layers give U = 1/(Rsi + Σ d/λ + Rse).",
    )

    @model_validator(mode="after")
    def _one_source(self) -> Flanking:
        if (self.u_value is None) == (self.cut is None):
            raise ValueError(f"flanking element '{self.id}' needs exactly one of u_value or cut")
        return self


class CalibrationPanel(_Strict):
    width: float = Field(gt=0, description="Visible width b_p of the insulation panel put in "
                         "place of the glazing, in the section unit.")
    u_value: float = Field(gt=0, le=100, description="U-value U_p of the panel (its 1D "
                           "U = 1/(Rsi + d/λ + Rse)) in W/(m²·K).")


class FrameRequest(_Strict):
    """U_f by the calibration-panel method of ISO 10077-2: U_f = (L2D − U_p·b_p) / b_f."""

    panel: CalibrationPanel
    frame_width: float = Field(gt=0, description="Projected frame width b_f, in the section "
                               "unit.")


class PsiRequest(_Strict):
    flanking: list[Flanking] = Field(default_factory=list)
    dimensions: Literal["internal", "overall_internal", "external"] | None = Field(
        default=None, description="Dimension system the lengths are measured in; echoed.")
    environments: tuple[str, str] | None = Field(
        default=None, description="The pair of environments ψ is between (needed with more "
        "than two environments), interior first.")
    frame: FrameRequest | None = Field(
        default=None, description="Window frame: U_f from L2D of the frame with an insulation "
        "panel in place of the glazing (ISO 10077-2).")


class IndoorClimate(_Strict):
    temperature: float | None = Field(default=None, ge=-30, le=60,
                                      description="Indoor air temperature θi in °C; "
                                      "default: the interior environment's.")
    relative_humidity: float | None = Field(default=None, gt=0, lt=1,
                                            description="Indoor relative humidity, 0..1.")
    humidity_class: Literal[1, 2, 3, 4, 5] | None = Field(
        default=None, description="ISO 13788 internal humidity class, used instead of "
        "relative_humidity together with the outdoor climate.")

    @model_validator(mode="after")
    def _one_humidity(self) -> IndoorClimate:
        if self.relative_humidity is not None and self.humidity_class is not None:
            raise ValueError("give relative_humidity or humidity_class, not both")
        return self


class OutdoorClimate(_Strict):
    temperature: float | None = Field(default=None, ge=-60, le=50,
                                      description="Outdoor design temperature θe in °C; "
                                      "default: the exterior environment's.")
    relative_humidity: float = Field(default=0.95, gt=0, le=1,
                                     description="Outdoor relative humidity, used with a "
                                     "humidity class.")


class CondensationRequest(_Strict):
    interior_surface_resistance: float = Field(default=climate.CONDENSATION_RSI, ge=0, le=10)
    indoor: IndoorClimate = Field(default_factory=IndoorClimate)
    outdoor: OutdoorClimate = Field(default_factory=OutdoorClimate)
    criterion: float | None = Field(
        default=None, gt=0, lt=1,
        description="A fixed critical fRsi to judge against instead of the one derived from "
        "the indoor climate (e.g. 0.75, common UK practice for dwellings).")

    @field_validator("interior_surface_resistance")
    @classmethod
    def _zero_or_real(cls, value: float) -> float:
        return check_surface_resistance(value)


class EngineOptions(_Strict):
    element: Literal["P1", "P2"] = "P2"
    accuracy: Literal["default", "iso"] = Field(
        default="default", description="'default': levels until heat flow and ψ change by "
        "< 0.1 % and θsi,min by < 0.01 K; 'iso': the ISO 10211 1 % rule.")
    max_levels: int = Field(default=7, ge=1, le=12)
    max_nodes: int = Field(default=400_000, ge=100, le=4_000_000)
    sensitivities: bool = True


class EvaluationRequest(_Strict):
    section: Section
    psi: PsiRequest | None = None
    condensation: CondensationRequest | None = None
    options: EngineOptions = Field(default_factory=EngineOptions)
    dynamics: DynamicsRequest | None = Field(
        default=None, description="Periodic (ISO 13786), time-constant and transient "
        "results; materials then need density and specific heat.")


def parse_request(data: Any) -> EvaluationRequest:
    """Validate an evaluation request, or a bare section, into an EvaluationRequest.

    Raises InvalidSection with a JSON pointer to the first offending field.
    """
    section_keys = {"unit", "materials", "regions", "environments", "boundaries"}
    if isinstance(data, dict) and "section" not in data and section_keys & data.keys():
        data = {"section": data}
    try:
        request = EvaluationRequest.model_validate(data)
    except ValidationError as exc:
        raise invalid_from_pydantic(exc) from None
    check_references(request.section, "/section")
    check_dynamics(request.dynamics, request.section)
    return request


def invalid_from_pydantic(exc: ValidationError) -> InvalidSection:
    """The first pydantic error as an InvalidSection (all of them listed in `.errors`)."""
    details = [_detail(err) for err in exc.errors()]
    first = details[0]
    error = InvalidSection(first["message"], first["field"])
    error.errors = details  # type: ignore[attr-defined]
    return error


def _detail(err: dict[str, Any]) -> dict[str, str]:
    loc = [str(part) for part in err["loc"] if not _is_union_tag(part)]
    pointer = "/" + "/".join(loc) if loc else ""
    message = err["msg"].removeprefix("Value error, ")
    if err["type"] == "missing":
        message = f"'{loc[-1]}' is required" if loc else "a value is required"
        if loc and loc[-1] == "unit":
            message = ("'unit' is required: say whether coordinates are in \"mm\" or \"m\" "
                       "(a drawing in mm read as metres is a silent 1000x error)")
    elif err["type"] == "extra_forbidden":
        message = f"'{loc[-1]}' is not a field Coldseam knows here (misspelt?)"
    elif err["type"] == "finite_number":
        message = "must be a finite number (not NaN or infinity)"
    elif abs((err.get("ctx") or {}).get("le", (err.get("ctx") or {}).get("ge", 0))) \
            == MAX_COORDINATE:
        message = (f"a coordinate must lie within ±{MAX_COORDINATE:g} (in the section unit); "
                   f"got {err.get('input')}")
    return {"field": pointer, "message": message}


def _is_union_tag(part: Any) -> bool:
    # pydantic names union members in locations ("float", "tuple[float, float]"): not fields.
    return isinstance(part, str) and ("[" in part or part in {"float", "int", "str"})


def request_digest(request: EvaluationRequest) -> str:
    """Content hash of the normalised request and the engine version: the evaluation id."""
    import hashlib
    import json

    from coldseam import ENGINE_VERSION

    data = request.model_dump(mode="json")
    canonical = json.dumps({"engine": ENGINE_VERSION, "request": data}, sort_keys=True,
                           separators=(",", ":"))
    if "-0.0" in canonical:  # a -0.0 prints so; without one the walk would change nothing
        canonical = json.dumps({"engine": ENGINE_VERSION, "request": _no_negative_zero(data)},
                               sort_keys=True, separators=(",", ":"))
    return hashlib.sha256(canonical.encode()).hexdigest()[:32]


def _no_negative_zero(data: Any) -> Any:
    """``data`` with every -0.0 made 0.0 (the same number, so the same id)."""
    if isinstance(data, float):
        return 0.0 if data == 0 else data
    if isinstance(data, dict):
        return {k: _no_negative_zero(v) for k, v in data.items()}
    if isinstance(data, list | tuple):
        return [_no_negative_zero(v) for v in data]
    return data
