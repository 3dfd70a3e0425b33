"""Template registry: declarations, defaults and the messages for bad parameters."""

import json

import pytest

from coldseam.errors import InvalidSection
from coldseam.schema import parse_request
from coldseam.templates import build, get_template, list_templates

TEMPLATE_IDS = [t.id for t in list_templates()]


def test_nine_templates_with_unique_ids():
    assert TEMPLATE_IDS == ["wall_corner", "floor_slab", "balcony", "window_reveal", "eaves",
                            "ground_floor", "framed_wall", "window_installation",
                            "glazing_edge"]


@pytest.mark.parametrize("template_id", TEMPLATE_IDS)
def test_declarations_are_complete_and_defaults_in_range(template_id):
    info = get_template(template_id)
    assert info.title and info.description
    names = [p.name for p in info.parameters]
    assert len(names) == len(set(names))
    for p in info.parameters:
        assert p.kind in {"number", "integer", "material", "choice"} and p.description
        if p.kind in ("number", "integer"):
            assert p.min <= p.default <= p.max, p.name
        if p.kind == "choice":
            assert p.default in p.options and "options" in p.as_dict()
    json.dumps(info.as_dict())


@pytest.mark.parametrize("template_id", TEMPLATE_IDS)
def test_defaults_build_a_valid_request(template_id):
    data = build(template_id, {})
    request = parse_request(data)
    assert request.section.unit == "mm"
    assert request.psi is not None and request.psi.flanking
    assert request.condensation is not None
    assert data == build(template_id, None)


def test_unknown_template_names_field_and_close_ids():
    with pytest.raises(InvalidSection) as info:
        build("balcon", {})
    assert info.value.field == "/template" and "balcony" in info.value.message


def test_unknown_parameter():
    with pytest.raises(InvalidSection) as info:
        build("wall_corner", {"insulation_thicknes": 100})
    assert info.value.field == "/parameters/insulation_thicknes"
    assert "insulation_thickness" in info.value.message


@pytest.mark.parametrize("value", [10_000, -5, 5])
def test_number_out_of_range_says_the_range(value):
    with pytest.raises(InvalidSection) as info:
        build("wall_corner", {"insulation_thickness": value})
    assert info.value.field == "/parameters/insulation_thickness"
    assert "between 10 and 400 mm" in info.value.message


@pytest.mark.parametrize("value", ["thick", True, None, float("nan"), [100]])
def test_number_of_wrong_type(value):
    with pytest.raises(InvalidSection) as info:
        build("floor_slab", {"slab_thickness": value})
    assert info.value.field == "/parameters/slab_thickness"
    assert "must be a number in mm" in info.value.message


def test_bad_choice_lists_options():
    with pytest.raises(InvalidSection) as info:
        build("wall_corner", {"dimensions": "overall"})
    assert info.value.field == "/parameters/dimensions"
    assert "internal" in info.value.message and "external" in info.value.message


def test_material_by_library_id_or_conductivity():
    by_id = build("wall_corner", {"insulation_material": "pir_022"})["section"]["materials"]
    by_lambda = build("wall_corner", {"insulation_material": 0.03})["section"]["materials"]
    assert {"id": "insulation", "library": "pir_022"}.items() <= by_id[1].items()
    assert by_lambda[1] == {"id": "insulation", "conductivity": 0.03}


def test_unknown_material_id_suggests_close_ones():
    with pytest.raises(InvalidSection) as info:
        build("wall_corner", {"insulation_material": "eps_36"})
    assert info.value.field == "/parameters/insulation_material"
    assert "eps_035" in info.value.message or "eps_032" in info.value.message


def test_material_conductivity_out_of_range():
    with pytest.raises(InvalidSection) as info:
        build("wall_corner", {"wall_material": 0.0})
    assert info.value.field == "/parameters/wall_material"


@pytest.mark.parametrize("template_id, params, field, words", [
    ("balcony", {"connection": "thermal_break", "break_thickness": 120,
                 "insulation_thickness": 100}, "break_thickness", "insulation"),
    ("window_reveal", {"frame_offset": 300, "frame_depth": 100, "wall_thickness": 200,
                       "insulation_thickness": 150}, "frame_offset", "wall thickness"),
    ("window_reveal", {"frame_offset": 0, "reveal_insulation_thickness": 30},
     "reveal_insulation_thickness", "set back"),
    ("window_reveal", {"frame_width": 60, "reveal_insulation_thickness": 60},
     "reveal_insulation_thickness", "frame width"),
    ("ground_floor", {"floor_level": 0, "slab_thickness": 300, "floor_insulation_thickness": 300,
                      "foundation_depth": 500}, "foundation_depth", "foundation"),
    ("ground_floor", {"perimeter_insulation_depth": 1200, "foundation_depth": 800},
     "perimeter_insulation_depth", "foundation"),
    ("window_installation", {"frame_offset": 0.3}, "frame_offset", "joint of the wall"),
    ("window_installation", {"frame_offset": 90.5, "frame_depth": 70,
                             "insulation_thickness": 160}, "frame_offset", "joint of the wall"),
])
def test_cross_parameter_checks(template_id, params, field, words):
    with pytest.raises(InvalidSection) as info:
        build(template_id, params)
    assert info.value.field == f"/parameters/{field}"
    assert words in info.value.message


def test_continuous_balcony_ignores_break_thickness():
    data = build("balcony", {"connection": "continuous", "break_thickness": 200,
                             "insulation_thickness": 100})
    assert "break_element" not in {m["id"] for m in data["section"]["materials"]}


def test_corner_lengths_differ_by_wall_thickness_between_dimension_systems():
    params = {"wall_thickness": 250, "insulation_thickness": 150}
    internal = build("wall_corner", {**params, "dimensions": "internal"})["psi"]
    external = build("wall_corner", {**params, "dimensions": "external"})["psi"]
    for a, b in zip(internal["flanking"], external["flanking"], strict=True):
        assert b["length"] - a["length"] == pytest.approx(400)
    assert (internal["dimensions"], external["dimensions"]) == ("internal", "external")


def test_cut_off_planes_at_three_wall_thicknesses_for_thick_walls():
    # ISO 10211 [from memory]: cut-off at least max(1 m, 3 × thickness) from the junction.
    data = build("floor_slab", {"wall_thickness": 400, "insulation_thickness": 400})
    ys = [y for region in data["section"]["regions"] for _, y in region["polygon"]]
    assert min(ys) == pytest.approx(-2400) and max(ys) == pytest.approx(200 + 2400)


def test_count_choice_takes_a_whole_number():
    """A count option ("5" chambers) may come as the number 5 (a CSV cell, a JSON number)."""
    assert build("glazing_edge", {"chambers": 5}) == build("glazing_edge", {"chambers": "5"})
    with pytest.raises(InvalidSection) as info:
        build("glazing_edge", {"chambers": 6})
    assert info.value.field == "/parameters/chambers"
