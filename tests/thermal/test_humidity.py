"""ISO 13788 humidity functions against the formula itself, steam tables, IAPWS and ASHRAE."""

import numpy as np
import pytest

from coldseam.errors import InvalidSection
from coldseam.schema.evaluation import CondensationRequest
from coldseam.thermal.humidity import (
    assess_condensation,
    critical_frsi,
    dew_point,
    indoor_vapour_pressure,
    saturation_pressure,
    temperature_for_pressure,
    vapour_pressure_excess,
)

iapws97 = pytest.importorskip("iapws.iapws97")
iapws_base = pytest.importorskip("iapws._iapws")
psychrolib = pytest.importorskip("psychrolib")
psychrolib.SetUnitSystem(psychrolib.SI)


def test_formula_values_at_20_and_0():
    # ISO 13788 formula (domain primer [from memory]): psat(20 °C) = 2337 Pa, psat(0) = 610.5 Pa.
    assert float(saturation_pressure(20.0)) == pytest.approx(2337.0, abs=0.5)
    assert float(saturation_pressure(0.0)) == pytest.approx(610.5, abs=1e-9)


def test_20_degrees_near_steam_table():
    # Steam tables: psat(20 °C) = 2339 Pa; the ISO 13788 formula is within 0.2 %.
    assert float(saturation_pressure(20.0)) == pytest.approx(2339.0, rel=0.002)


def test_ice_branch_below_zero():
    # ISO 13788 over ice: 610.5·exp(21.875 θ / (265.5 + θ)); at −10 °C that is 259.3 Pa.
    expected = 610.5 * np.exp(21.875 * -10.0 / (265.5 - 10.0))
    assert float(saturation_pressure(-10.0)) == pytest.approx(expected, rel=1e-12)
    assert float(saturation_pressure(-1e-9)) == pytest.approx(610.5, rel=1e-6)


@pytest.mark.parametrize("theta", [0.0, 2.0, 5.0, 10.0, 15.0, 20.0, 25.0, 30.0])
def test_over_water_within_0_3_percent_of_iapws_if97(theta):
    # IAPWS-IF97 saturation pressure (iapws.iapws97._PSat_T, MPa). Band 0.3 % from 0 to 30 °C.
    reference = iapws97._PSat_T(theta + 273.15) * 1e6
    assert float(saturation_pressure(theta)) == pytest.approx(reference, rel=0.003)


@pytest.mark.parametrize("theta", [-10.0, -7.5, -5.0, -2.5, -0.5])
def test_over_ice_within_0_3_percent_of_iapws_sublimation(theta):
    # IAPWS 2011 sublimation pressure of ice (iapws._iapws._Sublimation_Pressure, MPa).
    # Band 0.3 % from −10 to 0 °C (the formula drifts to ~0.5 % at −20 °C).
    reference = iapws_base._Sublimation_Pressure(theta + 273.15) * 1e6
    assert float(saturation_pressure(theta)) == pytest.approx(reference, rel=0.003)


@pytest.mark.parametrize("p", [100.0, 300.0, 610.5, 611.0, 1000.0, 2337.0, 5000.0])
def test_temperature_for_pressure_inverts_saturation_pressure(p):
    assert float(saturation_pressure(temperature_for_pressure(p))) == pytest.approx(p, rel=1e-12)


def test_functions_take_arrays():
    theta = np.array([-10.0, 0.0, 20.0])
    assert saturation_pressure(theta).shape == (3,)
    np.testing.assert_allclose(temperature_for_pressure(saturation_pressure(theta)), theta,
                               atol=1e-10)


def test_non_positive_pressure_is_refused():
    with pytest.raises(ValueError):
        temperature_for_pressure(0.0)


@pytest.mark.parametrize("theta, rh", [(20.0, 0.5), (20.0, 0.65), (22.0, 0.4), (18.0, 0.8),
                                       (25.0, 0.6)])
def test_dew_point_against_psychrolib(theta, rh):
    # ASHRAE Handbook—Fundamentals psychrometrics (psychrolib). Band 0.1 K above 0 °C.
    reference = psychrolib.GetTDewPointFromRelHum(theta, rh)
    assert float(dew_point(theta, rh)) == pytest.approx(reference, abs=0.1)


def test_domain_example_20_50_minus_5():
    # Domain primer example [from memory]: 20 °C, 50 % indoors, −5 °C outdoors: dew point 9.3 °C,
    # θsi at 80 % surface humidity 12.6 °C, fRsi,critical 0.705.
    p_i = 0.5 * float(saturation_pressure(20.0))
    assert float(dew_point(20.0, 0.5)) == pytest.approx(9.3, abs=0.05)
    assert float(temperature_for_pressure(p_i / 0.8)) == pytest.approx(12.6, abs=0.05)
    assert critical_frsi(20.0, -5.0, p_i, 0.8) == pytest.approx(0.705, abs=0.0015)
    # Surface condensation (RH 1.0) occurs at the dew point itself.
    assert critical_frsi(20.0, -5.0, p_i, 1.0) == pytest.approx((9.27 + 5) / 25, abs=0.001)


@pytest.mark.parametrize("humidity_class, excess", [(1, 270), (2, 540), (3, 810), (4, 1080),
                                                    (5, 1350)])
def test_humidity_class_excess_linear_to_zero_at_20(humidity_class, excess):
    # ISO 13788 internal humidity classes (domain primer [from memory]).
    assert float(vapour_pressure_excess(humidity_class, -10.0)) == excess
    assert float(vapour_pressure_excess(humidity_class, 0.0)) == excess
    assert float(vapour_pressure_excess(humidity_class, 10.0)) == pytest.approx(excess / 2)
    assert float(vapour_pressure_excess(humidity_class, 20.0)) == 0.0
    assert float(vapour_pressure_excess(humidity_class, 25.0)) == 0.0


def test_indoor_vapour_pressure_applies_safety_factor():
    # ISO 13788: pi = pe + 1.10·Δp. Class 3 at 0 °C, outdoor 95 %: 0.95·610.5 + 1.1·810.
    assert indoor_vapour_pressure(3, 0.0, 0.95) == pytest.approx(0.95 * 610.5 + 891.0)


def test_unknown_humidity_class_is_refused():
    with pytest.raises(ValueError):
        vapour_pressure_excess(6, 0.0)


def _request(**data) -> CondensationRequest:
    return CondensationRequest.model_validate(data)


def test_assessment_of_domain_example():
    block = assess_condensation(0.75, _request(indoor={"temperature": 20, "relative_humidity": 0.5},
                                               outdoor={"temperature": -5}), 20.0, 0.0)
    assert block["fRsi_critical"] == pytest.approx(0.705, abs=0.0015)
    assert block["verdict"] == "pass"
    assert block["margin"] == pytest.approx(0.75 - block["fRsi_critical"])
    assert block["min_temperature"] == pytest.approx(-5 + 0.75 * 25)
    assert block["dew_point"] == pytest.approx(9.3, abs=0.05)
    assert block["min_temperature_required"] == pytest.approx(12.6, abs=0.05)
    assert block["indoor_vapour_pressure"] == pytest.approx(1168.5, abs=0.5)
    assert block["surface_condensation"] is False
    assert block["at"] is None
    assert block["assumptions"] == []


def test_assessment_fails_below_critical_and_flags_condensation():
    block = assess_condensation(0.5, _request(), 20.0, -5.0)
    assert block["verdict"] == "fail" and block["margin"] < 0
    assert block["surface_condensation"] is True  # θsi = 7.5 °C < dew point 9.3 °C


def test_defaults_are_stated_as_assumptions():
    block = assess_condensation(0.8, None, 20.0, -5.0)
    assert block["indoor_relative_humidity"] == 0.5
    text = " ".join(block["assumptions"])
    assert "50 %" in text and "common practice" in text
    assert "interior environment" in text and "exterior environment" in text


def test_fixed_criterion_overrides_climate_value():
    block = assess_condensation(0.72, _request(criterion=0.75), 20.0, -5.0)
    assert block["fRsi_critical"] == 0.75 and block["criterion"] == "fixed"
    assert block["verdict"] == "fail"
    assert block["fRsi_critical_mould"] == pytest.approx(0.705, abs=0.0015)


def test_humidity_class_gives_indoor_pressure():
    block = assess_condensation(0.7, _request(indoor={"humidity_class": 3},
                                              outdoor={"temperature": -5}), 20.0, -5.0)
    expected = 0.95 * float(saturation_pressure(-5.0)) + 1.10 * 810.0
    assert block["indoor_vapour_pressure"] == pytest.approx(expected)
    assert block["indoor_relative_humidity"] == pytest.approx(expected / 2337.0, rel=1e-3)


def test_indoor_not_warmer_than_outdoor_names_the_field():
    with pytest.raises(InvalidSection) as info:
        assess_condensation(0.7, _request(indoor={"temperature": 10}, outdoor={"temperature": 12}),
                            20.0, 0.0)
    assert info.value.field == "/condensation/indoor/temperature"


def test_supersaturated_class_is_refused():
    with pytest.raises(InvalidSection) as info:
        assess_condensation(0.7, _request(indoor={"temperature": 10, "humidity_class": 5},
                                          outdoor={"temperature": -10}), 20.0, 0.0)
    assert info.value.field == "/condensation/indoor/humidity_class"
