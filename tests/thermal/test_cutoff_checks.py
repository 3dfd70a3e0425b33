"""Cut-off plane checks: flanking parts must be one-dimensional at the cut (ISO 10211 rule
of max(1 m, 3 × thickness), from memory) and declared symmetry lines are exempt."""

from sections import run


def tee(wall_height: float, symmetry: bool = False) -> dict:
    """A 300 mm wall (mm) with a 200 mm concrete slab entering it from the inside at
    mid-height; the wall is cut off ``wall_height``/2 above and below the slab."""
    h, t = wall_height, 300.0
    mid = h / 2
    section = {
        "unit": "mm",
        "materials": [{"id": "masonry", "conductivity": 0.8},
                      {"id": "concrete", "conductivity": 2.3}],
        "regions": [
            {"material": "masonry", "polygon": [[0, 0], [t, 0], [t, h], [0, h]]},
            {"material": "concrete",
             "polygon": [[100, mid - 100], [t + 1200, mid - 100], [t + 1200, mid + 100],
                         [100, mid + 100]]}],
        "environments": [{"id": "inside", "temperature": 20, "side": "interior"},
                         {"id": "outside", "temperature": -5, "side": "exterior"}],
        "boundaries": [
            {"environment": "outside", "surface_resistance": 0.04, "path": [[0, 0], [0, h]]},
            {"environment": "inside", "surface_resistance": 0.13,
             "path": [[t, 0], [t, mid - 100], [t + 1200, mid - 100]]},
            {"environment": "inside", "surface_resistance": 0.13,
             "path": [[t + 1200, mid + 100], [t, mid + 100], [t, h]]}],
    }
    if symmetry:
        section["symmetry_lines"] = [[[0, 0], [t, 0]], [[0, h], [t, h]]]
    return section


def test_a_cut_off_plane_too_near_the_junction_is_named():
    warnings = run(tee(600))["warnings"]
    near = [w for w in warnings if "(0.0, 0.0) mm" in w and "(300.0, 0.0) mm" in w]
    assert any("not one-dimensional" in w for w in near), warnings
    assert any("max(1 m, 3 × thickness)" in w for w in near), warnings


def test_distant_cut_off_planes_pass_and_symmetry_lines_are_exempt():
    far = run(tee(4400))["warnings"]
    assert not [w for w in far if "(0.0, 0.0) mm" in w], far
    declared = run(tee(600, symmetry=True))["warnings"]
    assert not [w for w in declared if "adiabatic edge" in w], declared
