"""Templates solved by the engine: convergence across the parameter ranges, U-values of the
flanking elements by hand, and the physics a building engineer expects of each junction."""

import math

import pytest
from hypothesis import HealthCheck, given, settings
from template_strategies import build_or_skip, parameters

from coldseam.schema import parse_request
from coldseam.templates import build, list_templates
from coldseam.templates.base import MaterialChoice
from coldseam.templates.framed_wall import effective_u_value
from coldseam.templates.ground_floor import floor_u_value
from coldseam.thermal.evaluate import evaluate
from coldseam.thermal.model import prepare
from coldseam.thermal.psi import flanking_values

#: Engine's default accuracy target: heat flow and ψ change by < 0.1 % between levels.
ENGINE_ACCURACY = 1e-3


def solve(template_id: str, params: dict | None = None) -> dict:
    return evaluate(parse_request(build(template_id, params or {}))).result


def u_wall(structure_mm: float, lam_structure: float, insulation_mm: float, lam_insulation: float,
           rsi: float = 0.13) -> float:
    """ISO 6946: U = 1 / (Rsi + Σ d/λ + Rse), Rse 0.04."""
    return 1 / (rsi + structure_mm / 1000 / lam_structure + insulation_mm / 1000 / lam_insulation
                + 0.04)


@pytest.mark.parametrize("template_id", [t.id for t in list_templates()])
def test_solves_converged_across_parameter_range(template_id):
    @settings(max_examples=3, deadline=None, derandomize=True,
              suppress_health_check=[HealthCheck.filter_too_much, HealthCheck.too_slow])
    @given(parameters(template_id))
    def check(params):
        result = evaluate(parse_request(build_or_skip(template_id, params))).result
        assert result["mesh"]["converged"], result["mesh"]
        assert result["L2D"] > 0 and math.isfinite(result["psi"]["value"])
        flows = result["heat_flows"]
        assert abs(sum(flows.values())) < 1e-6 * sum(abs(v) for v in flows.values())
        assert 0 < result["condensation"]["fRsi"] < 1

    check()


# Library values (EN 12524 / common practice): brick_protected 0.56, eps_035 0.035,
# reinforced concrete 2.3, pir_022 0.022, timber 0.13, osb 0.13, plasterboard 0.25,
# mineral wool 0.035 W/(m·K).
DEFAULT_WALL_U = u_wall(200, 0.56, 160, 0.035)


@pytest.mark.parametrize("template_id, expected", [
    ("wall_corner", {"wall_a": DEFAULT_WALL_U, "wall_b": DEFAULT_WALL_U}),
    ("floor_slab", {"wall_above": DEFAULT_WALL_U, "wall_below": DEFAULT_WALL_U}),
    ("balcony", {"wall_above": DEFAULT_WALL_U, "wall_below": DEFAULT_WALL_U}),
    ("window_reveal", {"wall": DEFAULT_WALL_U, "frame": 1 / (0.04 + 0.080 / 0.13 + 0.13)}),
    ("eaves", {"wall": DEFAULT_WALL_U,
               "roof": 1 / (0.10 + 0.200 / 2.3 + 0.200 / 0.022 + 0.04)}),
    ("framed_wall", {"bay": 1 / (0.04 + 0.012 / 0.13 + 0.145 / 0.035 + 0.0125 / 0.25 + 0.13)}),
])
def test_flanking_u_values_from_cuts_match_hand_calculation(template_id, expected):
    # ISO 6946 U = 1/(Rsi + Σ d/λ + Rse) with Rsi 0.13 horizontal, 0.10 upward, Rse 0.04.
    model = prepare(parse_request(build(template_id, {})))
    found = {f.id: f.u_value for f in flanking_values(model)}
    assert found == pytest.approx(expected, rel=1e-9)


def test_corner_psi_external_equals_internal_minus_2_u_t():
    # ISO 13789 / ISO 14683 (domain primer): same L2D, lengths differ by t on each wall.
    for position in ("outside", "inside"):
        params = {"wall_thickness": 240, "insulation_thickness": 120,
                  "insulation_position": position}
        internal = solve("wall_corner", {**params, "dimensions": "internal"})["psi"]
        external = solve("wall_corner", {**params, "dimensions": "external"})["psi"]
        u = internal["flanking"][0]["u_value"]
        assert internal["L2D"] == pytest.approx(external["L2D"], rel=1e-12)
        assert external["value"] == pytest.approx(internal["value"] - 2 * u * 0.360, abs=1e-9)


def test_corner_psi_in_iso_14683_band():
    # ISO 14683 default for an outside corner with external insulation [from memory]:
    # ψe ≈ −0.05 W/(m·K), ψi ≈ 0.15. Loose bands, a sanity check only.
    external = solve("wall_corner", {"dimensions": "external"})["psi"]["value"]
    internal = solve("wall_corner", {"dimensions": "internal"})["psi"]["value"]
    assert -0.20 <= external <= 0.02
    assert 0.0 <= internal <= 0.25


def test_more_insulation_never_raises_floor_slab_psi():
    # Physical expectation (no source needed); steps within the engine's accuracy allowed.
    for dimensions in ("internal", "external"):
        psis = [solve("floor_slab", {"insulation_thickness": t, "dimensions": dimensions})
                for t in (40, 80, 160, 300)]
        for thinner, thicker in zip(psis, psis[1:], strict=False):
            allowance = ENGINE_ACCURACY * thinner["L2D"]
            assert thicker["psi"]["value"] <= thinner["psi"]["value"] + allowance


def test_floor_slab_psi_in_iso_14683_band():
    # ISO 14683 default for an intermediate floor through an externally insulated wall
    # [from memory]: ψe ≈ 0.00 W/(m·K). Loose band.
    assert -0.05 <= solve("floor_slab", {"dimensions": "external"})["psi"]["value"] <= 0.10


def test_balcony_break_element_much_lower_psi_than_continuous():
    continuous = solve("balcony", {"connection": "continuous"})
    broken = solve("balcony", {"connection": "thermal_break"})
    assert broken["psi"]["value"] < 0.5 * continuous["psi"]["value"]
    assert broken["condensation"]["fRsi"] > continuous["condensation"]["fRsi"]


def test_balcony_psi_in_iso_14683_band():
    # ISO 14683 default for a continuous balcony slab through external insulation
    # [from memory]: ψe ≈ 0.95 W/(m·K). Break elements: 0.1–0.3 common practice. Loose bands.
    assert 0.6 <= solve("balcony", {"dimensions": "external"})["psi"]["value"] <= 1.3
    broken = solve("balcony", {"connection": "thermal_break", "break_conductivity": 0.15})
    assert 0.0 <= broken["psi"]["value"] <= 0.4


def test_reveal_insulation_lowers_psi_and_raises_frsi():
    plain = solve("window_reveal", {"frame_offset": 160})
    insulated = solve("window_reveal", {"frame_offset": 160, "reveal_insulation_thickness": 30})
    assert insulated["psi"]["value"] < plain["psi"]["value"]
    assert insulated["condensation"]["fRsi"] > plain["condensation"]["fRsi"]
    # ISO 14683 window reveal defaults span about 0 to 1 W/(m·K) [from memory].
    assert -0.05 <= plain["psi"]["value"] <= 0.6


def test_eaves_flat_and_pitched_in_iso_14683_band():
    # ISO 14683 roof–wall defaults with continuous insulation [from memory]: ψe about −0.1 to
    # 0.1 W/(m·K). Loose band.
    for pitch in (0, 35):
        result = solve("eaves", {"roof_pitch": pitch, "dimensions": "external"})
        assert -0.25 <= result["psi"]["value"] <= 0.15


def test_ground_floor_psi_band_and_perimeter_insulation_helps():
    # ISO 14683 ground-floor defaults span about −0.5 to 0.8 W/(m·K) [from memory].
    bare = solve("ground_floor", {"perimeter_insulation_thickness": 0})
    lined = solve("ground_floor", {"perimeter_insulation_thickness": 100,
                                   "perimeter_insulation_depth": 800})
    assert -0.6 <= bare["psi"]["value"] <= 0.8
    assert lined["psi"]["value"] < bare["psi"]["value"]
    assert lined["condensation"]["fRsi"] >= bare["condensation"]["fRsi"]


@pytest.mark.parametrize("width_mm", [4000, 8000])
def test_floor_u_formula_agrees_with_a_2d_ground_strip(width_mm):
    # ISO 13370 slab-on-ground formula [from memory] against the 2D solve of the strip it
    # describes: floor of width b on ground (λ 2.0), the wall a gap w, ground block 2.5·b
    # outside and below (ISO 10211 [from memory]). The formula is an approximation of this
    # 2D field; 5 % band.
    b, w = width_mm / 1000, 0.36
    r_floor = 0.17 + 0.15 / 2.3
    section = {
        "unit": "m", "materials": [{"id": "ground", "conductivity": 2.0}],
        "regions": [{"material": "ground",
                     "polygon": [[-2.5 * b, -2.5 * b], [w + b / 2, -2.5 * b], [w + b / 2, 0],
                                 [-2.5 * b, 0]]}],
        "environments": [{"id": "in", "temperature": 20, "side": "interior"},
                         {"id": "out", "temperature": 0, "side": "exterior"}],
        "boundaries": [{"environment": "out", "surface_resistance": 0.04,
                        "path": [[-2.5 * b, 0], [0, 0]]},
                       {"environment": "in", "surface_resistance": r_floor,
                        "path": [[w, 0], [w + b / 2, 0]]}],
    }
    strip_u = evaluate(parse_request({"section": section})).result["L2D"] / (b / 2)
    p = {"ground_material": MaterialChoice(2.0), "slab_thickness": 150,
         "slab_material": MaterialChoice(2.3), "floor_insulation_thickness": 0,
         "floor_insulation_material": MaterialChoice(0.035)}
    assert floor_u_value(p, width_mm, 360) == pytest.approx(strip_u, rel=0.05)


def test_framed_wall_u_between_iso_6946_bounds():
    # ISO 6946 combined method [from memory]: the true U lies between the parallel-path value
    # (upper limit of R) and the isothermal-planes value (lower limit of R).
    spacing, width = 600, 45
    stud = width / spacing
    result = solve("framed_wall", {"stud_spacing": spacing, "stud_width": width})
    u = effective_u_value(result["L2D"], spacing)
    surfaces_and_boards = 0.04 + 0.012 / 0.13 + 0.0125 / 0.25 + 0.13
    r_bay = surfaces_and_boards + 0.145 / 0.035
    r_stud = surfaces_and_boards + 0.145 / 0.13
    u_parallel = (1 - stud) / r_bay + stud / r_stud
    lam_layer = (1 - stud) * 0.035 + stud * 0.13
    u_isothermal = 1 / (surfaces_and_boards + 0.145 / lam_layer)
    assert u_parallel < u < u_isothermal
    assert result["psi"]["value"] == pytest.approx(result["L2D"] - result["psi"]["sum_UL"])
    assert result["psi"]["value"] > 0
