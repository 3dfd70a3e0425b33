"""The peer pipeline a user would script with general-purpose libraries.

gmsh with the OpenCASCADE kernel: every region a plane surface, ``fragment`` of all of them
(the region drawn last owns an overlap), one uniform mesh size, gmsh's default 2D algorithm;
scikit-fem P1 with per-element (orthotropic) conductivity, Robin terms h·θ·v on the exposed
facets, known temperatures by condensation; scipy's default ``spsolve``. Heat flow into the
interior environments as ∫ h (θ∞ − θ) ds over their facets, θsi,min as the lowest nodal
temperature on interior facets, probes by point location.

This is the honest baseline: library defaults, nothing disabled, warm process (gmsh
initialised once, imports done).
"""

from __future__ import annotations

import time

import numpy as np

_GMSH = None


def _gmsh():
    global _GMSH
    if _GMSH is None:
        import gmsh

        gmsh.initialize(readConfigFiles=False)
        gmsh.option.setNumber("General.Terminal", 0)
        _GMSH = gmsh
    return _GMSH


def _conductivities(request: dict) -> dict[str, tuple[float, float]]:
    """λ per material id, library ids resolved as the engine resolves them."""
    from coldseam.schema import parse_request
    from coldseam.thermal.model import resolve_materials

    section = parse_request(request).section
    return {m.id: m.conductivity for m in resolve_materials(section)}


def mesh_section(section: dict, size: float):
    """gmsh OCC + fragment + uniform size: points (N, 2) m, triangles (E, 3), material ids.

    gmsh's options are global to the process: they are reset to gmsh's defaults before (the
    engine's mesher sets its own) and after (its sizes must not leak into the engine)."""
    gmsh = _gmsh()
    try:
        return _mesh_section(gmsh, section, size)
    finally:
        gmsh.clear()
        gmsh.option.restoreDefaults()
        gmsh.option.setNumber("General.Terminal", 0)


def _mesh_section(gmsh, section: dict, size: float):
    gmsh.clear()
    gmsh.option.restoreDefaults()
    gmsh.option.setNumber("General.Terminal", 0)
    gmsh.model.add("peer")
    occ = gmsh.model.occ
    scale = 0.001 if section["unit"] == "mm" else 1.0

    def loop(ring):
        ring = [p for k, p in enumerate(ring) if list(p) != list(ring[k - 1])]  # repeats
        pts = [occ.addPoint(x * scale, y * scale, 0.0) for x, y in ring]
        lines = [occ.addLine(a, b) for a, b in zip(pts, pts[1:] + pts[:1], strict=True)]
        return occ.addCurveLoop(lines)

    inputs = []
    for region in section["regions"]:
        loops = [loop(region["polygon"])] + [loop(h) for h in region.get("holes", [])]
        inputs.append((2, occ.addPlaneSurface(loops)))
    _, pieces = occ.fragment(inputs, [])
    pieces = pieces or [[surface] for surface in inputs]  # one region: nothing to fragment
    occ.synchronize()
    owner = {}
    for k, children in enumerate(pieces):  # later regions override earlier ones
        for _, tag in children:
            owner[tag] = section["regions"][k]["material"]
    gmsh.option.setNumber("Mesh.MeshSizeMin", size)
    gmsh.option.setNumber("Mesh.MeshSizeMax", size)
    gmsh.model.mesh.generate(2)
    tags, coords, _ = gmsh.model.mesh.getNodes()
    lookup = np.full(int(tags.max()) + 1, -1)
    lookup[tags.astype(int)] = np.arange(len(tags))
    triangles, materials = [], []
    for tag, material in owner.items():
        types, _, nodes = gmsh.model.mesh.getElements(2, tag)
        tri = lookup[nodes[0].astype(int)].reshape(-1, 3)
        triangles.append(tri)
        materials += [material] * len(tri)
    tri = np.concatenate(triangles)
    used = np.unique(tri)
    new = np.full(len(tags), -1)
    new[used] = np.arange(len(used))
    return coords.reshape(-1, 3)[used, :2], new[tri], np.array(materials)


def _on_path(mid: np.ndarray, path: np.ndarray, tol: float) -> np.ndarray:
    """Which points ``mid`` lie on the polyline ``path`` (within tol)."""
    hit = np.zeros(len(mid), bool)
    for a, b in zip(path[:-1], path[1:], strict=True):
        d = b - a
        t = np.clip(((mid - a) @ d) / (d @ d), 0.0, 1.0)
        hit |= np.linalg.norm(mid - (a + t[:, None] * d), axis=1) <= tol
    return hit


def solve(request: dict, size: float, conductivity: dict) -> dict:
    """One peer solve at a uniform mesh size (metres); figures and stage times."""
    import scipy.sparse.linalg as spla
    from skfem import Basis, BilinearForm, ElementTriP1, FacetBasis, LinearForm, MeshTri, condense

    section = request["section"]
    scale = 0.001 if section["unit"] == "mm" else 1.0
    clock = {"start": time.perf_counter()}
    points, tri, material = mesh_section(section, size)
    clock["meshing"] = time.perf_counter()
    mesh = MeshTri(points.T.copy(), tri.T.copy())
    basis = Basis(mesh, ElementTriP1())
    lam = np.array([conductivity[m] for m in material])
    nqp = basis.X.shape[1]
    lx, ly = (np.repeat(lam[:, k:k + 1], nqp, axis=1) for k in (0, 1))

    @BilinearForm
    def conduction(u, v, w):
        return w.lx * u.grad[0] * v.grad[0] + w.ly * u.grad[1] * v.grad[1]

    @BilinearForm
    def robin(u, v, w):
        return w.h * u * v

    @LinearForm
    def robin_load(v, w):
        return w.h * w.t * v

    matrix = conduction.assemble(basis, lx=lx, ly=ly)
    rhs = np.zeros(basis.N)
    facets = mesh.boundary_facets()
    mid = mesh.p[:, mesh.facets[:, facets]].mean(axis=1).T
    env = {e["id"]: e for e in section["environments"]}
    tol = 1e-9 * max(np.ptp(points, axis=0))
    fixed, fixed_value, robin_sets = [], [], []
    for boundary in section["boundaries"]:
        path = np.asarray(boundary["path"], float) * scale
        sel = facets[_on_path(mid, path, tol)]
        theta = env[boundary["environment"]]["temperature"]
        if boundary["surface_resistance"] == 0:
            nodes = np.unique(mesh.facets[:, sel])
            fixed.append(nodes)
            fixed_value.append(np.full(len(nodes), theta))
            continue
        fb = FacetBasis(mesh, basis.elem, facets=sel)
        h = 1.0 / boundary["surface_resistance"]
        matrix = matrix + robin.assemble(fb, h=h)
        rhs = rhs + robin_load.assemble(fb, h=h, t=theta)
        robin_sets.append((fb, h, theta, env[boundary["environment"]]["side"], sel))
    clock["assembly"] = time.perf_counter()
    x = np.zeros(basis.N)
    if fixed:
        dofs, first = np.unique(np.concatenate(fixed), return_index=True)
        x[dofs] = np.concatenate(fixed_value)[first]
        a_ii, b_i, x, interior = condense(matrix, rhs, x=x, D=dofs)
        x[interior] = spla.spsolve(a_ii, b_i)
    else:
        x = spla.spsolve(matrix.tocsr(), rhs)
    clock["solve"] = time.perf_counter()
    out = _figures(request, mesh, basis, x, robin_sets)
    clock["post"] = time.perf_counter()
    out["stages"] = {k: clock[k] - clock[p] for p, k in
                     zip(["start", "meshing", "assembly", "solve"],
                         ["meshing", "assembly", "solve", "post"], strict=True)}
    out["seconds"] = clock["post"] - clock["start"]
    return out


def _figures(request, mesh, basis, x, robin_sets) -> dict:
    from skfem import Functional

    @Functional
    def inflow(w):
        return w.h * (w.t - w.u)

    section = request["section"]
    scale = 0.001 if section["unit"] == "mm" else 1.0
    flow, interior_nodes = 0.0, []
    for fb, h, theta, side, sel in robin_sets:
        if side == "interior":
            flow += inflow.assemble(fb, h=h, t=theta, u=fb.interpolate(x))
            interior_nodes.append(np.unique(mesh.facets[:, sel]))
    temps = [e["temperature"] for e in section["environments"]]
    sides = [e["side"] for e in section["environments"]]
    out = {"nodes": int(mesh.nvertices), "dofs": int(basis.N)}
    two = len(temps) == 2 and set(sides) == {"interior", "exterior"}
    delta = temps[sides.index("interior")] - temps[sides.index("exterior")] if two else 0.0
    interior_nodes = [n for n in interior_nodes if len(n)]
    has_robin_interior = bool(interior_nodes)
    out["heat_flow"] = float(flow) if has_robin_interior else None
    out["L2D"] = float(flow / delta) if (has_robin_interior and two and delta) else None
    out["theta_si_min"] = (float(x[np.concatenate(interior_nodes)].min())
                           if has_robin_interior else None)
    probes = section.get("probes", [])
    if probes:
        xy = np.array([p["point"] for p in probes], float).T * scale
        values = basis.probes(xy) @ x
        out["probes"] = {p["id"]: float(v) for p, v in zip(probes, values, strict=True)}
    else:
        out["probes"] = {}
    return out


def extent(request: dict) -> float:
    section = request["section"]
    scale = 0.001 if section["unit"] == "mm" else 1.0
    xy = np.concatenate([np.asarray(r["polygon"], float) for r in section["regions"]]) * scale
    return float(max(np.ptp(xy, axis=0)))


def to_accuracy(request: dict, within, max_nodes: int = 1_500_000,
                max_seconds: float = 120.0) -> dict:
    """Halve the uniform size from extent/8 until ``within(figures)`` holds.

    Returns the first run that meets it (its time is the peer's time: the user is credited with
    knowing the right size), the whole sequence, and ``met``.
    """
    conductivity = _conductivities(request)
    size = extent(request) / 8
    runs = []
    solve(request, size, conductivity)  # warm-up: imports, gmsh start, OCC kernel
    while True:
        figures = solve(request, size, conductivity)
        figures["size"] = size
        runs.append(figures)
        if within(figures):
            return {"met": True, "final": figures, "runs": runs}
        if figures["nodes"] * 4 > max_nodes or figures["seconds"] * 4 > max_seconds:
            return {"met": False, "final": figures, "runs": runs}
        size /= 2
