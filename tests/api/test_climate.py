"""The design climate is settable on every template path (section, evaluations, value) and
has one default, shared by templates, the value endpoint, DXF environment layers, the
condensation check and the page."""

from __future__ import annotations

import math
import re

import pytest
from api_support import REPO

from coldseam import DEFAULT_ENGINE, climate
from coldseam.imports.dxf_layers import parse_layer_map
from coldseam.schema.evaluation import CondensationRequest
from coldseam.templates import build, list_templates

VALUE = "/api/v1/templates/wall_corner/value"


def _psat(theta: float) -> float:
    """ISO 13788 saturation pressure over water, Pa (docs/domain.md; ISO 13788 [from memory])."""
    return 610.5 * math.exp(17.269 * theta / (237.3 + theta))


def _theta_for(p: float) -> float:
    log_ratio = math.log(p / 610.5)
    return 237.3 * log_ratio / (17.269 - log_ratio)


def _critical(theta_i: float, theta_e: float, rh: float) -> float:
    """ISO 13788 mould criterion: θsi,min at 80 % surface humidity, as a temperature factor."""
    return (_theta_for(rh * _psat(theta_i) / 0.8) - theta_e) / (theta_i - theta_e)


def _values(client, **params) -> dict[str, float]:
    answer = client.get(VALUE, params={"quantity": "fRsi,min_temperature,fRsi_critical,psi",
                                       "format": "csv", **params})
    assert answer.status_code == 200, answer.text
    header, line = answer.text.splitlines()
    return dict(zip(header.split(","), map(float, line.split(",")), strict=True))


def test_outdoor_temperature_and_humidity_reach_the_condensation_check(client_for):
    with client_for(engine=DEFAULT_ENGINE) as client:
        default = _values(client)
        colder = _values(client, outdoor_temperature="-10", indoor_relative_humidity="60")
    # θsi,min = θe + fRsi·(θi − θe): the climate given is the one solved for
    assert default["min_temperature"] == pytest.approx(-5 + default["fRsi"] * 25, abs=1e-4)
    assert colder["min_temperature"] == pytest.approx(-10 + colder["fRsi"] * 30, abs=1e-4)
    assert colder["min_temperature"] == pytest.approx(-10 + default["fRsi"] * 30, abs=0.02)
    assert colder["min_temperature"] < default["min_temperature"] - 0.4
    # fRsi and ψ are properties of the section: the same within the 0.01 K certificate
    assert colder["fRsi"] == pytest.approx(default["fRsi"], abs=0.01 / 25)
    assert colder["psi"] == pytest.approx(default["psi"], rel=2e-3)
    # ISO 13788: 20 °C, 50 %, −5 °C gives fRsi,critical 0.705 (docs/domain.md example)
    assert default["fRsi_critical"] == pytest.approx(0.705, abs=5e-4)
    assert colder["fRsi_critical"] == pytest.approx(_critical(20, -10, 0.6), abs=5e-4)


def test_the_fRsi_surface_resistance_and_a_humidity_class_are_settable(client_for):
    with client_for(engine=DEFAULT_ENGINE) as client:
        default = _values(client)
        lower = _values(client, condensation_surface_resistance="0.13")
        classed = client.post("/api/v1/templates/wall_corner/evaluations",
                              json={"parameters": {"humidity_class": 3}}).json()
    assert lower["fRsi"] > default["fRsi"] + 0.01  # less surface resistance, warmer corner
    assumptions = " ".join(classed["condensation"]["assumptions"])
    assert "humidity class 3" in assumptions


def test_the_climate_is_validated_with_the_parameter_named(client_for):
    with client_for(engine=DEFAULT_ENGINE) as client:
        warm = client.get(VALUE, params={"outdoor_temperature": "12", "indoor_temperature": "12,5"})
        wet = client.post("/api/v1/templates/floor_slab/section", json={"parameters": {
            "humidity_class": 5, "indoor_temperature": 6, "outdoor_temperature": 4}})
        half = client.get(VALUE, params={"humidity_class": "2,5"})
    assert warm.status_code == 422
    assert warm.text.startswith("error: /parameters/outdoor_temperature: outdoor_temperature "
                                "must be at least 1 K below indoor_temperature")
    assert wet.status_code == 422 and wet.json()["field"] == "/parameters/humidity_class"
    assert half.status_code == 422 and "must be a whole number" in half.text


def test_every_template_takes_the_climate_with_one_default():
    for info in list_templates():
        defaults = {p.name: p.default for p in info.parameters}
        assert defaults["indoor_temperature"] == climate.INDOOR_TEMPERATURE
        assert defaults["outdoor_temperature"] == climate.OUTDOOR_TEMPERATURE
        assert defaults["indoor_relative_humidity"] == climate.INDOOR_RELATIVE_HUMIDITY * 100
        assert defaults["condensation_surface_resistance"] == climate.CONDENSATION_RSI
        built = build(info.id, {})
        temperatures = {e["side"]: e["temperature"] for e in built["section"]["environments"]}
        assert temperatures == {"interior": climate.INDOOR_TEMPERATURE,
                                "exterior": climate.OUTDOOR_TEMPERATURE}
        assert built["condensation"]["indoor"] == {
            "relative_humidity": climate.INDOOR_RELATIVE_HUMIDITY}
    assert CondensationRequest().interior_surface_resistance == climate.CONDENSATION_RSI


def test_dxf_environment_layers_default_to_the_same_climate():
    rules = parse_layer_map({"IN": {"environment": "inside", "side": "interior"},
                             "OUT": {"environment": "outside", "side": "exterior"}})
    assert rules["in"][1].air_temperature == climate.INDOOR_TEMPERATURE
    assert rules["out"][1].air_temperature == climate.OUTDOOR_TEMPERATURE
    assert rules["in"][1].resistance == climate.INTERIOR_RS


def test_the_page_falls_back_to_the_same_defaults():
    """The page takes the defaults from the DXF answer; its fallbacks must agree."""
    text = (REPO / "frontend" / "js" / "lib" / "layers.js").read_text(encoding="utf-8")
    found = re.search(r"DEFAULT_TEMPERATURE = \{ interior: (-?[\d.]+), exterior: (-?[\d.]+) \}",
                      text)
    assert found, "layers.js no longer declares DEFAULT_TEMPERATURE"
    assert (float(found[1]), float(found[2])) == (climate.INDOOR_TEMPERATURE,
                                                  climate.OUTDOOR_TEMPERATURE)
    found = re.search(r"DEFAULT_RS = \{ interior: ([\d.]+), exterior: ([\d.]+) \}", text)
    assert (float(found[1]), float(found[2])) == (climate.INTERIOR_RS, climate.EXTERIOR_RS)
