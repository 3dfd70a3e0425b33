"""Every validation rule answers with the field (JSON pointer) and an engineer's message."""

import copy

import pytest
from sections import layered_wall, run

from coldseam.errors import InvalidSection
from coldseam.schema import parse_request

GOOD = layered_wall([("eps", 0.035, 100.0), ("concrete", 2.3, 200.0)])


def broken(change):
    section = copy.deepcopy(GOOD)
    change(section)
    return section


CASES = [
    ("missing unit", lambda s: s.pop("unit"), "/section/unit", "mm"),
    ("unknown unit", lambda s: s.update(unit="inch"), "/section/unit", "'mm' or 'm'"),
    ("negative conductivity", lambda s: s["materials"][0].update(conductivity=-1),
     "/section/materials/0/conductivity", "above 0"),
    ("NaN coordinate", lambda s: s["regions"][0]["polygon"].__setitem__(0, [float("nan"), 0]),
     "/section/regions/0/polygon/0/0", "finite"),
    ("no conductivity", lambda s: s["materials"][0].pop("conductivity"),
     "/section/materials/0", "conductivity"),
    ("unknown material", lambda s: s["regions"][1].update(material="steel"),
     "/section/regions/1/material", "steel"),
    ("unknown environment", lambda s: s["boundaries"][0].update(environment="attic"),
     "/section/boundaries/0/environment", "attic"),
    ("duplicate material", lambda s: s["materials"].append({"id": "eps", "conductivity": 1}),
     "/section/materials/2/id", "twice"),
    ("environment without boundary", lambda s: s["environments"].append(
        {"id": "loft", "temperature": 5, "side": "interior"}), "/section/environments/2", "loft"),
    ("negative resistance", lambda s: s["boundaries"][0].update(surface_resistance=-0.1),
     "/section/boundaries/0/surface_resistance", "greater than or equal"),
    ("two-point polygon", lambda s: s["regions"][0].update(polygon=[[0, 0], [1, 1]]),
     "/section/regions/0/polygon", "at least 3"),
    ("misspelt field", lambda s: s["boundaries"][0].update(surface_resistence=0.04),
     "/section/boundaries/0/surface_resistence", "misspelt"),
    ("bad side", lambda s: s["environments"][0].update(side="inside"),
     "/section/environments/0/side", "interior"),
]


@pytest.mark.parametrize("name,change,field,words", CASES, ids=[c[0] for c in CASES])
def test_schema_rules(name, change, field, words):
    with pytest.raises(InvalidSection) as err:
        parse_request(broken(change))
    assert err.value.field == field
    assert words in err.value.message


GEOMETRY = [
    ("self-crossing polygon",
     lambda s: s["regions"][0].update(polygon=[[0, 0], [100, 1000], [100, 0], [0, 1000]]),
     "/section/regions/0/polygon", "crosses itself near (50.0, 500.0) mm"),
    ("path off the outline",
     lambda s: s["boundaries"][1].update(path=[[350, 0], [350, 1000]]),
     "/section/boundaries/1/path", "50 mm away"),
    ("path along an interface",
     lambda s: s["boundaries"][1].update(path=[[100, 0], [100, 1000]]),
     "/section/boundaries/1/path", "interface"),
    ("probe outside", lambda s: s.update(probes=[{"id": "P", "point": [500, 500]}]),
     "/section/probes/0/point", "outside the section"),
    ("floating region", lambda s: s["regions"].append(
        {"material": "eps", "polygon": [[400, 0], [500, 0], [500, 100], [400, 100]]}),
     "/section/regions", "touches no exposed boundary"),
    ("sliver", lambda s: s["regions"].append(
        {"material": "concrete", "polygon": [[100.000001, 0], [300, 0], [300, 1000],
                                             [100.000001, 1000]]}),
     "/section/regions/1/polygon", "sliver"),
    ("hole outside", lambda s: s["regions"][1].update(
        holes=[[[400, 10], [450, 10], [450, 50]]]), "/section/regions/1/polygon", "hole"),
]


@pytest.mark.parametrize("name,change,field,words", GEOMETRY, ids=[c[0] for c in GEOMETRY])
def test_geometry_rules(name, change, field, words):
    with pytest.raises(InvalidSection) as err:
        run(broken(change))
    assert err.value.field == field
    assert words in err.value.message, err.value.message


def test_flanking_cut_must_end_on_exposed_surfaces():
    request = {"section": GOOD, "psi": {"flanking": [
        {"id": "w", "length": 1000, "cut": [[0, 500], [200, 500]]}]}}
    with pytest.raises(InvalidSection) as err:
        run(request)
    assert err.value.field == "/psi/flanking/0/cut"
    assert "not on an exposed surface" in err.value.message


def test_flanking_needs_exactly_one_of_u_value_or_cut():
    request = {"section": GOOD, "psi": {"flanking": [{"id": "w", "length": 1000}]}}
    with pytest.raises(InvalidSection) as err:
        parse_request(request)
    assert err.value.field == "/psi/flanking/0"
