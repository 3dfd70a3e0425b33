"""Dynamic requests on the junction templates: every template whose materials all carry a
density and a specific heat evaluates a periodic request with its certificate met."""

import pytest

from coldseam.errors import InvalidSection
from coldseam.schema import parse_request
from coldseam.templates import build, list_templates
from coldseam.thermal.evaluate import evaluate

#: Templates with an equivalent-conductivity block of glazing or gas, for which one ρc has no
#: meaning yet: a dynamic request on them answers 422 naming the material.
WITHOUT_CAPACITY = {"window_installation": "glazing", "glazing_edge": "gas"}


def periodic(template_id: str) -> dict:
    request = {**build(template_id), "dynamics": {"periodic": {}, "time_constants": {}}}
    return evaluate(parse_request(request)).result


@pytest.mark.parametrize("template_id", [t.id for t in list_templates()
                                         if t.id not in WITHOUT_CAPACITY])
def test_periodic_request_evaluates_on_template(template_id):
    result = periodic(template_id)
    dynamics = result["dynamics"]
    assert dynamics["certificate"]["target_met"]
    assert dynamics["certificate"]["relative_change"] < 5e-3
    coupling = dynamics["periodic"]["coupling"]
    assert coupling and all(0 < value["modulus"] for value in coupling.values())
    for key, value in dynamics["periodic"]["decrement_factor"].items():
        assert 0 < value <= 1, key
    assert dynamics["time_constants_hours"][0] > 0


def test_window_reveal_frame_carries_a_capacity():
    frame = next(m for m in build("window_reveal")["section"]["materials"] if m["id"] == "frame")
    assert frame["density"] == 500 and frame["specific_heat"] == 1600  # timber_500's row


@pytest.mark.parametrize("template_id, material", sorted(WITHOUT_CAPACITY.items()))
def test_templates_without_capacity_name_the_material(template_id, material):
    with pytest.raises(InvalidSection, match=f"'{material}'"):
        periodic(template_id)
