"""Building blocks shared by the junction templates: parameter declarations and their
validation, surface resistances, cut-off distances and the pieces of an evaluation request.

All template geometry is in millimetres.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any, Literal

from coldseam import climate
from coldseam.errors import InvalidSection
from coldseam.materials import lookup

#: ISO 6946 surface resistances, m²·K/W, by direction of heat flow.
RSI_HORIZONTAL = 0.13
RSI_UPWARD = 0.10
RSI_DOWNWARD = 0.17
RSE = 0.04
#: ISO 13788 interior surface resistance for the fRsi run: opaque parts, glazing and frames.
RSI_CONDENSATION = climate.CONDENSATION_RSI
RSI_CONDENSATION_FRAME = climate.CONDENSATION_RSI_FRAME

#: Default design climate of every template (θi, θe) in °C (``coldseam.climate``); the
#: climate parameters below override it. L2D and ψ do not depend on it.
INSIDE_TEMPERATURE = climate.INDOOR_TEMPERATURE
OUTSIDE_TEMPERATURE = climate.OUTDOOR_TEMPERATURE
INDOOR_RELATIVE_HUMIDITY = climate.INDOOR_RELATIVE_HUMIDITY
#: The least difference θi − θe a template accepts, K.
LEAST_TEMPERATURE_DIFFERENCE = 1.0

#: A flanking element's U is read along a cut this far (mm) inside its cut-off plane.
CUT_INSET = 50.0

Kind = Literal["number", "integer", "material", "choice"]


@dataclass(frozen=True)
class Parameter:
    """One template parameter. Lengths in mm; a material is a library id or a λ in W/(m·K)."""

    name: str
    unit: str
    default: float | str
    description: str
    kind: Kind = "number"
    min: float | None = None
    max: float | None = None
    options: tuple[str, ...] = ()
    #: An optional layer: 0 means none, otherwise at least this (no slivers).
    min_nonzero: float | None = None

    def as_dict(self) -> dict[str, Any]:
        out = {"name": self.name, "unit": self.unit, "default": self.default,
               "min": self.min, "max": self.max, "description": self.description,
               "kind": self.kind}
        if self.kind == "choice":
            out["options"] = list(self.options)
        if self.min_nonzero is not None:
            out["min_nonzero"] = self.min_nonzero
        return out


@dataclass(frozen=True)
class TemplateInfo:
    id: str
    title: str
    description: str
    parameters: tuple[Parameter, ...] = field(default_factory=tuple)

    def as_dict(self) -> dict[str, Any]:
        return {"id": self.id, "title": self.title, "description": self.description,
                "parameters": [p.as_dict() for p in self.parameters]}


def length(name: str, default: float, low: float, high: float, description: str) -> Parameter:
    return Parameter(name, "mm", default, description, "number", low, high)


def optional_length(name: str, default: float, least: float, high: float,
                    description: str) -> Parameter:
    """A thickness where 0 means the layer is absent, else at least ``least`` mm."""
    return Parameter(name, "mm", default, f"{description} (0: none, else at least {least:g} mm)",
                     "number", 0.0, high, min_nonzero=least)


def material(name: str, default: str, description: str) -> Parameter:
    return Parameter(name, "W/(m·K) or library id", default, description, "material",
                     0.005, 500.0)


def choice(name: str, options: tuple[str, ...], description: str) -> Parameter:
    return Parameter(name, "", options[0], description, "choice", options=options)


# Declarations several templates share (names, defaults and wording are part of the API).

def wall_structure(low: float = 100, high: float = 400,
                   what: str = "wall structure") -> tuple[Parameter, Parameter]:
    """``wall_thickness`` (mm, 200 by default) and ``wall_material`` (brick) of a wall."""
    return (length("wall_thickness", 200, low, high, f"Thickness of the {what}"),
            material("wall_material", "brick_protected", what.capitalize()))


def wall_insulation(prefix: str = "", label: str = "External insulation", low: float = 20,
                    high: float = 400) -> tuple[Parameter, Parameter]:
    """``<prefix>insulation_thickness`` (mm, 160 by default) and ``<prefix>insulation_material``
    (EPS, λ 0.035 W/(m·K)) of a wall's insulation layer."""
    return (length(f"{prefix}insulation_thickness", 160, low, high,
                   f"Thickness of the {label.lower()}"),
            material(f"{prefix}insulation_material", "eps_035", label))


def dimensions(lengths: str = "wall") -> Parameter:
    """The ISO 13789 dimension system (internal or external) of the flanking lengths."""
    return choice("dimensions", ("internal", "external"),
                  f"Dimension system of the {lengths} lengths (ISO 13789)")


@dataclass(frozen=True)
class MaterialChoice:
    """A material parameter's value: a library row, or a conductivity given directly."""

    conductivity: float
    library: str | None = None
    name: str = ""
    #: With a conductivity given directly: kg/m³ and J/(kg·K), for the dynamic results.
    density: float | None = None
    specific_heat: float | None = None

    def entry(self, role: str) -> dict[str, Any]:
        """The section's material entry for this choice under the id ``role``."""
        if self.library is not None:
            return {"id": role, "library": self.library, "description": self.name}
        out: dict[str, Any] = {"id": role, "conductivity": self.conductivity}
        if self.density is not None and self.specific_heat is not None:
            out.update(density=self.density, specific_heat=self.specific_heat)
        return out


def invalid(name: str, message: str) -> InvalidSection:
    return InvalidSection(message, f"/parameters/{name}")


def resolve_parameters(info: TemplateInfo, given: Any) -> dict[str, Any]:
    """Defaults merged with ``given``; each value checked against its declaration."""
    if given is None:
        given = {}
    if not isinstance(given, dict):
        raise InvalidSection("parameters must be an object of name: value", "/parameters")
    declared = {p.name: p for p in info.parameters}
    for name in given:
        if name not in declared:
            raise invalid(name, f"'{name}' is not a parameter of template '{info.id}' "
                          f"(its parameters: {', '.join(declared)})")
    return {name: _check(p, given.get(name, p.default)) for name, p in declared.items()}


def _check(p: Parameter, value: Any) -> Any:
    if p.kind == "choice":
        if isinstance(value, int) and not isinstance(value, bool) and str(value) in p.options:
            value = str(value)  # a count option ("3") given as a number, e.g. from a CSV cell
        if value not in p.options:
            raise invalid(p.name, f"{p.name} must be one of {', '.join(p.options)}; "
                          f"got {value!r}")
        return value
    if p.kind == "material" and isinstance(value, str):
        row = lookup(value, f"/parameters/{p.name}")
        return MaterialChoice(row.conductivity, row.id, row.name)
    number = _number(p, value)
    if p.kind == "integer" and not number.is_integer():
        raise invalid(p.name, f"{p.name} must be a whole number; got {number:g}")
    return MaterialChoice(number) if p.kind == "material" else number


def _number(p: Parameter, value: Any) -> float:
    what = "a library id or a conductivity in W/(m·K)" if p.kind == "material" else (
        f"a number in {p.unit}" if p.unit else "a number")
    if isinstance(value, bool) or not isinstance(value, int | float) or not math.isfinite(value):
        raise invalid(p.name, f"{p.name} must be {what}; got {value!r}")
    value = float(value)
    if (p.min is not None and value < p.min) or (p.max is not None and value > p.max):
        raise invalid(p.name, f"{p.name} must be between {p.min:g} and {p.max:g} {p.unit}; "
                      f"got {value:g}")
    if p.min_nonzero is not None and 0 < value < p.min_nonzero:
        raise invalid(p.name, f"{p.name} must be 0 (none) or at least {p.min_nonzero:g} "
                      f"{p.unit}; got {value:g}")
    return value


def cutoff_distance(thickness: float) -> float:
    """ISO 10211: a cut-off plane at least max(1 m, 3 × element thickness) from the junction."""
    return max(1000.0, 3.0 * thickness)


def rect(x0: float, y0: float, x1: float, y1: float) -> list[list[float]]:
    """A counter-clockwise rectangle with corners (x0, y0) and (x1, y1)."""
    return [[x0, y0], [x1, y0], [x1, y1], [x0, y1]]


def region(material_id: str, polygon: list) -> dict[str, Any]:
    return {"material": material_id, "polygon": [_point(p) for p in polygon]}


def boundary(environment: str, resistance: float, path: list,
             condensation_resistance: float | None = None) -> dict[str, Any]:
    out: dict[str, Any] = {"environment": environment, "surface_resistance": resistance,
                           "path": _dedupe([_point(p) for p in path])}
    if condensation_resistance is not None:
        out["condensation_surface_resistance"] = condensation_resistance
    return out


def flanking(ident: str, length_mm: float, start: tuple, end: tuple) -> dict[str, Any]:
    """A flanking element whose U the engine reads along the cut start → end."""
    return {"id": ident, "length": round(length_mm, 6), "cut": [_point(start), _point(end)]}


def request(name: str, description: str, materials: dict[str, MaterialChoice],
            regions: list, boundaries: list, flanking_elements: list,
            dimensions: str | None, symmetry_lines: list | None = None) -> dict[str, Any]:
    """The evaluation request of model-v1 for a template-built section; ``symmetry_lines``
    marks adiabatic outline pieces that are symmetry planes, not cut-off planes."""
    psi: dict[str, Any] = {"flanking": flanking_elements}
    if dimensions is not None:
        psi["dimensions"] = dimensions
    return {
        "section": {
            "name": name, "description": description, "unit": "mm",
            "materials": [choice_.entry(role) for role, choice_ in materials.items()],
            "regions": regions,
            "environments": [
                {"id": "inside", "temperature": INSIDE_TEMPERATURE, "side": "interior"},
                {"id": "outside", "temperature": OUTSIDE_TEMPERATURE, "side": "exterior"},
            ],
            "boundaries": boundaries,
            "symmetry_lines": [[_point(p) for p in line] for line in symmetry_lines or []],
        },
        "psi": psi,
        "condensation": {"interior_surface_resistance": RSI_CONDENSATION,
                         "indoor": {"relative_humidity": INDOOR_RELATIVE_HUMIDITY}},
    }


def _point(p) -> list[float]:
    return [round(float(p[0]), 6), round(float(p[1]), 6)]


def _dedupe(points: list[list[float]]) -> list[list[float]]:
    out = [points[0]]
    for p in points[1:]:
        if p != out[-1]:
            out.append(p)
    return out

