"""The same problem assembled by scikit-fem, an independent general-purpose finite-element
library (test-only dependency), on the same mesh: temperatures agree to 1e-9 K."""

import numpy as np
import pytest
import skfem
from skfem.helpers import grad

from coldseam.fem.system import make_space
from coldseam.schema import parse_request
from coldseam.thermal.levels import mesh_levels
from coldseam.thermal.model import prepare
from coldseam.thermal.solve import run

SECTION = {
    "unit": "mm",
    "materials": [{"id": "concrete", "conductivity": 2.3},
                  {"id": "eps", "conductivity": [0.035, 0.05]},
                  {"id": "steel", "conductivity": 50.0}],
    "regions": [{"material": "concrete", "polygon": [[0, 0], [200, 0], [200, 600], [0, 600]]},
                {"material": "eps", "polygon": [[200, 0], [320, 0], [320, 600], [200, 600]]},
                {"material": "steel", "polygon": [[150, 280], [320, 280], [320, 300], [150, 300]]}],
    "environments": [{"id": "inside", "temperature": 20, "side": "interior"},
                     {"id": "outside", "temperature": -5, "side": "exterior"}],
    "boundaries": [{"environment": "outside", "surface_resistance": 0.04,
                    "path": [[320, 0], [320, 600]]},
                   {"environment": "inside", "surface_resistance": 0.13,
                    "path": [[0, 0], [0, 600]]}],
}


def skfem_solution(mesh, conductivity, h, ambient, element):
    m = skfem.MeshTri(mesh.points.T.copy(), mesh.triangles.T.copy())
    basis = skfem.Basis(m, element)
    lam_x = conductivity[:, 0][:, None]
    lam_y = conductivity[:, 1][:, None]

    @skfem.BilinearForm
    def conduction(u, v, w):
        return lam_x * grad(u)[0] * grad(v)[0] + lam_y * grad(u)[1] * grad(v)[1]

    matrix = conduction.assemble(basis)
    rhs = np.zeros(basis.N)
    facet_of = {tuple(sorted(f)): k for k, f in enumerate(m.facets.T)}
    facets = np.array([facet_of[tuple(sorted(e))] for e in mesh.boundary_edges])
    fb = skfem.FacetBasis(m, element, facets=facets)
    h_q = h[:, None]
    t_q = ambient[:, None]

    @skfem.BilinearForm
    def robin(u, v, w):
        return w.h * u * v

    @skfem.LinearForm
    def load(v, w):
        return w.h * w.t * v

    # one coefficient per facet (rows follow the order of ``facets``), constant along it
    matrix = matrix + robin.assemble(fb, h=h_q * np.ones((1, fb.X.shape[-1])))
    rhs = rhs + load.assemble(fb, h=h_q * np.ones((1, fb.X.shape[-1])),
                              t=t_q * np.ones((1, fb.X.shape[-1])))
    return skfem.solve(matrix, rhs), m


@pytest.mark.parametrize("order,element", [(1, skfem.ElementTriP1()), (2, skfem.ElementTriP2())])
def test_same_temperatures_as_scikit_fem(order, element):
    model = prepare(parse_request(SECTION))
    mesh, _ = next(mesh_levels(model.classified))
    space = make_space(mesh, order)
    ours = run(model, space, model.boundary_resistance)
    conductivity = model.conductivities[mesh.material]
    h = 1.0 / model.boundary_resistance[mesh.boundary_group]
    ambient = model.env_temperature[model.boundary_env[mesh.boundary_group]]
    theirs, _ = skfem_solution(mesh, conductivity, h, ambient, element)
    vertices = mesh.nodes
    assert np.max(np.abs(ours.theta[:vertices] - theirs[:vertices])) < 1e-9
