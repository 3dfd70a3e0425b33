"""The consistent capacity matrix C against scikit-fem's mass matrix (an independent
general-purpose finite-element library) on the same mesh, and its exact integrals; a section
with a zero-capacity region (an air cavity stores no heat) still has time constants,
harmonic and transient solutions."""

import numpy as np
import pytest
import skfem

from coldseam.fem.capacity import capacity_matrix
from coldseam.fem.system import make_space
from coldseam.schema import parse_request
from coldseam.thermal.dynamics import dynamic_problem, harmonic_flows
from coldseam.thermal.levels import mesh_levels
from coldseam.thermal.model import prepare
from coldseam.thermal.solve import solve_level
from coldseam.thermal.transient import TransientRun

SECTION = {
    "unit": "mm",
    "materials": [{"id": "concrete", "conductivity": 2.0, "density": 2400, "specific_heat": 1000},
                  {"id": "still_air", "conductivity": 0.1, "density": 1e-9, "specific_heat": 1e-9}],
    "regions": [{"material": "concrete", "polygon": [[0, 0], [300, 0], [300, 400], [0, 400]]},
                {"material": "still_air", "polygon": [[100, 150], [200, 150], [200, 250], [100, 250]]}],
    "environments": [{"id": "inside", "temperature": 20, "side": "interior"},
                     {"id": "outside", "temperature": -5, "side": "exterior"}],
    "boundaries": [{"environment": "outside", "surface_resistance": 0.04, "path": [[0, 0], [0, 400]]},
                   {"environment": "inside", "surface_resistance": 0.13, "path": [[300, 0], [300, 400]]}],
}


def model_and_mesh(section=SECTION):
    model = prepare(parse_request({"section": section}))
    mesh, probes = next(mesh_levels(model.classified))
    return model, mesh, probes


@pytest.mark.parametrize("order,element", [(1, skfem.ElementTriP1()), (2, skfem.ElementTriP2())])
def test_capacity_matrix_equals_scikit_fem_mass(order, element):
    _, mesh, _ = model_and_mesh()
    rho_c = np.where(mesh.material == 0, 2.4e6, 1.2e3)
    ours = capacity_matrix(make_space(mesh, order), rho_c)
    m = skfem.MeshTri(mesh.points.T.copy(), mesh.triangles.T.copy())
    basis = skfem.Basis(m, element)

    @skfem.BilinearForm
    def mass(u, v, w):
        return w.rc * u * v

    theirs = mass.assemble(basis, rc=rho_c[:, None] * np.ones((1, basis.X.shape[-1])))
    vertices = mesh.nodes  # both number the vertices first
    difference = (ours - theirs).tocsr()[:vertices][:, :vertices]
    assert abs(difference).max() <= 1e-9 * abs(theirs).max()
    # Σ Cij = ∫ ρc dA: the stored heat of a uniform 1 K rise, exact
    area = 0.3 * 0.4
    expected = 2.4e6 * (area - 0.01) + 1.2e3 * 0.01
    assert ours.sum() == pytest.approx(expected, rel=1e-12)


def test_quadratic_field_stored_heat_is_exact_with_p2():
    # θ = x²: θᵀCθ = ρc ∫ x⁴ dA and 1ᵀCθ = ρc ∫ x² dA are exact for P2 (degree-4 integrands).
    _, mesh, _ = model_and_mesh()
    space = make_space(mesh, 2)
    c = capacity_matrix(space, np.ones(mesh.elements))
    theta = space.dof_points[:, 0] ** 2
    assert np.ones(space.dofs) @ (c @ theta) == pytest.approx(0.3 ** 3 / 3 * 0.4, rel=1e-12)
    assert theta @ (c @ theta) == pytest.approx(0.3 ** 5 / 5 * 0.4, rel=1e-12)


def test_zero_capacity_region_is_algebraic():
    model, mesh, probes = model_and_mesh()
    solution = solve_level(model, mesh, probes, 2)
    dyn = dynamic_problem(model, solution.design)
    dyn.volumetric[mesh.material == 1] = 0.0  # the cavity: no heat capacity at all
    dyn.capacity = capacity_matrix(solution.space, dyn.volumetric)
    dyn.c_ff = dyn.capacity[dyn.problem.free][:, dyn.problem.free].tocsc()
    assert dyn.c_ff.diagonal().min() == 0.0  # C is singular
    taus = dyn.time_constants(3)
    assert np.all(taus > 0) and np.all(np.diff(taus) <= 0)
    flows = harmonic_flows(model, dyn, 2 * np.pi / 86400)
    assert np.all(np.isfinite(flows)) and abs(flows[0, 1] - flows[1, 0]) <= 1e-9 * abs(flows[0, 1])
    model.request.dynamics = parse_request({"section": SECTION, "dynamics": {"transient": {
        "temperatures": {"outside": [-5, -8, -6, 0, 2]}}}}).dynamics
    values = TransientRun(model, dyn, solution.design).evaluate()
    heat_in, stored = values["heat_in"].sum(axis=1), values["stored"]
    assert np.abs(heat_in - stored).max() <= 1e-6 * np.abs(stored).max()
