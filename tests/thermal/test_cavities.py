"""Air cavities: λeq per cavity (ISO 10077-2 rules, recalled from memory) and its use.

The formula checks write the standard's formula again here, independently of
coldseam.thermal.cavity_formula; every constant of it is recalled from memory of ISO 10077-2
(not confirmed against the text), as marked.
"""

import copy
import math

import pytest
from sections import cavity_frame, layered_wall, run

from coldseam.errors import InvalidSection
from coldseam.schema import parse_request
from coldseam.thermal.cavity_formula import equivalent_conductivity

SIGMA = 5.670374419e-8  # W/(m²K⁴), CODATA 2018


def lambda_eq_independent(d, b, direction, eps=(0.9, 0.9), dt=10.0, tm=10.0):
    """ISO 10077-2 unventilated cavity, as recalled from memory:
    ha = C1/d (downward; or horizontal with b < 5 mm), else max(C1/d, C·ΔT^(1/3)) with
    C = 0.73 horizontal, upward 0.73 (b/d ≤ 1) .. 1.14 (b/d ≥ 5), linear between [from memory];
    hr = 4σTm³ / (1/ε1 + 1/ε2 − 2 + 2/(1 + √(1 + d²/b²) − d/b)) [from memory]."""
    c1 = 0.025  # W/(m·K) [from memory]
    if direction == "downward" or (direction == "horizontal" and b < 0.005):
        ha = c1 / d
    else:
        if direction == "horizontal":
            c = 0.73  # [from memory]
        else:
            r = b / d
            c = 0.73 if r <= 1 else 1.14 if r >= 5 else 0.73 + 0.41 * (r - 1) / 4  # [from memory]
        ha = max(c1 / d, c * dt ** (1 / 3))
    t = tm + 273.15
    hr = 4 * SIGMA * t ** 3 / (1 / eps[0] + 1 / eps[1] - 2
                               + 2 / (1 + math.sqrt(1 + (d / b) ** 2) - d / b))
    return d * (ha + hr)


@pytest.mark.parametrize("d, b", [(0.004, 0.003), (0.006, 0.004), (0.016, 0.016), (0.01, 0.04),
                                  (0.03, 0.008), (0.05, 0.5), (0.003, 0.2)])
@pytest.mark.parametrize("direction", ["horizontal", "upward", "downward"])
@pytest.mark.parametrize("eps", [(0.9, 0.9), (0.9, 0.1)])
def test_formula_matches_independent_writing(d, b, direction, eps):
    got = equivalent_conductivity(d, b, direction, *eps, 10.0, 10.0).conductivity
    assert got == pytest.approx(lambda_eq_independent(d, b, direction, eps), rel=1e-12)


def test_hand_calculation_one_square_cavity():
    """16 × 16 mm, horizontal flow, ε = 0.9, ΔT = 10 K, Tm = 10 °C, by hand:
    ha = max(0.025/0.016 = 1.5625, 0.73·10^(1/3) = 1.57274) = 1.57274 W/(m²K);
    4σT³ = 4 · 5.6704e-8 · 283.15³ = 5.14898; F = ½(1 + √2 − 1) = 0.707107;
    hr = 5.14898 / (2/0.9 − 2 + 1/0.707107 = 1.636436) = 3.14646 W/(m²K);
    λeq = 0.016 · (1.57274 + 3.14646) = 0.075507 W/(m·K)."""
    result = run(cavity_frame(1, 1))
    (entry,) = result["cavities"]
    assert entry["thickness"] == pytest.approx(0.016, rel=1e-9)
    assert entry["width"] == pytest.approx(0.016, rel=1e-9)
    assert entry["heat_flow_direction"] == "horizontal"
    assert entry["convection"] == pytest.approx(1.57274, abs=1e-5)
    assert entry["radiation"] == pytest.approx(3.14646, abs=1e-5)
    assert entry["equivalent_conductivity"] == pytest.approx(0.075507, abs=1e-6)


def test_cavity_equals_solid_of_reported_lambda():
    """Invariance: the section with cavities = the same section with solids of the reported
    λeq (one material per cavity), to 1e-6."""
    frame = cavity_frame(3, 2, cavity={"emissivity": [0.9, 0.3]})
    frame["regions"][2]["polygon"] = [[4, 24], [20, 24], [20, 32], [4, 32]]  # a flat one
    with_cavities = run(frame)
    solid = copy.deepcopy(frame)
    solid["materials"] = solid["materials"][:1]
    for k, entry in enumerate(with_cavities["cavities"]):
        solid["materials"].append({"id": f"c{k}", "conductivity": entry["equivalent_conductivity"]})
        solid["regions"][entry["region"]]["material"] = f"c{k}"
    assert len({round(c["equivalent_conductivity"], 9) for c in with_cavities["cavities"]}) == 2
    with_solids = run(solid)
    assert with_cavities["L2D"] == pytest.approx(with_solids["L2D"], rel=1e-6)
    assert with_cavities["surfaces"]["inside"]["min_temperature"] == pytest.approx(
        with_solids["surfaces"]["inside"]["min_temperature"], abs=1e-6)


# ISO 6946:2007 Table 2, unventilated air layers, ε ≥ 0.8, R in m²K/W [recalled from memory;
# table conditions ΔT ≤ 5 K, Tm = 10 °C, layer width and length ≫ thickness, from memory].
ISO6946_TABLE = {"upward": {5: 0.11, 7: 0.13, 10: 0.15, 15: 0.16, 25: 0.16, 50: 0.16,
                            100: 0.16, 300: 0.16},
                 "horizontal": {5: 0.11, 7: 0.13, 10: 0.15, 15: 0.17, 25: 0.18, 50: 0.18,
                                100: 0.18, 300: 0.18},
                 "downward": {5: 0.11, 7: 0.13, 10: 0.15, 15: 0.17, 25: 0.19, 50: 0.21,
                              100: 0.22, 300: 0.23}}


@pytest.mark.parametrize("direction, mm", [(direction, mm) for direction, rows in
                                           ISO6946_TABLE.items() for mm in rows])
def test_air_layer_against_iso6946_table(direction, mm):
    """R = d/λeq of a wide layer (b = 100 d) at ΔT = 5 K against the table, to its rounding
    (±0.005 m²K/W)."""
    d = mm / 1000
    lam = equivalent_conductivity(d, 100 * d, direction, 0.9, 0.9, 5.0, 10.0).conductivity
    assert d / lam == pytest.approx(ISO6946_TABLE[direction][mm], abs=0.005)


def test_25mm_air_layer_in_a_wall():
    """A brick / 25 mm air layer / block wall: U from the evaluation against
    1/(Rsi + Σ d/λ + Rg + Rse) with Rg = 0.18 m²K/W (ISO 6946 Table 2, 25 mm, horizontal
    [recalled from memory]); the table's rounding (±0.005) carried into U."""
    wall = layered_wall([("brick", 0.77, 102.5), ("air", 1.0, 25.0), ("block", 0.19, 100.0)])
    wall["materials"][1] = {"id": "air", "cavity": {"temperature_difference": 5}}
    result = run(wall)
    (entry,) = result["cavities"]
    assert entry["thickness"] == pytest.approx(0.025) and entry["width"] == pytest.approx(1.0)
    rest = 0.13 + 0.04 + 0.1025 / 0.77 + 0.1 / 0.19
    assert 1 / (rest + 0.185) <= result["L2D"] <= 1 / (rest + 0.175)
    assert result["L2D"] == pytest.approx(1 / (rest + 0.025 / entry["equivalent_conductivity"]),
                                          rel=1e-9)


def test_direction_from_environments():
    """Layers stacked along y with the warm side above: heat flows down; below: up."""
    for theta_i, expected in ((20.0, "upward"), (-20.0, "downward")):
        wall = layered_wall([("screed", 1.0, 50.0), ("air", 1.0, 20.0), ("slab", 2.0, 150.0)],
                            vertical=True, theta_i=theta_i, theta_e=0.0)
        wall["materials"][1] = {"id": "air", "cavity": {}}
        # exterior at y = 0, interior at the top: warm above means heat flows down
        (entry,) = run(wall)["cavities"]
        assert entry["heat_flow_direction"] == {"upward": "downward",
                                                "downward": "upward"}[expected]
        assert entry["thickness"] == pytest.approx(0.02)


def test_slightly_ventilated_doubles():
    plain = run(cavity_frame(1, 1))["cavities"][0]["equivalent_conductivity"]
    slit = run(cavity_frame(1, 1, cavity={"ventilation": "slightly_ventilated"}))
    assert slit["cavities"][0]["equivalent_conductivity"] == pytest.approx(2 * plain, rel=1e-12)


def test_touching_cavity_regions_join():
    """Two cavity regions sharing a 16 mm edge are one cavity: the λeq of the whole."""
    one = run(cavity_frame(1, 1, pitch=36.0))["cavities"]  # a 32 × 32 mm cavity
    two = cavity_frame(1, 1, pitch=36.0)
    two["regions"][1]["polygon"] = [[4, 4], [36, 4], [36, 20], [4, 20]]
    two["regions"].append({"material": "air", "polygon": [[4, 20], [36, 20], [36, 36], [4, 36]]})
    joined = run(two)["cavities"]
    assert len(joined) == 1 and joined[0]["regions"] == [1, 2]
    assert joined[0]["equivalent_conductivity"] == pytest.approx(
        one[0]["equivalent_conductivity"], rel=1e-9)


@pytest.mark.parametrize("neck, parts", [(1.5, 2), (3.0, 1)])
def test_narrowing_splits_below_2mm(neck, parts):
    """Two 16 × 16 mm chambers joined by a 4 mm long passage `neck` mm wide: separate
    cavities at ≤ 2 mm (ISO 10077-2 slit rule [from memory]), one cavity above."""
    frame = cavity_frame(1, 1, pitch=40.0)
    y0, y1 = 22 - neck / 2, 22 + neck / 2
    frame["regions"][1]["polygon"] = [[4, 14], [20, 14], [20, y0], [24, y0], [24, 14], [40, 14],
                                      [40, 30], [24, 30], [24, y1], [20, y1], [20, 30], [4, 30]]
    frame["regions"][0]["polygon"] = [[0, 0], [44, 0], [44, 44], [0, 44]]
    frame["boundaries"][0]["path"] = [[0, 0], [0, 44]]
    frame["boundaries"][1]["path"] = [[44, 0], [44, 44]]
    cavities = run(frame)["cavities"]
    assert len(cavities) == parts
    if parts == 2:
        assert sum(c["area"] for c in cavities) == pytest.approx(
            (2 * 16 * 16 + 4 * neck) * 1e-6, rel=1e-9)
        assert all(c["thickness"] < 0.02 for c in cavities)


def test_well_ventilated_is_open_air():
    """A 20 mm groove open to the outside, 'well_ventilated': the same as the groove left
    empty with its surfaces on the exterior boundary path."""
    wall = layered_wall([("render", 1.0, 40.0), ("block", 0.2, 160.0)])
    groove = [[0, 400], [30, 400], [30, 420], [0, 420]]
    vented = copy.deepcopy(wall)
    vented["materials"].append({"id": "air", "cavity": {"ventilation": "well_ventilated"}})
    vented["regions"].append({"material": "air", "polygon": groove})
    by_hand = copy.deepcopy(wall)
    by_hand["regions"][0]["holes"] = [[[0.0, 400.0], [30, 400], [30, 420], [0.0, 420]]]
    by_hand["regions"][0]["polygon"] = [[0, 0], [40, 0], [40, 1000], [0, 1000], [0, 420],
                                        [30, 420], [30, 400], [0, 400]]
    by_hand["regions"][0].pop("holes")
    by_hand["boundaries"][0]["path"] = [[0, 0], [0, 400], [30, 400], [30, 420], [0, 420],
                                        [0, 1000]]
    got, expected = run(vented), run(by_hand)
    assert got["cavities"][0]["exposed_to"] == "outside"
    assert got["L2D"] == pytest.approx(expected["L2D"], rel=1e-6)  # meshes differ a little


def _invalid(section) -> InvalidSection:
    with pytest.raises(InvalidSection) as info:
        run(section)
    return info.value


def test_cavity_open_to_an_environment_is_refused():
    wall = layered_wall([("air", 1.0, 25.0), ("block", 0.2, 100.0)])
    wall["materials"][0] = {"id": "air", "cavity": {}}
    error = _invalid(wall)
    assert error.field == "/section/regions/0" and "closed by solids" in error.message


def test_cavity_with_no_solid_around_it():
    """Cavity 'air' touches only another cavity material and the adiabatic outline."""
    wall = layered_wall([("block", 0.2, 50.0)], height=150.0)
    wall["materials"] += [{"id": "air", "cavity": {}}, {"id": "air2", "cavity": {}}]
    wall["regions"] += [{"material": "air2", "polygon": [[0, 150], [50, 150], [50, 200],
                                                        [0, 200]]},
                        {"material": "air", "polygon": [[0, 200], [50, 200], [50, 250],
                                                       [0, 250]]}]
    error = _invalid(wall)
    assert error.field == "/section/regions/2" and "no solid around it" in error.message


def test_section_of_cavity_only():
    wall = layered_wall([("air", 1.0, 25.0)])
    wall["materials"][0] = {"id": "air", "cavity": {}}
    error = _invalid(wall)
    assert error.field == "/section/regions/0" and "closed by solids" in error.message


def test_zero_width_cavity_is_refused():
    frame = cavity_frame(1, 1)
    frame["regions"][1]["polygon"] = [[4, 4], [4, 10], [4, 20]]
    error = _invalid(frame)
    assert error.field == "/section/regions/1/polygon" and "zero width" in error.message


@pytest.mark.parametrize("emissivity, field", [
    (0.0, "/section/materials/1/cavity/emissivity"),
    (1.2, "/section/materials/1/cavity/emissivity"),
    ([0.9, -0.1], "/section/materials/1/cavity/emissivity"),
])
def test_emissivity_outside_range(emissivity, field):
    frame = cavity_frame(1, 1, cavity={"emissivity": emissivity})
    error = _invalid(frame)
    assert error.field == field and "(0, 1]" in error.message


def test_cavity_and_conductivity_exclusive():
    frame = cavity_frame(1, 1)
    frame["materials"][1]["conductivity"] = 0.1
    with pytest.raises(InvalidSection) as info:
        parse_request(frame)
    assert info.value.field == "/section/materials/1" and "cavity" in info.value.message


def test_result_fields_follow_the_contract():
    result = run(cavity_frame(2, 1))
    assert [c["region"] for c in result["cavities"]] == [1, 2]
    for entry in result["cavities"]:
        assert {"material", "region", "width", "thickness", "heat_flow_direction",
                "equivalent_conductivity", "convection", "radiation"} <= entry.keys()
    air = next(m for m in result["materials"] if m["id"] == "air")
    assert air["conductivity"] is None and air["cavity"] is True


def test_frame_u_value_from_calibration_panel():
    """psi.frame: U_f = (L2D − U_p·b_p)/b_f (ISO 10077-2 calibration-panel method), widths
    given in the section unit, on the worked example of examples/window-frame-uf."""
    import json
    from pathlib import Path

    example = Path(__file__).resolve().parents[2] / "examples" / "window-frame-uf"
    request = json.loads((example / "request.json").read_text())
    result = run(request)
    frame = result["psi"]["frame"]
    u_p = 1 / (0.04 + 0.024 / 0.035 + 0.13)  # ISO 6946: U = 1/(Rse + d/λ + Rsi)
    assert frame["panel"]["u_value"] == pytest.approx(u_p, abs=1e-6)
    assert frame["u_frame"] == pytest.approx((result["L2D"] - u_p * 0.190) / 0.110, rel=1e-5)
    assert len(result["cavities"]) == 10


def test_irregular_cavity_takes_the_equivalent_rectangle():
    """An L-shaped cavity: the rectangle of its area with its bounding box's aspect ratio
    (ISO 10077-2 [recalled from memory]): d = √(A·d0/b0), b = √(A·b0/d0)."""
    frame = cavity_frame(1, 1, pitch=40.0)  # block 44 × 44 mm
    frame["regions"][1]["polygon"] = [[4, 4], [40, 4], [40, 14], [14, 14], [14, 40], [4, 40]]
    (entry,) = run(frame)["cavities"]
    area, d0, b0 = (36 * 10 + 10 * 26) * 1e-6, 0.036, 0.036
    assert entry["area"] == pytest.approx(area, rel=1e-9)
    assert entry["thickness"] == pytest.approx(math.sqrt(area * d0 / b0), rel=1e-9)
    assert entry["width"] == pytest.approx(math.sqrt(area * b0 / d0), rel=1e-9)
    assert entry["equivalent_conductivity"] == pytest.approx(lambda_eq_independent(
        entry["thickness"], entry["width"], "horizontal"), rel=1e-12)


def test_given_heat_flow_direction_wins():
    """A plan section (a jamb) drawn with the exterior below: d stays along the flow (y), the
    direction given as horizontal."""
    wall = layered_wall([("brick", 0.77, 100.0), ("air", 1.0, 30.0), ("block", 0.2, 100.0)],
                        vertical=True)
    wall["materials"][1] = {"id": "air", "cavity": {"heat_flow_direction": "horizontal"}}
    (entry,) = run(wall)["cavities"]
    assert entry["heat_flow_direction"] == "horizontal"
    assert entry["thickness"] == pytest.approx(0.03) and entry["width"] == pytest.approx(1.0)


def test_webs_short_of_the_walls_leave_separate_chambers():
    """A 56 mm chamber with five webs drawn inside it, each 1 mm short of the top and bottom:
    six chambers joined only through 1 mm slits, so six cavities (ISO 10077-2 slit rule
    [from memory]); their areas add up to the air drawn."""
    frame = cavity_frame(1, 1, pitch=60.0)
    frame["regions"][1]["polygon"] = [[4, 4], [60, 4], [60, 60], [4, 60]]
    for k in range(5):
        x = 10 + k * 10
        frame["regions"].append({"material": "pvc",
                                 "polygon": [[x, 5], [x + 2, 5], [x + 2, 59], [x, 59]]})
    cavities = run(frame)["cavities"]
    assert len(cavities) == 6 and {c["region"] for c in cavities} == {1}
    assert sum(c["area"] for c in cavities) == pytest.approx((56 * 56 - 5 * 2 * 54) * 1e-6,
                                                             rel=1e-9)
