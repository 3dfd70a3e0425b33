"""The layer map of a DXF import: what each drawing layer stands for.

A layer is a material (``{"material": id, "conductivity": λ or [λx, λy]}`` or
``{"material": id, "library": libid}``, optional ``"order"``: higher is drawn on top), an
environment (``{"environment": id, "side": "interior"|"exterior", "temperature": θ,
"surface_resistance": R}``; temperature and R default by side to the design climate of
``coldseam.climate``) or ignored (``{"ignore": true}``). Layer names match without
regard to case, as in CAD.
"""

from __future__ import annotations

from typing import Any, Literal

from pydantic import BaseModel, ConfigDict, Field, ValidationError

from coldseam import climate
from coldseam.errors import InvalidSection
from coldseam.schema.evaluation import invalid_from_pydantic
from coldseam.schema.section import Environment, Material


class _Rule(BaseModel):
    model_config = ConfigDict(extra="forbid", allow_inf_nan=False)


class MaterialLayer(_Rule):
    material: str = Field(min_length=1, max_length=80)
    conductivity: float | tuple[float, float] | None = None
    library: str | None = Field(default=None, min_length=1, max_length=80)
    order: int = Field(default=0, ge=-10_000, le=10_000, description="Precedence: regions of "
                       "a higher order are drawn over lower ones; ties go by drawing order.")


class EnvironmentLayer(_Rule):
    environment: str = Field(min_length=1, max_length=80)
    side: Literal["interior", "exterior"]
    temperature: float | None = Field(default=None, description="Air temperature in °C; "
                                      "default by side, from coldseam.climate (20 / −5 °C).")
    surface_resistance: float | None = Field(default=None, ge=0, le=10, description="m²·K/W; "
                                             "default by side: 0.13 interior, 0.04 exterior.")
    condensation_surface_resistance: float | None = Field(default=None, ge=0, le=10)

    @property
    def air_temperature(self) -> float:
        """The temperature given, or the design climate's for this side."""
        return climate.temperature_for(self.side) if self.temperature is None else self.temperature

    @property
    def resistance(self) -> float:
        """The surface resistance given, or the default for this side."""
        if self.surface_resistance is None:
            return climate.surface_resistance_for(self.side)
        return self.surface_resistance


class IgnoreLayer(_Rule):
    ignore: Literal[True]


LayerRule = MaterialLayer | EnvironmentLayer | IgnoreLayer


def layer_pointer(layer: str) -> str:
    """JSON pointer to a layer's entry in the layer map (RFC 6901 escaping)."""
    return "/layer_map/" + layer.replace("~", "~0").replace("/", "~1")


def parse_layer_map(layer_map: Any) -> dict[str, tuple[str, LayerRule]]:
    """Lower-cased layer name -> (name as given, rule); InvalidSection names the entry."""
    if not isinstance(layer_map, dict):
        raise InvalidSection("the layer map must be an object: layer name -> what it is",
                             "/layer_map")
    rules: dict[str, tuple[str, LayerRule]] = {}
    for name, raw in layer_map.items():
        key = str(name).casefold()
        if key in rules:
            raise InvalidSection(f"layers '{rules[key][0]}' and '{name}' are the same layer "
                                 "(layer names do not depend on case)", layer_pointer(str(name)))
        rules[key] = (str(name), _parse_rule(str(name), raw))
    _check_materials(rules)
    _check_environments(rules)
    return rules


def _parse_rule(name: str, raw: Any) -> LayerRule:
    pointer = layer_pointer(name)
    if not isinstance(raw, dict):
        raise InvalidSection(f"layer {name}: expected an object saying what the layer is",
                             pointer)
    model = _rule_model(raw)
    if model is None:
        raise InvalidSection(f"layer {name}: say what the layer is: a \"material\", an "
                             "\"environment\" or {\"ignore\": true}", pointer)
    try:
        rule = model.model_validate(raw)
        if isinstance(rule, MaterialLayer):
            Material(id=rule.material, conductivity=rule.conductivity, library=rule.library)
        if isinstance(rule, EnvironmentLayer):
            Environment(id=rule.environment, temperature=rule.air_temperature, side=rule.side)
    except ValidationError as exc:
        error = invalid_from_pydantic(exc)
        raise InvalidSection(f"layer {name}: {error.message}", pointer + error.field) from None
    return rule


def _rule_model(raw: dict) -> type[LayerRule] | None:
    if "ignore" in raw:
        return IgnoreLayer
    if "material" in raw:
        return MaterialLayer
    if "environment" in raw:
        return EnvironmentLayer
    return None


def _check_materials(rules: dict[str, tuple[str, LayerRule]]) -> None:
    seen: dict[str, tuple[str, MaterialLayer]] = {}
    for name, rule in rules.values():
        if not isinstance(rule, MaterialLayer):
            continue
        first = seen.setdefault(rule.material, (name, rule))
        if (first[1].conductivity, first[1].library) != (rule.conductivity, rule.library):
            raise InvalidSection(
                f"layers {first[0]} and {name} both stand for material '{rule.material}' but "
                "give it different properties; give the material one conductivity or library "
                "id, or use two material ids", layer_pointer(name))


def _check_environments(rules: dict[str, tuple[str, LayerRule]]) -> None:
    seen: dict[str, tuple[str, EnvironmentLayer]] = {}
    for name, rule in rules.values():
        if not isinstance(rule, EnvironmentLayer):
            continue
        first = seen.setdefault(rule.environment, (name, rule))
        if (first[1].air_temperature, first[1].side) != (rule.air_temperature, rule.side):
            raise InvalidSection(
                f"layers {first[0]} and {name} both stand for environment "
                f"'{rule.environment}' but give it a different temperature or side "
                "(surface resistances may differ, the air may not)", layer_pointer(name))


def materials_of(rules: dict[str, tuple[str, LayerRule]], used: set[str]) -> list[dict]:
    """Section materials for the material ids that have at least one region."""
    out: dict[str, dict] = {}
    for _, rule in rules.values():
        if isinstance(rule, MaterialLayer) and rule.material in used:
            entry: dict[str, Any] = {"id": rule.material}
            if rule.conductivity is not None:
                entry["conductivity"] = (list(rule.conductivity)
                                         if isinstance(rule.conductivity, tuple)
                                         else rule.conductivity)
            if rule.library is not None:
                entry["library"] = rule.library
            out.setdefault(rule.material, entry)
    return list(out.values())


def environments_of(rules: dict[str, tuple[str, LayerRule]], used: set[str]) -> list[dict]:
    """Section environments for the environment ids that have at least one boundary."""
    out: dict[str, dict] = {}
    for _, rule in rules.values():
        if isinstance(rule, EnvironmentLayer) and rule.environment in used:
            out.setdefault(rule.environment, {"id": rule.environment,
                                              "temperature": rule.air_temperature,
                                              "side": rule.side})
    return list(out.values())
