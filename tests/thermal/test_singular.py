"""Which known surface temperatures make a figure meaningless (coldseam.thermal.singular):
found from the geometry alone, before any mesh."""

from sections import layered_wall

from coldseam.schema import parse_request
from coldseam.thermal.model import prepare
from coldseam.thermal.singular import assess


def square(outside_rs: float, inside_rs: float, inside_env: str = "inside") -> dict:
    """A 1 m square: outside along the left and bottom edges, ``inside_env`` along the top;
    the two paths meet at the corner (0, 1000) mm; the right edge is adiabatic."""
    return {"section": {
        "unit": "mm", "materials": [{"id": "m", "conductivity": 1.0}],
        "regions": [{"material": "m", "polygon": [[0, 0], [1000, 0], [1000, 1000], [0, 1000]]}],
        "environments": [{"id": "inside", "temperature": 20, "side": "interior"},
                         {"id": "outside", "temperature": 0, "side": "exterior"}],
        "boundaries": [
            {"environment": "outside", "surface_resistance": outside_rs,
             "path": [[1000, 0], [0, 0], [0, 1000]]},
            {"environment": inside_env, "surface_resistance": inside_rs,
             "path": [[0, 1000], [1000, 1000]]}]}}


def meaning(request: dict):
    return assess(prepare(parse_request(request)))


def test_two_known_temperatures_meeting_make_the_heat_flow_singular_at_their_corner():
    found = meaning(square(0.0, 0.0))
    assert [c.at for c in found.heat_flow] == [(0.0, 1.0)]
    assert found.heat_flow[0].environments == ("inside", "outside")
    assert found.heat_flow[0].text == "(0.0, 1000.0) mm"
    assert found.frsi and found.design_minimum


def test_a_known_exterior_temperature_beside_a_resisted_interior_surface_leaves_the_flow_bounded():
    found = meaning(square(0.0, 0.13))
    assert not found.singular
    assert [c.at for c in found.frsi] == [(0.0, 1.0)]  # the interior surface touches 0 °C


def test_surface_resistances_on_both_sides_leave_everything_meaningful():
    found = meaning(square(0.04, 0.13))
    assert not found.singular and not found.frsi and not found.design_minimum


def test_opposite_known_temperatures_that_never_meet_are_regular():
    section = layered_wall([("eps", 0.035, 100.0), ("concrete", 2.3, 200.0)], rsi=0.0, rse=0.0)
    found = meaning({"section": section})
    assert not found.singular and not found.frsi


def test_a_singular_section_without_probes_says_what_to_add():
    from sections import run

    result = run({**square(0.0, 0.0), "options": {"max_levels": 3}})
    assert result["mesh"]["certified_on"] == "temperatures" and not result["mesh"]["target_met"]
    assert any("add probes" in w for w in result["warnings"])
