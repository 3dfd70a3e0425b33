"""Template geometry across each template's whole parameter range, without solving: the
request parses, every region polygon is valid, the regions form one valid section, every
boundary path lies on its outline and every flanking cut runs across the section from an
exterior to an interior surface."""

import pytest
from hypothesis import HealthCheck, given, settings
from shapely.geometry import LineString, Point, Polygon
from shapely.ops import unary_union
from template_strategies import CROSS_CHECKED, build_or_skip, parameters

from coldseam.errors import InvalidSection
from coldseam.geometry.outline import classify
from coldseam.geometry.partition import build_partition
from coldseam.schema import parse_request
from coldseam.templates import build, get_template, list_templates

TOLERANCE = 1e-3  # mm

def check_geometry(data: dict) -> None:
    request = parse_request(data)
    # The engine's own pre-meshing checks: painter's partition (no slivers), outline exposure.
    classify(request.section, build_partition(request.section))
    section = data["section"]
    polygons = [Polygon(r["polygon"]) for r in section["regions"]]
    for polygon in polygons:
        assert polygon.is_valid and polygon.area > 0
    union = unary_union(polygons)
    assert union.geom_type == "Polygon" and union.is_valid and not union.interiors
    outline = union.exterior.buffer(TOLERANCE)
    for b in section["boundaries"]:
        path = LineString(b["path"])
        assert path.difference(outline).length < TOLERANCE, b
    sides = {e["id"]: e["side"] for e in section["environments"]}
    for element in data["psi"]["flanking"]:
        assert element["length"] > 0
        if "cut" in element:
            check_cut(element["cut"], section["boundaries"], sides, union)


def check_cut(cut, boundaries, sides, union) -> None:
    line = LineString(cut)
    assert line.length > 0 and line.difference(union.buffer(TOLERANCE)).length < TOLERANCE
    ends = []
    for point in cut:
        on = {sides[b["environment"]] for b in boundaries
              if LineString(b["path"]).distance(Point(point)) < TOLERANCE}
        assert len(on) == 1, (point, on)
        ends.append(on.pop())
    assert sorted(ends) == ["exterior", "interior"]


@pytest.mark.parametrize("template_id", [t.id for t in list_templates()])
def test_default_geometry(template_id):
    check_geometry(build(template_id, {}))


@pytest.mark.parametrize("template_id", [t.id for t in list_templates()])
def test_geometry_across_parameter_range(template_id):
    @settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.filter_too_much])
    @given(parameters(template_id))
    def check(params):
        check_geometry(build_or_skip(template_id, params))

    check()


@pytest.mark.parametrize("template_id", [t.id for t in list_templates()])
def test_geometry_at_range_corners(template_id):
    # Every number at its minimum, then at its maximum (choices at each option).
    info = get_template(template_id)
    choices = [p for p in info.parameters if p.kind == "choice"]
    for end in ("min", "max"):
        for option in range(max([len(p.options) for p in choices] or [1])):
            params = {p.name: getattr(p, end) for p in info.parameters if p.kind == "number"}
            params.update({p.name: p.options[option % len(p.options)] for p in choices})
            try:
                data = build(template_id, params)
            except InvalidSection as error:
                assert error.field.removeprefix("/parameters/") in CROSS_CHECKED[template_id]
                continue
            check_geometry(data)
