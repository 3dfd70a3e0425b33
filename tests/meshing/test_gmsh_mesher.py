"""The mesher's output depends on its input alone, not on what the process meshed before."""

from __future__ import annotations

import numpy as np

from coldseam.meshing.gmsh_mesher import triangulate
from coldseam.meshing.sizes import plan
from coldseam.schema import parse_request
from coldseam.templates import build
from coldseam.thermal.model import prepare


def thin_bridge() -> dict:
    """330 × 500 mm: concrete, insulation, 10 mm render, a 2 mm aluminium bridge drawn last:
    thin layers are where gmsh's length scale matters."""
    section = {
        "name": "thin layers with a metal bridge", "unit": "mm",
        "materials": [{"id": "concrete", "conductivity": 2.3},
                      {"id": "insulation", "conductivity": 0.03},
                      {"id": "render", "conductivity": 0.9},
                      {"id": "aluminium", "conductivity": 160.0}],
        "regions": [
            {"material": "concrete", "polygon": [[0, 0], [200, 0], [200, 500], [0, 500]]},
            {"material": "insulation", "polygon": [[200, 0], [320, 0], [320, 500], [200, 500]]},
            {"material": "render", "polygon": [[320, 0], [330, 0], [330, 500], [320, 500]]},
            {"material": "aluminium",
             "polygon": [[150, 250], [330, 250], [330, 252], [150, 252]]}],
        "environments": [{"id": "inside", "temperature": 20.0, "side": "interior"},
                         {"id": "outside", "temperature": 0.0, "side": "exterior"}],
        "boundaries": [
            {"environment": "outside", "surface_resistance": 0.04, "path": [[330, 0], [330, 500]]},
            {"environment": "inside", "surface_resistance": 0.13, "path": [[0, 0], [0, 500]]}],
    }
    return {"section": section}


def mesh_of(request: dict):
    model = prepare(parse_request(request))
    return triangulate(model.classified, plan(model.classified))[0]


def test_a_mesh_does_not_depend_on_what_was_meshed_before():
    alone = mesh_of(thin_bridge())
    mesh_of(build("balcony", {}))  # another, larger model in between
    after_other = mesh_of(thin_bridge())
    again = mesh_of(thin_bridge())
    for mesh in (after_other, again):
        assert np.array_equal(mesh.points, alone.points)
        assert np.array_equal(mesh.triangles, alone.triangles)
