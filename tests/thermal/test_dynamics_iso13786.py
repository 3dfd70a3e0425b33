"""Periodic results of plain layered walls against the ISO 13786 matrix method.

The reference is written here from ISO 13786 (Thermal performance of building components —
Dynamic thermal characteristics — Calculation methods), Clause 6 and Annex A, as recalled
from memory [from memory]: each layer has the heat transfer matrix

    Z = [[cosh ξ cos ξ + i sinh ξ sin ξ,  −δ/(2λ)·{sinh ξ cos ξ + cosh ξ sin ξ
                                              + i (cosh ξ sin ξ − sinh ξ cos ξ)}],
         [−λ/δ·{sinh ξ cos ξ − cosh ξ sin ξ + i (sinh ξ cos ξ + cosh ξ sin ξ)},
                                           cosh ξ cos ξ + i sinh ξ sin ξ]]

with the periodic penetration depth δ = √(λT/(πρc)) and ξ = d/δ; a surface resistance is
[[1, −Rs], [0, 1]]; the wall's matrix is Zs2·Zn⋯Z1·Zs1 from side 1 to side 2. Then the
periodic thermal transmittance Y12 = −1/Z12, the admittances Y11 = −Z11/Z12 and
Y22 = −Z22/Z12, the decrement factor |Y12|/U, the areal heat capacities
κ1 = T/(2π)·|(Z11 − 1)/Z12| and κ2 = T/(2π)·|(Z22 − 1)/Z12|, and time shifts from arg Y.

A wall of height H must give H times these values per metre (model-v1 additions §2). The
check is on the complex value, |Y_fem − H·Y_iso| ≤ 0.5 % of |H·Y_iso| (the certificate's
dynamic target), so moduli and time shifts are both covered.
"""

import math

import numpy as np
import pytest
from sections import layered_wall, run

TARGET = 5e-3  # the dynamic certificate's target (levels until changes < 0.5 %)


def layer_matrix(lam, rho, c, d, period):
    delta = math.sqrt(lam * period / (math.pi * rho * c))
    xi = d / delta
    ch, sh, co, si = math.cosh(xi), math.sinh(xi), math.cos(xi), math.sin(xi)
    z11 = ch * co + 1j * sh * si
    z12 = -delta / (2 * lam) * (sh * co + ch * si + 1j * (ch * si - sh * co))
    z21 = -lam / delta * (sh * co - ch * si + 1j * (sh * co + ch * si))
    return np.array([[z11, z12], [z21, z11]])


def wall_matrix(layers, rs1, rs2, period):
    """Z from side 1 to side 2; ``layers`` [(λ, ρ, c, d in m)] listed from side 1."""
    z = np.array([[1, -rs1], [0, 1]], complex)
    for lam, rho, c, d in layers:
        z = layer_matrix(lam, rho, c, d, period) @ z
    return np.array([[1, -rs2], [0, 1]], complex) @ z


def iso13786(layers, rs1, rs2, period):
    z = wall_matrix(layers, rs1, rs2, period)
    factor = period / (2 * math.pi)
    u = 1 / (rs1 + rs2 + sum(d / lam for lam, _, _, d in layers))
    return {"Y12": -1 / z[0, 1], "Y11": -z[0, 0] / z[0, 1], "Y22": -z[1, 1] / z[0, 1],
            "kappa1": factor * abs((z[0, 0] - 1) / z[0, 1]),
            "kappa2": factor * abs((z[1, 1] - 1) / z[0, 1]), "U": u}


def as_complex(entry, period_hours):
    """A result's {modulus, time_shift_hours} (a lag) back to a complex amplitude."""
    return entry["modulus"] * np.exp(-2j * math.pi * entry["time_shift_hours"] / period_hours)


WALLS = {
    # (id, λ W/(m·K), ρ kg/m³, c J/(kg·K), thickness mm), exterior first. Invented walls.
    "insulated masonry": [("render", 0.8, 1600, 1000, 15), ("eps", 0.035, 20, 1450, 120),
                          ("masonry", 1.0, 1800, 1000, 200), ("plaster", 0.4, 1000, 1000, 15)],
    "heavy concrete": [("concrete", 2.0, 2400, 1000, 250)],
    "timber frame": [("board", 0.13, 650, 1700, 22), ("wool", 0.035, 40, 1030, 160),
                     ("gypsum", 0.25, 900, 1000, 13)],
}


@pytest.mark.parametrize("name", sorted(WALLS))
@pytest.mark.parametrize("period_hours", [24.0])
def test_layered_wall_equals_height_times_iso13786(name, period_hours):
    layers = WALLS[name]
    height = 600.0  # mm: H = 0.6 m
    section = layered_wall([(i, lam, d) for i, lam, _, _, d in layers], height=height)
    for material, (_, _, rho, c, _) in zip(section["materials"], layers, strict=True):
        material.update(density=rho, specific_heat=c)
    result = run({"section": section,
                  "dynamics": {"periodic": {"period_hours": period_hours}}})
    periodic = result["dynamics"]["periodic"]
    assert result["dynamics"]["certificate"]["target_met"]
    # ISO side 1 = interior (Rsi 0.13), side 2 = exterior (Rse 0.04): layers from the inside.
    iso = iso13786([(lam, rho, c, d / 1000) for _, lam, rho, c, d in reversed(layers)],
                   0.13, 0.04, period_hours * 3600)
    h = height / 1000
    pairs = [(periodic["coupling"]["inside|outside"], iso["Y12"]),
             (periodic["admittance"]["inside"], iso["Y11"]),
             (periodic["admittance"]["outside"], iso["Y22"])]
    for entry, reference in pairs:
        value = as_complex(entry, period_hours)
        assert abs(value - h * reference) <= TARGET * abs(h * reference), (entry, reference)
        assert 0 <= entry["time_shift_hours"] < period_hours
    assert periodic["decrement_factor"]["inside|outside"] == pytest.approx(
        abs(iso["Y12"]) / iso["U"], rel=TARGET)
    assert periodic["heat_capacity"]["inside"] == pytest.approx(h * iso["kappa1"], rel=TARGET)
    assert periodic["heat_capacity"]["outside"] == pytest.approx(h * iso["kappa2"], rel=TARGET)


def test_long_period_tends_to_the_steady_coupling():
    # Limit T → ∞ of ISO 13786's Y12 is U (decrement factor 1, no time shift).
    layers = WALLS["heavy concrete"]
    section = layered_wall([(i, lam, d) for i, lam, _, _, d in layers], height=1000.0)
    section["materials"][0].update(density=2400, specific_heat=1000)
    result = run({"section": section, "dynamics": {"periodic": {"period_hours": 8760}}})
    periodic = result["dynamics"]["periodic"]
    assert periodic["coupling"]["inside|outside"]["modulus"] == pytest.approx(
        result["L2D"], rel=1e-3)
    assert periodic["decrement_factor"]["inside|outside"] == pytest.approx(1.0, rel=1e-3)


def test_wall_with_an_air_cavity_equals_iso13786_with_the_cavity_as_a_resistance():
    # ISO 13786 takes an air layer as a pure resistance, [[1, −R], [0, 1]] [from memory]; the
    # engine's cavity stores no heat and conducts with its λeq (reported under `cavities`).
    section = layered_wall([("brick", 0.77, 100), ("air", 1.0, 50), ("block", 0.56, 100)],
                           height=600)
    section["materials"] = [
        {"id": "brick", "conductivity": 0.77, "density": 1700, "specific_heat": 1000},
        {"id": "air", "cavity": {}},
        {"id": "block", "conductivity": 0.56, "density": 1700, "specific_heat": 1000}]
    result = run({"section": section, "dynamics": {"periodic": {"period_hours": 24}}})
    lam_eq = result["cavities"][0]["equivalent_conductivity"]
    period = 24 * 3600.0
    z = np.array([[1, -0.13], [0, 1]], complex)  # side 1: inside (block first)
    z = layer_matrix(0.56, 1700, 1000, 0.1, period) @ z
    z = np.array([[1, -0.05 / lam_eq], [0, 1]], complex) @ z
    z = layer_matrix(0.77, 1700, 1000, 0.1, period) @ z
    z = np.array([[1, -0.04], [0, 1]], complex) @ z
    periodic = result["dynamics"]["periodic"]
    for entry, reference in ((periodic["coupling"]["inside|outside"], -1 / z[0, 1]),
                             (periodic["admittance"]["inside"], -z[0, 0] / z[0, 1]),
                             (periodic["admittance"]["outside"], -z[1, 1] / z[0, 1])):
        value = as_complex(entry, 24.0)
        assert abs(value - 0.6 * reference) <= TARGET * abs(0.6 * reference), (entry, reference)
