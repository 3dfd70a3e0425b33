"""The section model of the public contract (model-v1): materials, regions, environments,
boundaries and probes of one 2D cross-section. Field names are fixed by the contract."""

from __future__ import annotations

from typing import Annotated, Literal

from pydantic import BaseModel, ConfigDict, Field, field_validator, model_validator

from coldseam.errors import InvalidSection
from coldseam.schema.cavity import Cavity

#: Smallest λ taken, W/(m·K): ten times below vacuum insulation; far smaller ones make the
#: section's conductances span more than float64 keeps, and the energy balance goes.
MIN_CONDUCTIVITY = 1e-4
#: Smallest non-zero surface resistance taken, m²·K/W (outdoor surfaces in strong wind are
#: about 0.02): a film of 1e-300 would overflow the solver's conductances.
MIN_SURFACE_RESISTANCE = 1e-4
#: Largest coordinate magnitude taken (1000 km in mm): far beyond any drawing, and small
#: enough that the geometry library's arithmetic on it stays finite.
MAX_COORDINATE = 1e9
#: Most environments, boundary paths, probes and symmetry lines one section may have: far
#: beyond any junction, and each costs geometry checks (more are refused at once, 422).
MAX_ENVIRONMENTS = 20
MAX_BOUNDARIES = 1_000
MAX_PROBES = 200
MAX_SYMMETRY_LINES = 20
Coordinate = Annotated[float, Field(ge=-MAX_COORDINATE, le=MAX_COORDINATE)]
Point = Annotated[
    tuple[Coordinate, Coordinate],
    Field(description="A point [x, y] in the section unit."),
]


class _Strict(BaseModel):
    """Unknown fields are refused: a misspelt field silently ignored is a wrong result."""

    model_config = ConfigDict(extra="forbid", allow_inf_nan=False)


class Material(_Strict):
    id: str = Field(min_length=1, max_length=80, description="Name the regions refer to.")
    conductivity: float | tuple[float, float] | None = Field(
        default=None,
        description="Design thermal conductivity λ in W/(m·K): a number (isotropic) or "
        "[λx, λy] along the drawing axes (orthotropic).",
    )
    library: str | None = Field(
        default=None,
        description="Id of a material in the Coldseam materials library, used when "
        "`conductivity` is not given.",
    )
    description: str | None = Field(default=None, max_length=400)
    density: float | None = Field(default=None, gt=0, le=25_000,
                                  description="Density ρ in kg/m³ (dynamic evaluations).")
    specific_heat: float | None = Field(
        default=None, gt=0, le=20_000,
        description="Specific heat capacity c in J/(kg·K) (dynamic evaluations).")
    cavity: Cavity | None = Field(
        default=None,
        description="An air cavity instead of a solid: λeq is computed per region from its "
        "geometry (ISO 10077-2). Exclusive with `conductivity` and `library`.")

    @field_validator("conductivity")
    @classmethod
    def _positive(cls, value: float | tuple[float, float] | None):
        if value is None:
            return value
        values = value if isinstance(value, tuple) else (value,)
        for lam in values:
            if not lam > 0:
                raise ValueError(f"conductivity must be above 0 W/(m·K), got {lam}")
            if lam > 1e5:
                raise ValueError(f"conductivity {lam} W/(m·K) is above any building material")
            if lam < MIN_CONDUCTIVITY:
                raise ValueError(f"conductivity {lam} W/(m·K) is below any building material "
                                 "(vacuum insulation panels are about 0.004)")
        return value

    @model_validator(mode="after")
    def _has_conductivity(self) -> Material:
        if self.cavity is not None and any(getattr(self, name, None) is not None
                                           for name in ("density", "specific_heat")):
            raise ValueError(f"material '{self.id}' is an air cavity: its heat capacity is "
                             "zero, so it takes no density or specific_heat")
        if self.cavity is not None and (self.conductivity is not None or self.library):
            raise ValueError(f"material '{self.id}' is a cavity: give either `cavity` or a "
                             "conductivity/library id, not both (λeq of a cavity is computed)")
        if self.conductivity is None and self.library is None and self.cavity is None:
            raise ValueError(
                f"material '{self.id}' needs a conductivity in W/(m·K), a library id or a `cavity`"
            )
        return self


class Region(_Strict):
    material: str = Field(description="Id of one of `materials`.")
    polygon: list[Point] = Field(min_length=3, description="Outline, closed implicitly.")
    holes: list[list[Point]] = Field(default_factory=list, description="Inner outlines.")


class Environment(_Strict):
    id: str = Field(min_length=1, max_length=80)
    temperature: float = Field(ge=-100, le=200, description="Air temperature in °C.")
    side: Literal["interior", "exterior"]


class Boundary(_Strict):
    environment: str = Field(description="Id of one of `environments`.")
    surface_resistance: float = Field(
        ge=0, le=10, description="Surface resistance Rs in m²·K/W; 0 means a known "
        "surface temperature equal to the environment's."
    )
    condensation_surface_resistance: float | None = Field(
        default=None, ge=0, le=10,
        description="Interior surface resistance for the fRsi/condensation run (ISO 13788), "
        "overriding the evaluation's `interior_surface_resistance` on this boundary "
        "(e.g. 0.13 on glazing).",
    )
    path: list[Point] = Field(min_length=2, description="Polyline along the exposed surface.")

    @field_validator("surface_resistance", "condensation_surface_resistance")
    @classmethod
    def _zero_or_real(cls, value: float | None) -> float | None:
        return check_surface_resistance(value)


def check_surface_resistance(value: float | None) -> float | None:
    """0 (a known surface temperature) or at least MIN_SURFACE_RESISTANCE."""
    if value is not None and 0 < value < MIN_SURFACE_RESISTANCE:
        raise ValueError(f"surface resistance {value:g} m²·K/W is below any real surface "
                         f"({MIN_SURFACE_RESISTANCE:g}); use 0 for a known surface temperature")
    return value


class Probe(_Strict):
    id: str = Field(min_length=1, max_length=80)
    point: Point


class Section(_Strict):
    name: str | None = Field(default=None, max_length=200)
    description: str | None = Field(default=None, max_length=2000)
    unit: Literal["mm", "m"] = Field(description="Unit of every coordinate and length.")
    materials: list[Material] = Field(min_length=1)
    regions: list[Region] = Field(min_length=1)
    environments: list[Environment] = Field(min_length=1, max_length=MAX_ENVIRONMENTS)
    boundaries: list[Boundary] = Field(min_length=1, max_length=MAX_BOUNDARIES)
    probes: list[Probe] = Field(default_factory=list, max_length=MAX_PROBES)
    symmetry_lines: list[list[Point]] = Field(
        default_factory=list, max_length=MAX_SYMMETRY_LINES,
        description="Polylines along which the outline is a symmetry plane: adiabatic like any "
        "uncovered outline, but not a cut-off plane, so exempt from the cut-off checks.")

    @property
    def scale(self) -> float:
        """Metres per section unit."""
        return 0.001 if self.unit == "mm" else 1.0


def check_references(section: Section, prefix: str = "") -> None:
    """Raise InvalidSection when an id is repeated or refers to nothing."""
    _unique(f"{prefix}/materials", [m.id for m in section.materials])
    _unique(f"{prefix}/environments", [e.id for e in section.environments])
    _unique(f"{prefix}/probes", [p.id for p in section.probes])
    materials = {m.id for m in section.materials}
    for i, region in enumerate(section.regions):
        if region.material not in materials:
            raise InvalidSection(
                f"region {i} refers to material '{region.material}', which is not among the "
                f"materials ({', '.join(sorted(materials))})",
                f"{prefix}/regions/{i}/material",
            )
    environments = {e.id for e in section.environments}
    for i, boundary in enumerate(section.boundaries):
        if boundary.environment not in environments:
            raise InvalidSection(
                f"boundary {i} refers to environment '{boundary.environment}', which is not "
                f"among the environments ({', '.join(sorted(environments))})",
                f"{prefix}/boundaries/{i}/environment",
            )
    used = {b.environment for b in section.boundaries}
    for i, env in enumerate(section.environments):
        if env.id not in used:
            raise InvalidSection(
                f"environment '{env.id}' has no boundary path: every environment must be "
                "exposed along some part of the section outline",
                f"{prefix}/environments/{i}",
            )


def _unique(pointer: str, ids: list[str]) -> None:
    seen: set[str] = set()
    for i, ident in enumerate(ids):
        if ident in seen:
            raise InvalidSection(f"id '{ident}' is used twice", f"{pointer}/{i}/id")
        seen.add(ident)
