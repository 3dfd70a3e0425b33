"""Dynamic results against closed-form solutions, and the energy account of transient runs.

Sources: Carslaw & Jaeger, Conduction of Heat in Solids (2nd ed.), §3.3 (slab with both faces
at fixed temperatures: modes sin(nπx/L) decaying as exp(−n²π²αt/L²)) and §2.7 (semi-infinite
solid heated through a surface resistance), recalled from memory [from memory]; the same
formulas are in Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, §5.5–5.7.
"""

import math

import numpy as np
import pytest
from scipy.integrate import quad
from scipy.special import erfcx
from sections import layered_wall, run

from coldseam.errors import InvalidSection
from coldseam.schema import parse_request
from coldseam.templates import build

CONCRETE = {"conductivity": 2.0, "density": 2400, "specific_heat": 1000}  # λ, ρ, c


def slab(thickness_mm, height_mm, rs=0.0):
    section = layered_wall([("concrete", 2.0, thickness_mm)], height=height_mm, rsi=rs, rse=rs)
    section["materials"][0].update(CONCRETE)
    return section


def test_slab_with_known_temperatures_both_sides_cools_with_rho_c_l2_over_lambda_pi2():
    # Both faces held at their temperature (Rs = 0): τ₁ = ρcL²/(λπ²), τₙ = τ₁/n² along the
    # thickness; the strip's height H adds modes cos(mπy/H) with 1/τ = λπ²/ρc·(n²/L² + m²/H²).
    length, height = 0.2, 0.08
    result = run({"section": slab(length * 1000, height * 1000),
                  "dynamics": {"time_constants": {"count": 3}}})
    taus = np.array(result["dynamics"]["time_constants_hours"]) * 3600
    rho_c, lam = 2400 * 1000, 2.0
    tau_1 = rho_c * length ** 2 / (lam * math.pi ** 2)
    expected = sorted([tau_1, tau_1 / 4, tau_1 / 9,
                       rho_c / (lam * math.pi ** 2 * (1 / length ** 2 + 1 / height ** 2))],
                      reverse=True)[:3]
    assert taus == pytest.approx(expected, rel=5e-3)  # the certificate's dynamic target


def surface_step_response(t, h, lam, alpha):
    """Surface temperature of a semi-infinite solid at 0 whose air steps to 1 at t = 0
    through a surface conductance h: 1 − exp(β²) erfc(β), β = h√(αt)/λ."""
    return 1.0 - erfcx(h * math.sqrt(alpha * t) / lam) if t > 0 else 0.0


def test_semi_infinite_solid_surface_temperature_follows_erfc():
    # 1.5 m of concrete: over a day the far face sees erfc(1.5 m/(2√(αt))) < 1e-4 of the
    # swing, so the slab is semi-infinite. The air ramps from 0 to 10 °C over the first hour
    # and stays (the series is linear in between): the reference is the step response
    # averaged over the ramp, ∫ S(t − s) ds / Δt.
    rs, dt, swing = 0.13, 3600.0, 10.0
    section = slab(1500, 200, rs=rs)  # its far face (x = 1.5 m) faces a room held at 0 °C
    section["environments"][1].update(id="air", temperature=0)
    section["environments"][0].update(temperature=0)
    section["boundaries"][0]["environment"] = "air"
    series = [0.0] + [swing] * 24
    result = run({"section": section, "dynamics": {"transient": {
        "time_step_hours": 1, "temperatures": {"air": series}}}})
    transient = result["dynamics"]["transient"]
    alpha = 2.0 / (2400 * 1000)
    for t_hours, value in zip(transient["times_hours"], transient["min_surface_temperature"]["air"],
                              strict=True):
        t = t_hours * 3600
        reference = swing / dt * quad(lambda s, t=t: surface_step_response(t - s, 1 / rs, 2.0, alpha),
                                      0, min(t, dt), epsabs=1e-12)[0]
        assert value == pytest.approx(reference, abs=0.01 * swing), t_hours  # 1 % of the swing


def energy_error(transient):
    heat_in = np.sum([np.array(v) for v in transient["heat_in"].values()], axis=0)
    stored = np.array(transient["stored_heat_change"])
    return np.abs(heat_in - stored).max() / np.abs(stored).max()


def test_energy_balance_of_a_template_junction():
    # Heat in − heat out over the run equals the change of stored heat (Σ ρc θ dA).
    request = build("floor_slab")
    outside = [-5 + 6 * math.sin(2 * math.pi * (h - 9) / 24) for h in range(25)]
    request["dynamics"] = {"transient": {"time_step_hours": 1,
                                         "temperatures": {"outside": outside}}}
    transient = run(request)["dynamics"]["transient"]
    assert np.abs(transient["stored_heat_change"]).max() > 1e3  # J/m: the slab edge does store
    assert energy_error(transient) < 1e-6


def test_energy_balance_with_a_known_temperature_surface():
    # Rs = 0 outside: that heat flow is the reaction of the dynamic equations (with C θ').
    section = layered_wall([("brick", 0.56, 100), ("concrete", 2.0, 200)], height=500, rse=0.0)
    section["materials"][0].update(density=1700, specific_heat=1000)
    section["materials"][1].update(CONCRETE)
    inside = [20, 20, 18, 16, 16, 17, 19, 21, 21, 21, 20, 20, 20]
    outside = [-5, -7, -8, -6, -2, 3, 5, 4, 1, -2, -4, -5, -5]
    transient = run({"section": section, "dynamics": {"transient": {
        "time_step_hours": 2, "temperatures": {"inside": inside, "outside": outside}}}}
    )["dynamics"]["transient"]
    assert energy_error(transient) < 1e-6
    assert transient["min_surface_temperature"]["outside"] == pytest.approx(outside, abs=1e-9)


def test_a_material_without_density_is_named():
    section = layered_wall([("brick", 0.56, 100), ("concrete", 2.0, 200)], height=500)
    section["materials"][1].update(CONCRETE)
    with pytest.raises(InvalidSection) as info:
        run({"section": section, "dynamics": {"periodic": {}}})
    assert info.value.field == "/section/materials/0/density"
    assert "'brick'" in info.value.message


def test_a_series_for_an_unknown_environment_is_named():
    section = slab(200, 200)
    with pytest.raises(InvalidSection) as info:
        parse_request({"section": section, "dynamics": {"transient": {
            "temperatures": {"outdoors": [0, 1]}}}})
    assert info.value.field == "/dynamics/transient/temperatures/outdoors"


def test_series_of_different_lengths_are_refused():
    section = slab(200, 200)
    with pytest.raises(InvalidSection) as info:
        parse_request({"section": section, "dynamics": {"transient": {
            "temperatures": {"outside": [0, 1, 2], "inside": [20, 20]}}}})
    assert info.value.field == "/dynamics/transient"
    assert "same number of values" in info.value.message
