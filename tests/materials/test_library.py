"""The materials library: every row parses, ids are unique, λ is sane, values match their
published source where one is carried by a reference library."""

import csv

import pytest

from coldseam.errors import InvalidSection
from coldseam.materials import LIBRARY_PATH, load_library, resolve_materials
from coldseam.schema import parse_request

EN_12524 = "EN 12524:2000 / ISO 10456:2007 table"
TYPICAL = "common practice (typical declared value)"
RECALLED = "recalled from memory"
VIA_HT = "EN 12524:2000 table as tabulated in the ht library"
COLUMNS = {"id", "name", "conductivity", "density", "specific_heat", "description", "source",
           "capacity_source"}


def _rows() -> list[dict[str, str]]:
    with LIBRARY_PATH.open(encoding="utf-8", newline="") as handle:
        return list(csv.DictReader(handle))


def test_every_row_parses_with_all_columns():
    rows = _rows()
    assert len(rows) == len(load_library())
    for row in rows:
        assert set(row) == COLUMNS
        assert all(value.strip() for value in row.values()), row
        for key in ("conductivity", "density", "specific_heat"):
            assert float(row[key]) > 0, (row["id"], key)


def test_ids_are_unique_and_identifier_like():
    ids = [row["id"] for row in _rows()]
    assert len(ids) == len(set(ids))
    for ident in ids:
        assert ident == ident.lower() and ident.replace("_", "").isalnum(), ident


def test_about_forty_materials():
    assert 35 <= len(load_library()) <= 60


@pytest.mark.parametrize("material", list(load_library().values()), ids=lambda m: m.id)
def test_conductivity_in_a_sane_range(material):
    # Building materials lie between still-air-like insulation (~0.015) and copper (~400).
    assert 0.015 <= material.conductivity <= 400


@pytest.mark.parametrize("material", list(load_library().values()), ids=lambda m: m.id)
def test_source_is_one_of_the_declared_kinds(material):
    # A table, a typical declared value (common practice), or a plain statement of a value
    # recalled from memory that says what it is and what to check.
    assert (material.source in {EN_12524, TYPICAL} or material.source.startswith(VIA_HT)
            or RECALLED in material.source), material.source
    assert "[from memory]" not in material.source  # reads as a sentence in the report


@pytest.mark.parametrize("material", list(load_library().values()), ids=lambda m: m.id)
def test_capacity_source_says_what_the_values_are(material):
    source = material.capacity_source
    assert source.startswith(VIA_HT) or RECALLED in source or "common practice" in source, source
    if not source.startswith(VIA_HT):
        assert "check" in source or RECALLED in source, source


@pytest.mark.parametrize("material", list(load_library().values()), ids=lambda m: m.id)
def test_density_and_specific_heat_in_a_sane_range(material):
    # From aerogel-like foams (~15 kg/m³) to copper (8900); c from copper (~380) to water.
    assert 15 <= material.density <= 9000
    assert 350 <= material.specific_heat <= 4200


def test_insulation_typical_values_lie_in_the_declared_ranges():
    # Ranges of typical declared values: domain primer, common practice.
    ranges = {"mineral_wool": (0.032, 0.040), "eps": (0.031, 0.038), "xps": (0.029, 0.035),
              "pir": (0.022, 0.025)}
    library = load_library()
    checked = 0
    for prefix, (low, high) in ranges.items():
        for material in library.values():
            if material.id.startswith(prefix + "_"):
                assert low <= material.conductivity <= high, material.id
                checked += 1
    assert checked >= 5


def test_load_library_is_cached():
    assert load_library() is load_library()


def _section(materials):
    return parse_request({
        "unit": "mm",
        "materials": materials,
        "regions": [{"material": materials[0]["id"],
                     "polygon": [[0, 0], [100, 0], [100, 100], [0, 100]]}],
        "environments": [{"id": "in", "temperature": 20, "side": "interior"}],
        "boundaries": [{"environment": "in", "surface_resistance": 0.13,
                        "path": [[0, 0], [0, 100]]}],
    }).section


def test_resolve_library_inline_and_orthotropic():
    section = _section([
        {"id": "wall", "library": "concrete_2400"},
        {"id": "eps", "conductivity": 0.035},
        {"id": "stud", "conductivity": [0.13, 0.29]},
    ])
    resolved = resolve_materials(section)
    assert resolved["wall"][:2] == (2.0, 2.0)
    assert EN_12524 in resolved["wall"].source and "concrete_2400" in resolved["wall"].source
    assert resolved["eps"] == (0.035, 0.035, "given in the section")
    lam_x, lam_y, _ = resolved["stud"]
    assert (lam_x, lam_y) == (0.13, 0.29)


def test_conductivity_wins_over_library_reference():
    section = _section([{"id": "wall", "library": "steel", "conductivity": 1.0}])
    assert resolve_materials(section)["wall"][:2] == (1.0, 1.0)


def test_unknown_library_id_names_field_and_close_ids():
    section = _section([{"id": "eps", "conductivity": 0.035},
                        {"id": "slab", "library": "concrete_240"}])
    with pytest.raises(InvalidSection) as info:
        resolve_materials(section)
    assert info.value.field == "/section/materials/1/library"
    assert "concrete_240" in info.value.message and "concrete_2400" in info.value.message


def test_unknown_library_id_with_nothing_close_still_explains():
    section = _section([{"id": "x", "library": "unobtainium"}])
    with pytest.raises(InvalidSection) as info:
        resolve_materials(section)
    assert "not a material of the library" in info.value.message
