"""DXF import: drawings made here with ezdxf, read back into model-v1 sections.

Every expected value follows from the drawing built in the test (its coordinates and the
tolerances of coldseam.imports); no outside reference values are involved.
"""

from __future__ import annotations

import doctest
import io
import json
import math
import random

import ezdxf
import pytest
from shapely import Polygon

from coldseam.errors import InvalidSection, LimitExceeded
from coldseam.imports import dxf, dxf_curves, dxf_entities
from coldseam.imports.dxf import import_dxf
from coldseam.schema import parse_request

INSIDE = {"environment": "inside", "temperature": 20, "side": "interior",
          "surface_resistance": 0.13}
OUTSIDE = {"environment": "outside", "temperature": 0, "side": "exterior",
           "surface_resistance": 0.04}
SLAB_MAP = {
    "MASONRY": {"material": "masonry", "conductivity": 0.56},
    "concrete": {"material": "concrete", "conductivity": 2.3},  # case differs from the drawing
    "EPS": {"material": "eps", "conductivity": 0.035},
    "EXTERIOR": OUTSIDE,
    "INTERIOR": INSIDE,
}


def new_doc(insunits: int | None = 4) -> ezdxf.document.Drawing:
    doc = ezdxf.new()
    if insunits is None:
        del doc.header["$INSUNITS"]
    else:
        doc.header["$INSUNITS"] = insunits
    return doc


def to_bytes(doc) -> bytes:
    text = io.StringIO()
    doc.write(text)
    return text.getvalue().encode()


def rect(x0, y0, x1, y1, s=1.0):
    return [(x0 * s, y0 * s), (x1 * s, y0 * s), (x1 * s, y1 * s), (x0 * s, y1 * s)]


def slab_edge(scale: float = 1.0, insunits: int | None = None) -> bytes:
    """Slab edge: EPS outside a masonry wall, a concrete slab drawn over the wall; the
    faces drawn as loose LINEs in shuffled order. Coordinates in mm times ``scale``."""
    doc = new_doc(insunits)
    msp = doc.modelspace()
    msp.add_lwpolyline(rect(100, 0, 275, 2600, scale), close=True, dxfattribs={"layer": "MASONRY"})
    msp.add_lwpolyline(rect(100, 1200, 1275, 1400, scale), close=True,
                       dxfattribs={"layer": "CONCRETE"})
    msp.add_lwpolyline(rect(0, 0, 100, 2600, scale), close=True, dxfattribs={"layer": "EPS"})
    lines = {"EXTERIOR": [((0, 1300), (0, 2600)), ((0, 0), (0, 1300))],
             "INTERIOR": [((275, 1200), (1275, 1200)), ((1275, 1400), (275, 1400)),
                          ((275, 0), (275, 1200)), ((275, 2600), (275, 1400))]}
    for layer, pairs in lines.items():
        for a, b in pairs:
            msp.add_line((a[0] * scale, a[1] * scale), (b[0] * scale, b[1] * scale),
                         dxfattribs={"layer": layer})
    msp.add_text("Slab edge", dxfattribs={"layer": "NOTES"})
    return to_bytes(doc)


def one_layer_doc(add, insunits: int = 4) -> bytes:
    """A drawing with what ``add(msp)`` draws on layer PART plus two faces around it."""
    doc = new_doc(insunits)
    msp = doc.modelspace()
    add(msp)
    msp.add_line((-500, -500), (-500, 500), dxfattribs={"layer": "EXTERIOR"})
    msp.add_line((500, -500), (500, 500), dxfattribs={"layer": "INTERIOR"})
    return to_bytes(doc)


PART_MAP = {"PART": {"material": "steel", "conductivity": 50.0}, "EXTERIOR": OUTSIDE,
            "INTERIOR": INSIDE}


def test_slab_edge_in_mm_without_insunits_needs_the_unit_argument():
    with pytest.raises(InvalidSection) as err:
        import_dxf(slab_edge(), SLAB_MAP, None)
    assert err.value.field == "/unit"
    assert "does not state its unit" in err.value.message

    out = import_dxf(slab_edge(), SLAB_MAP, "mm")
    section = out["section"]
    assert section["unit"] == "mm"
    assert [r["material"] for r in section["regions"]] == ["masonry", "concrete", "eps"]
    assert section["regions"][1]["polygon"] == [list(p) for p in rect(100, 1200, 1275, 1400)]
    paths = {b["environment"]: [] for b in section["boundaries"]}
    for b in section["boundaries"]:
        paths[b["environment"]].append(b["path"])
    assert paths["outside"] == [[[0, 0], [0, 1300], [0, 2600]]]  # two LINEs joined
    assert sorted(len(p) for p in paths["inside"]) == [3, 3]
    assert any("NOTES (1 entity)" in w for w in out["warnings"])
    request = parse_request({"section": section})
    assert request.section.unit == "mm"


def test_slab_edge_without_layer_map_lists_layers_for_mapping():
    out = import_dxf(slab_edge(), None, None)
    assert out["needs_mapping"] is True and out["unit"] is None
    layers = {layer["name"]: layer for layer in out["layers"]}
    assert set(layers) == {"MASONRY", "CONCRETE", "EPS", "EXTERIOR", "INTERIOR", "NOTES"}
    assert layers["INTERIOR"]["entity_counts"] == {"LINE": 4}
    assert (layers["INTERIOR"]["closed_shapes"], layers["INTERIOR"]["open_paths"]) == (0, 2)
    assert (layers["MASONRY"]["closed_shapes"], layers["MASONRY"]["open_paths"]) == (1, 0)


def test_slab_edge_in_metres_takes_the_unit_from_insunits():
    out = import_dxf(slab_edge(0.001, insunits=6), SLAB_MAP, None)
    section = out["section"]
    assert section["unit"] == "m"
    assert section["regions"][1]["polygon"][2] == [1.275, 1.4]
    parse_request({"section": section})


def test_unit_argument_overrides_insunits_with_a_note():
    out = import_dxf(slab_edge(insunits=6), SLAB_MAP, "mm")
    assert out["section"]["unit"] == "mm"
    assert any("states its unit as m" in w for w in out["warnings"])


def test_metres_stated_for_a_mm_drawing_draws_a_size_warning():
    out = import_dxf(slab_edge(insunits=6), SLAB_MAP, None)
    assert any("unusual size" in w and "give the unit mm" in w for w in out["warnings"])


@pytest.mark.parametrize(("insunits", "factor"), [(5, 10.0), (1, 25.4)])
def test_centimetres_and_inches_convert_to_mm(insunits, factor):
    out = import_dxf(slab_edge(scale=1 / factor, insunits=insunits), SLAB_MAP, None)
    assert out["section"]["unit"] == "mm"
    assert out["section"]["regions"][1]["polygon"][2] == pytest.approx([1275, 1400], abs=1e-6)
    assert any("converted from" in w for w in out["warnings"])


def test_unknown_unit_argument_is_refused():
    with pytest.raises(InvalidSection) as err:
        import_dxf(slab_edge(), SLAB_MAP, "furlong")
    assert err.value.field == "/unit"


def test_unclosed_polyline_on_a_material_layer_is_reported_with_its_gap():
    doc = new_doc(4)
    msp = doc.modelspace()
    msp.add_lwpolyline([(1200, 0), (1500, 0), (1500, 200), (1200.4, 0)],
                       dxfattribs={"layer": "CONCRETE"})
    msp.add_line((1200, 0), (1200, 200), dxfattribs={"layer": "EXTERIOR"})
    layer_map = {"CONCRETE": {"material": "concrete", "conductivity": 2.3},
                 "EXTERIOR": OUTSIDE}
    with pytest.raises(InvalidSection) as err:
        import_dxf(to_bytes(doc), layer_map, None)
    assert err.value.field == "/layer_map/CONCRETE"
    assert ("layer CONCRETE: polyline starting at (1200, 0) mm is not closed: gap of 0.4 mm"
            in err.value.message)
    summary = import_dxf(to_bytes(doc), None, None)["layers"]
    assert summary[0]["problems"] and "gap of 0.4" in summary[0]["problems"][0]


def test_tiny_gap_is_closed_with_a_warning():
    out = import_dxf(one_layer_doc(lambda msp: msp.add_lwpolyline(
        [(0, 0), (100, 0), (100, 100), (0, 100), (0, 0.05)], dxfattribs={"layer": "PART"})),
        PART_MAP, None)
    assert len(out["section"]["regions"]) == 1
    assert any("closed automatically across a gap of 0.05 mm" in w for w in out["warnings"])


def test_circle_is_polygonised_within_the_chord_error():
    radius = 80.0
    out = import_dxf(one_layer_doc(lambda msp: msp.add_circle(
        (10, 20), radius, dxfattribs={"layer": "PART"})), PART_MAP, None)
    polygon = out["section"]["regions"][0]["polygon"]
    n = len(polygon)
    assert all(math.dist(p, (10, 20)) == pytest.approx(radius, abs=1e-6) for p in polygon)  # output rounded to 1e-6 mm
    sagitta = radius * (1 - math.cos(math.pi / n))  # the largest distance chord to arc
    assert sagitta <= dxf.CHORD_MM + 1e-12
    # not wasteful: the grid is the fewest vertices meeting the chord error, rounded up to 4k
    assert n <= 2 * math.pi / (2 * math.acos(1 - dxf.CHORD_MM / radius)) + 4
    parse_request({"section": out["section"]})


def test_bulge_arc_is_tessellated_on_its_circle():
    # bulge 1 = a semicircle (DXF reference: bulge = tan(angle / 4)), here from (100,0) to
    # (100,100) bulging to the right of travel, i.e. out to x > 100, centre (100, 50).
    out = import_dxf(one_layer_doc(lambda msp: msp.add_lwpolyline(
        [(0, 0, 0), (100, 0, 1.0), (100, 100, 0), (0, 100, 0)], format="xyb", close=True,
        dxfattribs={"layer": "PART"})), PART_MAP, None)
    polygon = out["section"]["regions"][0]["polygon"]
    arc = [p for p in polygon if p[0] > 100]
    assert len(arc) > 10
    assert all(math.dist(p, (100, 50)) == pytest.approx(50, abs=1e-6) for p in arc)
    area = Polygon(polygon).area
    assert area == pytest.approx(100 * 100 + math.pi * 50**2 / 2, rel=2e-3)


def test_hatch_with_an_island_is_a_region_with_a_hole_and_its_outline_counts_once():
    def draw(msp):
        msp.add_lwpolyline(rect(0, 0, 300, 200), close=True, dxfattribs={"layer": "PART"})
        hatch = msp.add_hatch(dxfattribs={"layer": "PART"})
        hatch.paths.add_polyline_path(rect(0, 0, 300, 200), flags=1)
        edges = hatch.paths.add_edge_path(flags=16)
        edges.add_line((100, 50), (200, 50))
        edges.add_arc((200, 100), 50, -90, 90)
        edges.add_line((200, 150), (100, 150))
        edges.add_line((100, 150), (100, 50))
    out = import_dxf(one_layer_doc(draw), PART_MAP, None)
    regions = out["section"]["regions"]
    assert len(regions) == 1 and len(regions[0]["holes"]) == 1
    hole = Polygon(regions[0]["holes"][0])
    assert hole.area == pytest.approx(100 * 100 + math.pi * 50**2 / 2, rel=2e-3)
    assert any("drawn twice counted once" in w for w in out["warnings"])
    parse_request({"section": out["section"]})


def test_lines_forming_rectangles_and_boards_sharing_an_edge_become_regions():
    def draw(msp):
        for a, b in [((0, 0), (200, 0)), ((200, 0), (200, 100)), ((200, 100), (0, 100)),
                     ((0, 100), (0, 0)), ((100, 0), (100, 100))]:  # two boards, one joint
            msp.add_line(a, b, dxfattribs={"layer": "PART"})
    out = import_dxf(one_layer_doc(draw), PART_MAP, None)
    areas = sorted(Polygon(r["polygon"]).area for r in out["section"]["regions"])
    assert areas == pytest.approx([100 * 100, 100 * 100])


def test_outline_inside_an_outline_on_one_layer_is_a_hole():
    def draw(msp):
        msp.add_lwpolyline(rect(0, 0, 100, 100), close=True, dxfattribs={"layer": "PART"})
        msp.add_lwpolyline(rect(8, 8, 92, 92), close=True, dxfattribs={"layer": "PART"})
    out = import_dxf(one_layer_doc(draw), PART_MAP, None)
    (region,) = out["section"]["regions"]
    assert region["holes"] == [[list(p) for p in rect(8, 8, 92, 92)]]


def _beam_in_insulation(msp):
    msp.add_lwpolyline(rect(40, 40, 60, 60), close=True, dxfattribs={"layer": "STEEL"})
    msp.add_lwpolyline(rect(0, 0, 100, 100), close=True, dxfattribs={"layer": "PART"})


def test_region_hidden_by_a_later_one_is_warned_and_order_brings_it_on_top():
    layer_map = {**PART_MAP, "STEEL": {"material": "s355", "conductivity": 50.0}}
    out = import_dxf(one_layer_doc(_beam_in_insulation), layer_map, None)
    assert [r["material"] for r in out["section"]["regions"]] == ["s355", "steel"]
    assert any("layer STEEL" in w and "hidden entirely" in w for w in out["warnings"])
    layer_map["STEEL"] = {**layer_map["STEEL"], "order": 1}
    out = import_dxf(one_layer_doc(_beam_in_insulation), layer_map, None)
    assert [r["material"] for r in out["section"]["regions"]] == ["steel", "s355"]
    assert not any("hidden" in w for w in out["warnings"])


def test_blocks_are_exploded_with_layer_zero_taking_the_reference_layer():
    doc = new_doc(4)
    block = doc.blocks.new("POST")
    block.add_lwpolyline(rect(0, 0, 10, 10), close=True, dxfattribs={"layer": "0"})
    msp = doc.modelspace()
    msp.add_blockref("POST", (100, 0), dxfattribs={"layer": "PART", "xscale": 2})
    msp.add_line((100, 0), (100, 10), dxfattribs={"layer": "EXTERIOR"})
    msp.add_line((120, 0), (120, 10), dxfattribs={"layer": "INTERIOR"})
    out = import_dxf(to_bytes(doc), PART_MAP, None)
    assert out["section"]["regions"][0]["polygon"] == [list(p) for p in rect(100, 0, 120, 10)]


def test_blocks_nested_too_deep_are_refused():
    doc = new_doc(4)
    doc.blocks.new("B0").add_line((0, 0), (1, 0))
    for level in range(1, 12):
        doc.blocks.new(f"B{level}").add_blockref(f"B{level - 1}", (0, 0))
    doc.modelspace().add_blockref("B11", (0, 0))
    with pytest.raises(LimitExceeded) as err:
        import_dxf(to_bytes(doc), None, None)
    assert "nested more than" in err.value.message


def test_too_many_entities_are_refused():
    doc = new_doc(4)
    msp = doc.modelspace()
    for i in range(dxf_entities.DxfLimits().max_entities + 1):
        msp.add_line((i, 0), (i, 1))
    with pytest.raises(LimitExceeded) as err:
        import_dxf(to_bytes(doc), None, None)
    assert "more than 20000 entities" in err.value.message


def test_huge_block_array_is_refused_before_exploding():
    doc = new_doc(4)
    doc.blocks.new("TILE").add_line((0, 0), (1, 0))
    ref = doc.modelspace().add_blockref("TILE", (0, 0))
    ref.grid(size=(1000, 1000), spacing=(1, 1))
    with pytest.raises(LimitExceeded):
        import_dxf(to_bytes(doc), None, None)


def test_too_many_vertices_are_refused():
    limits = dxf_entities.DxfLimits(max_vertices=100)
    data = one_layer_doc(lambda msp: msp.add_circle((0, 0), 10_000, dxfattribs={"layer": "PART"}))
    with pytest.raises(LimitExceeded) as err:
        import_dxf(data, PART_MAP, None, limits=limits)
    assert "vertices" in err.value.message


@pytest.mark.parametrize("data", [
    b"",
    b"   \n",
    b"\x00\xff garbage \x13\x37" * 200,
    b"\x89PNG\r\n\x1a\n" + bytes(200),
    b"AC1032" + bytes(200),
    b"0\nSECTION\n2\nENTITIES\n0\nLINE\n10\nnot-a-number\n",
])
def test_unreadable_files_are_invalid_sections(data):
    with pytest.raises(InvalidSection) as err:
        import_dxf(data, None, None)
    assert err.value.field == "/file"
    assert err.value.message


def test_damaged_files_never_escape_as_other_errors():
    base = slab_edge()
    rnd = random.Random(20240611)
    for _ in range(40):
        data = bytearray(base[: rnd.randrange(len(base))])
        for _ in range(rnd.randrange(0, 12)):
            if data:
                data[rnd.randrange(len(data))] = rnd.randrange(256)
        try:
            import_dxf(bytes(data), SLAB_MAP, "mm")
        except (InvalidSection, LimitExceeded) as exc:
            assert exc.message
        # reading successfully is fine too: damage may hit only a comment or a handle


def test_utf16_and_binary_dxf_are_read():
    doc = ezdxf.new()
    doc.header["$INSUNITS"] = 4
    doc.modelspace().add_lwpolyline(rect(0, 0, 10, 10), close=True, dxfattribs={"layer": "Ä"})
    utf16 = io.StringIO()
    doc.write(utf16)
    assert import_dxf(utf16.getvalue().encode("utf-16"), None, None)["layers"][0]["name"] == "Ä"
    binary = io.BytesIO()
    doc.write(binary, fmt="bin")
    assert import_dxf(binary.getvalue(), None, None)["layers"][0]["closed_shapes"] == 1


def test_self_crossing_outline_is_refused_with_its_location():
    data = one_layer_doc(lambda msp: msp.add_lwpolyline(
        [(0, 0), (100, 100), (100, 0), (0, 100)], close=True, dxfattribs={"layer": "PART"}))
    with pytest.raises(InvalidSection) as err:
        import_dxf(data, PART_MAP, None)
    assert "crosses itself near (50, 50) mm" in err.value.message


@pytest.mark.parametrize(("layer_map", "field", "words"), [
    ({"PART": {"material": "steel", "conductivity": -1}}, "/layer_map/PART/conductivity",
     "above 0"),
    ({"PART": {"colour": "red"}}, "/layer_map/PART", "say what the layer is"),
    ({"PART": {"environment": "x", "temperature": 20, "side": "inside",
               "surface_resistance": 0.13}}, "/layer_map/PART/side", ""),
    ({"PART": {"material": "steel", "conductivity": 50}, "EXTERIOR": OUTSIDE,
      "INTERIOR": {"material": "steel", "conductivity": 17}}, "/layer_map/INTERIOR",
     "different properties"),
    ({**PART_MAP, "MISSING": {**INSIDE, "environment": "attic"}}, "/layer_map/MISSING",
     "not in the drawing"),
    ({"PART": {"material": "steel", "conductivity": 50}, "EXTERIOR": OUTSIDE,
      "INTERIOR": {"ignore": True}}, "", ""),
])
def test_layer_map_mistakes_name_the_layer(layer_map, field, words):
    data = one_layer_doc(lambda msp: msp.add_circle((0, 0), 50, dxfattribs={"layer": "PART"}))
    if not field:  # an ignored interior face still makes a valid one-environment section
        out = import_dxf(data, layer_map, None)
        assert [e["id"] for e in out["section"]["environments"]] == ["outside"]
        return
    with pytest.raises(InvalidSection) as err:
        import_dxf(data, layer_map, None)
    assert err.value.field == field
    assert words in err.value.message


def test_module_examples_run():
    for module in (dxf, dxf_curves):
        result = doctest.testmod(module)
        assert result.attempted > 0 and result.failed == 0


def test_arc_and_line_on_an_environment_layer_join_into_one_curved_path():
    doc = new_doc(4)
    msp = doc.modelspace()
    msp.add_lwpolyline([(0, 0, 0), (200, 0, 0), (200, 200, 0), (0, 200, 0)], format="xyb",
                       close=True, dxfattribs={"layer": "PART"})
    msp.add_line((0, 0), (200, 0), dxfattribs={"layer": "EXTERIOR"})
    msp.add_arc((200, 100), 100, -90, 90, dxfattribs={"layer": "EXTERIOR"})  # off the part
    msp.add_line((0, 0), (0, 200), dxfattribs={"layer": "INTERIOR"})
    out = import_dxf(to_bytes(doc), PART_MAP, None)
    (outside,) = [b for b in out["section"]["boundaries"] if b["environment"] == "outside"]
    path = outside["path"]
    assert len(path) > 10 and {tuple(path[0]), tuple(path[-1])} == {(0, 0), (200, 200)}
    assert all(math.dist(p, (200, 100)) == pytest.approx(100, abs=1e-6) for p in path[1:-1]
               if p[0] > 200)


def test_frame_points_of_a_spline_fit_polyline_are_not_outline_vertices():
    def draw(msp):
        poly = msp.add_polyline2d(rect(0, 0, 100, 100), close=True,
                                  dxfattribs={"layer": "PART"})
        poly.append_vertex((5000, 5000), dxfattribs={"flags": 16})
    out = import_dxf(one_layer_doc(draw), PART_MAP, None)
    assert out["section"]["regions"][0]["polygon"] == [list(p) for p in rect(0, 0, 100, 100)]


def test_arc_surface_over_a_circle_shares_the_outline_vertices():
    def draw(msp):
        msp.add_circle((0, 0), 100, dxfattribs={"layer": "PART"})
        msp.add_arc((0, 0), 100, 10, 100, dxfattribs={"layer": "SURFACE"})
    layer_map = {"PART": PART_MAP["PART"], "SURFACE": INSIDE, "EXTERIOR": OUTSIDE}
    out = import_dxf(one_layer_doc(draw), layer_map, None)
    polygon = {tuple(p) for p in out["section"]["regions"][0]["polygon"]}
    (arc,) = [b["path"] for b in out["section"]["boundaries"] if b["environment"] == "inside"]
    assert len(arc) > 20
    assert all(tuple(p) in polygon for p in arc[1:-1])  # the same grid: exactly on the outline


def test_hatch_with_an_arc_edge_over_its_bulged_outline_counts_once():
    def draw(msp):
        msp.add_lwpolyline([(0, 0, 0), (200, 0, 1.0), (200, 100, 0), (0, 100, 0)], format="xyb",
                           close=True, dxfattribs={"layer": "PART"})
        hatch = msp.add_hatch(dxfattribs={"layer": "PART"})
        edges = hatch.paths.add_edge_path(flags=1)
        edges.add_line((0, 100), (0, 0))
        edges.add_line((0, 0), (200, 0))
        edges.add_arc((200, 50), 50, -90, 90)
        edges.add_line((200, 100), (0, 100))
    out = import_dxf(one_layer_doc(draw), PART_MAP, None)
    assert len(out["section"]["regions"]) == 1
    assert any("drawn twice counted once" in w for w in out["warnings"])


def test_undecodable_layer_names_come_back_as_json_safe_text():
    doc = new_doc(4)
    doc.modelspace().add_circle((0, 0), 10, dxfattribs={"layer": "WALLXX"})
    data = to_bytes(doc).replace(b"WALLXX", b"WALL\xc4\xff")  # not UTF-8, in a UTF-8 file
    out = import_dxf(data, None, None)
    names = [layer["name"] for layer in out["layers"]]
    assert len(names) == 1 and names[0].startswith("WALL")
    json.dumps(out, ensure_ascii=False).encode("utf-8")  # no lone surrogates left


def test_layer_names_with_slashes_are_escaped_in_pointers():
    # '/' cannot occur in a DXF layer name, but a layer map key may carry anything
    data = one_layer_doc(lambda msp: msp.add_circle((0, 0), 50, dxfattribs={"layer": "PART"}))
    layer_map = {**PART_MAP, "A/B~C": {"material": "x", "conductivity": 0}}
    with pytest.raises(InvalidSection) as err:
        import_dxf(data, layer_map, None)
    assert err.value.field == "/layer_map/A~1B~0C/conductivity"
