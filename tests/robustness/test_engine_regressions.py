"""Inputs that once broke the engine, found by the generated-section tests, kept as they were."""

from __future__ import annotations

import time

import pytest
from robust_support import request_of, solve_or_refuse, two_sided, wall_request

from coldseam.errors import InvalidSection
from coldseam.schema import parse_request
from coldseam.thermal.evaluate import evaluate

MATERIALS = [{"id": "a", "conductivity": 1.0}, {"id": "b", "conductivity": 0.04}]


def _corner_off_an_edge(eps: float) -> dict:
    """Region b has a point eps mm to the right of region a's edge x = 100."""
    return two_sided([
        {"material": "a", "polygon": [[0, 0], [100, 0], [100, 1000], [0, 1000]]},
        {"material": "b", "polygon": [[100, 0], [200, 0], [200, 1000], [100 + eps, 500]]},
    ], MATERIALS, 0, 200, 0, 1000)


def _point_beside_a_corner(eps: float) -> dict:
    """A repeated point eps mm short of a corner, on the same edge."""
    return two_sided([{"material": "a", "polygon": [[0, 0], [100 - eps, 0], [100, 0],
                                                    [100, 1000], [0, 1000]]}],
                     MATERIALS[:1], 0, 100, 0, 1000)


def _corner_slid_along_an_edge(eps: float) -> dict:
    """Two boards sharing the edge x = 100; b's lower corner sits eps mm up that edge."""
    return two_sided([
        {"material": "a", "polygon": [[0, 0], [100, 0], [100, 1000], [0, 1000]]},
        {"material": "b", "polygon": [[100, eps], [200, 0], [200, 1000], [100, 1000]]},
    ], MATERIALS, 0, 200, 0, 1000)


NEAR_MISSES = [_corner_off_an_edge, _point_beside_a_corner, _corner_slid_along_an_edge]


@pytest.mark.parametrize("build", NEAR_MISSES)
@pytest.mark.parametrize("eps", [1e-3, 1e-5])
def test_near_missing_outlines_are_refused_at_once(build, eps):
    # Found by the generated sections: a point 1e-5 mm off a neighbour's edge in a 1 m
    # section made the mesh sizes follow the gap: 4.4 million boundary nodes at 1e-5 mm,
    # 44 million (and the out-of-memory killer) at 1e-6 mm.
    started = time.monotonic()
    with pytest.raises(InvalidSection) as refused:
        evaluate(parse_request(request_of(build(eps))))
    assert time.monotonic() - started < 5
    assert "from an edge it does not meet" in refused.value.message
    assert f"{eps:.3g} mm" in refused.value.message
    assert refused.value.field.startswith("/section/regions/")


@pytest.mark.parametrize(("build", "clear"), zip(NEAR_MISSES, [-5.0, 5.0, 5.0], strict=True))
def test_the_same_outlines_drawn_exactly_or_clearly_apart_solve(build, clear):
    # (b's point 5 mm to the left lies clearly inside a: b is drawn over a there.)
    assert solve_or_refuse(request_of(build(0.0))) == "solved"
    assert solve_or_refuse(request_of(build(clear))) == "solved"


def test_parts_that_couple_no_environments_are_refused():
    # Found by the generated sections: two boards apart, one exposed only outside and one
    # only inside. Nothing can flow, and the result carried an energy-balance warning "off by
    # 2.0" computed from rounding noise over a zero heat flow.
    section = two_sided([
        {"material": "a", "polygon": [[0, 0], [100, 0], [100, 400], [0, 400]]},
        {"material": "b", "polygon": [[150, 500], [200, 500], [200, 1000], [150, 1000]]},
    ], MATERIALS, 0, 200, 0, 1000)
    with pytest.raises(InvalidSection) as refused:
        evaluate(parse_request(request_of(section)))
    assert refused.value.field == "/section/environments/0"
    assert "no heat can flow" in refused.value.message


def test_an_isolated_piece_beside_a_coupled_part_still_solves():
    # The part that joins the environments carries the heat; a loose piece exposed outside
    # only sits at the outside temperature and changes nothing (ISO 6946 U of the wall).
    section = two_sided([
        {"material": "a", "polygon": [[0, 0], [100, 0], [100, 1000], [0, 1000]]},
    ], MATERIALS, 0, 100, 0, 1000)
    section["regions"].append({"material": "b", "polygon": [[-50, 1100], [0, 1100],
                                                            [0, 1200], [-50, 1200]]})
    section["boundaries"][0]["path"] = [[0, 0], [0, 1200]]
    result = evaluate(parse_request(request_of(section))).result
    u_value = 1 / (0.04 + 0.1 / 1.0 + 0.13)
    assert result["L2D"] == pytest.approx(u_value, rel=1e-6)


def test_a_single_environment_is_refused():
    # Found by the generated sections: with one environment nothing flows, and the result
    # carried the same false energy-balance warning.
    section = two_sided([{"material": "a", "polygon": [[0, 0], [100, 0], [100, 1000],
                                                       [0, 1000]]}], MATERIALS, 0, 100, 0, 1000)
    section["environments"] = section["environments"][:1]
    section["boundaries"] = section["boundaries"][1:]
    with pytest.raises(InvalidSection) as refused:
        evaluate(parse_request(request_of(section)))
    assert refused.value.field == "/section/environments"
    assert "only one environment" in refused.value.message


def _shifted(request: dict, offset: float) -> dict:
    """The request with every coordinate moved by (offset, offset)."""
    def move(points):
        return [[x + offset, y + offset] for x, y in points]

    section = request["section"]
    for region in section["regions"]:
        region["polygon"] = move(region["polygon"])
    for boundary in section["boundaries"]:
        boundary["path"] = move(boundary["path"])
    for probe in section.get("probes", []):
        probe["point"] = move([probe["point"]])[0]
    for flanking in (request.get("psi") or {}).get("flanking", []):
        if flanking.get("cut"):
            flanking["cut"] = move(flanking["cut"])
    return request


def test_a_section_far_from_the_origin_is_refused_at_once():
    # Found by the generated sections: sections of 5 to 12 mm drawn about 2e10 mm from the
    # origin (float coordinates there step by about 4e-6 mm): GEOS raised "TopologyException:
    # Ring edge missing", or gmsh ground for 17 s per mesh on points it could not tell apart.
    # Coordinates over 1e9 are refused by the schema now; here the example wall, 1 m across,
    # 5e8 mm out.
    started = time.monotonic()
    with pytest.raises(InvalidSection) as refused:
        evaluate(parse_request(_shifted(wall_request(), 5e8)))
    assert time.monotonic() - started < 5
    assert refused.value.field == "/section/regions"
    assert "from the origin" in refused.value.message and "Move the drawing" in refused.value.message


def test_a_section_a_hundred_metres_out_gives_the_same_result():
    # ISO 6946: U = 1 / (Rse + Σ d/λ + Rsi) of the example wall, over its 1 m height.
    u_value = 1 / (0.04 + 0.100 / 0.035 + 0.200 / 1.0 + 0.13)
    result = evaluate(parse_request(_shifted(wall_request(), 1e5))).result
    assert result["L2D"] == pytest.approx(u_value, rel=1e-6)


def test_a_geometry_library_failure_is_a_refusal_naming_the_regions(monkeypatch):
    import shapely.errors

    import coldseam.geometry.partition as partition

    def failing_paint(*args, **kwargs):
        raise shapely.errors.GEOSException("TopologyException: Ring edge missing at 1 2")

    monkeypatch.setattr(partition, "paint", failing_paint)
    with pytest.raises(InvalidSection) as refused:
        evaluate(parse_request(wall_request()))
    assert refused.value.field == "/section/regions"
    assert "could not be resolved" in refused.value.message


def _scaled_wall(factor: float) -> dict:
    request = wall_request()
    section = request["section"]
    for region in section["regions"]:
        region["polygon"] = [[x * factor, y * factor] for x, y in region["polygon"]]
    for boundary in section["boundaries"]:
        boundary["path"] = [[x * factor, y * factor] for x, y in boundary["path"]]
    section["probes"] = []
    request.pop("psi")
    return request


def test_a_section_smaller_than_a_millimetre_is_refused_as_a_unit_slip():
    # Found by the generated sections: boards 1e-7 mm across solved with an energy balance
    # off by 3e-4 (surface terms 1e-9 of the conduction terms, lost to rounding).
    with pytest.raises(InvalidSection) as refused:
        evaluate(parse_request(_scaled_wall(1e-7)))
    assert refused.value.field == "/section/unit"
    assert "is the unit right" in refused.value.message


def test_a_section_of_a_few_millimetres_still_solves():
    assert solve_or_refuse(_scaled_wall(0.01)) == "solved"  # 3 x 10 mm


def test_a_coordinate_of_1e308_is_refused_naming_it():
    # Found by the generated sections: a flanking cut from x = -1e308 raised GEOSException
    # inside shapely (a 500).
    request = wall_request()
    request["psi"]["flanking"][0]["cut"][0][0] = -1e308
    with pytest.raises(InvalidSection) as refused:
        evaluate(parse_request(request))
    assert refused.value.field == "/psi/flanking/0/cut/0/0"
    assert "within ±1e+09" in refused.value.message


def test_a_conductivity_of_1e_300_is_refused_naming_it():
    # Found by the generated requests: mineral wool of λ = 1e-300 solved to a heat flow of
    # 4e-13 W/m of rounding noise, with an energy balance "off by 2.0".
    request = wall_request()
    request["section"]["materials"][0]["conductivity"] = 1e-300
    with pytest.raises(InvalidSection) as refused:
        evaluate(parse_request(request))
    assert refused.value.field == "/section/materials/0/conductivity"
    assert "below any building material" in refused.value.message


def test_conductivities_1e_4_to_1e5_still_balance():
    request = wall_request(max_levels=4)
    request["section"]["materials"][0]["conductivity"] = 1e-4
    request["section"]["materials"][1]["conductivity"] = 1e5
    assert solve_or_refuse(request) == "solved"


@pytest.mark.parametrize("pointer", [("section", "boundaries", 0, "surface_resistance"),
                                     ("condensation", "interior_surface_resistance")])
def test_a_surface_resistance_of_1e_300_is_refused_naming_it(pointer):
    # Found by the generated requests: Rse = 1e-300 overflowed the solver's surface
    # conductance; the result had the right L2D but an energy balance "off by 2.0".
    request = wall_request()
    node = request
    for part in pointer[:-1]:
        node = node[part]
    node[pointer[-1]] = 1e-300
    with pytest.raises(InvalidSection) as refused:
        evaluate(parse_request(request))
    assert refused.value.field == "/" + "/".join(str(p) for p in pointer)
    assert "use 0 for a known surface temperature" in refused.value.message


def test_a_surface_resistance_of_zero_still_solves():
    request = wall_request()
    request["section"]["boundaries"][0]["surface_resistance"] = 0.0
    assert solve_or_refuse(request) == "solved"
