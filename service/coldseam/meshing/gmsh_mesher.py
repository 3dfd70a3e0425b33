"""Triangulate a classified partition with gmsh (the only module that imports gmsh).

The 1D discretisation comes from sizes.plan (every geometry line is one mesh edge); gmsh fills
each face with its Delaunay algorithm, sizes extended from the boundary, no smoothing. gmsh
holds global state and is not thread-safe: every call runs under one lock and starts gmsh
afresh, so nothing leaks between calls and the output depends on the input alone (not on what
the process meshed before).
"""

from __future__ import annotations

import ctypes
import logging
import signal
import threading

import numpy as np

from coldseam.errors import MeshingFailed
from coldseam.fem.mesh import Mesh
from coldseam.geometry.outline import Classified
from coldseam.meshing.sizes import SegmentPlan

log = logging.getLogger(__name__)
_LOCK = threading.Lock()


def _gmsh():
    """gmsh freshly started (0.1 ms): ``clear()`` alone keeps global state such as the last
    model's bounding box, which gmsh uses as a length scale, so a mesh came out differently
    depending on what the process had meshed before."""
    import gmsh

    if gmsh.isInitialized():
        gmsh.finalize()
    gmsh.initialize(readConfigFiles=False, interruptible=False)
    _ignore_sigpipe()
    gmsh.option.setNumber("General.Terminal", 0)
    for name, value in {"General.NumThreads": 1,
                        "Mesh.Algorithm": 5, "Mesh.Smoothing": 0,
                        "Mesh.MeshSizeExtendFromBoundary": 1, "Mesh.MeshSizeFromPoints": 1,
                        "Mesh.MeshSizeFromCurvature": 0, "Mesh.RandomSeed": 1,
                        "Geometry.Tolerance": 1e-12, "Geometry.AutoCoherence": 0}.items():
        gmsh.option.setNumber(name, value)
    return gmsh


def _ignore_sigpipe() -> None:
    """gmsh's initialize() puts SIGPIPE back to its default action behind Python's back (Python
    ignores it and raises BrokenPipeError instead): a later write to a closed socket or pipe
    then killed the whole process silently (exit status 141). Ignore it again, from any
    thread (signal.signal works in the main thread only)."""
    if _python_ignores_sigpipe():
        try:
            libc = ctypes.CDLL(None, use_errno=True)
            libc.signal.restype = ctypes.c_void_p
            libc.signal.argtypes = [ctypes.c_int, ctypes.c_void_p]
            libc.signal(int(signal.SIGPIPE), ctypes.c_void_p(1))  # SIG_IGN
        except (OSError, AttributeError):  # no C library to call: nothing to restore
            pass


def _python_ignores_sigpipe() -> bool:
    return hasattr(signal, "SIGPIPE") and signal.getsignal(signal.SIGPIPE) == signal.SIG_IGN


def triangulate(classified: Classified, plan: SegmentPlan) -> tuple[Mesh, np.ndarray]:
    """A conforming mesh of the partition and the mesh node of every probe."""
    with _LOCK:
        gmsh = _gmsh()
        try:
            return _build(gmsh, classified, plan)
        except Exception as exc:  # gmsh raises bare Exception with its own message
            if exc.__class__ is not Exception:
                raise
            raise MeshingFailed(f"the mesher could not triangulate the section: {exc}") from None
        finally:
            gmsh.clear()


def _build(gmsh, classified: Classified, plan: SegmentPlan):
    part = classified.partition
    geo = gmsh.model.geo
    point_tag = {k: geo.addPoint(x, y, 0.0, float(h)) for k, ((x, y), h) in
                 enumerate(zip(part.points, plan.point_size, strict=True))}
    seg_lines: dict[tuple[int, int], list[int]] = {}
    line_boundary: dict[int, int] = {}
    for seg, inner in plan.inner.items():
        sizes = plan.size_at(inner) if len(inner) else []
        chain = [point_tag[seg[0]]] + [geo.addPoint(x, y, 0.0, float(h))
                                       for (x, y), h in zip(inner, sizes, strict=True)]
        chain.append(point_tag[seg[1]])
        lines = [geo.addLine(p, q) for p, q in zip(chain, chain[1:], strict=False)]
        seg_lines[seg] = lines
        if seg in classified.exposure:
            for line in lines:
                line_boundary[line] = classified.exposure[seg]
    surfaces = [_add_face(geo, face, seg_lines) for face in part.faces]
    probe_tags, embeds = _probe_points(geo, classified, plan, point_tag, surfaces)
    geo.synchronize()
    for tag, surface in embeds:
        gmsh.model.mesh.embed(0, [tag], 2, surface)
    for line in (t for lines in seg_lines.values() for t in lines):
        gmsh.model.mesh.setTransfiniteCurve(line, 2)
    gmsh.model.mesh.generate(2)
    return _extract(gmsh, classified, surfaces, line_boundary, probe_tags)


def _add_face(geo, face, seg_lines) -> int:
    loops = []
    for ring in face.rings:
        tags: list[int] = []
        for a, b in zip(ring, ring[1:] + ring[:1], strict=True):
            lines = seg_lines[(min(a, b), max(a, b))]
            tags += lines if a < b else [-t for t in reversed(lines)]
        loops.append(geo.addCurveLoop(tags))
    return geo.addPlaneSurface(loops)


def _probe_points(geo, classified, plan, point_tag, surfaces):
    """Geometry points for the probes: a partition point, or a new point to embed in a face."""
    tags, embeds = [], []
    section_probes = classified.probe_xy
    for k, (index, face) in enumerate(zip(classified.probe_points, classified.probe_faces,
                                          strict=True)):
        if index is not None:
            tags.append(point_tag[index])
            continue
        x, y = section_probes[k]
        tag = geo.addPoint(x, y, 0.0, float(plan.size_at(section_probes[k])[0]))
        tags.append(tag)
        embeds.append((tag, surfaces[face]))
    return tags, embeds


def _extract(gmsh, classified, surfaces, line_boundary, probe_tags):
    tags, coords, _ = gmsh.model.mesh.getNodes()
    lookup = np.full(int(tags.max()) + 1, -1)
    lookup[tags.astype(int)] = np.arange(len(tags))
    points = coords.reshape(-1, 3)[:, :2]
    triangles, material = [], []
    for face, surface in zip(classified.partition.faces, surfaces, strict=True):
        types, _, nodes = gmsh.model.mesh.getElements(2, surface)
        if len(types) != 1 or types[0] != 2:
            raise MeshingFailed("the mesher produced elements other than triangles")
        tri = lookup[nodes[0].astype(int)].reshape(-1, 3)
        triangles.append(tri)
        material.append(np.full(len(tri), face.material))
    edges, groups = [], []
    for line, boundary in line_boundary.items():
        _, _, nodes = gmsh.model.mesh.getElements(1, line)
        edges.append(lookup[nodes[0].astype(int)].reshape(-1, 2))
        groups.append(np.full(len(edges[-1]), boundary))
    tri = np.concatenate(triangles)
    tri = _counter_clockwise(points, tri)
    probe_nodes = np.array([lookup[int(gmsh.model.mesh.getNodes(0, t)[0][0])]
                            for t in probe_tags], int)
    mesh = Mesh(points.copy(), tri, np.concatenate(material),
                np.concatenate(edges) if edges else np.zeros((0, 2), int),
                np.concatenate(groups) if groups else np.zeros(0, int))
    return _compact(mesh, probe_nodes)


def _counter_clockwise(points, tri):
    d1 = points[tri[:, 1]] - points[tri[:, 0]]
    d2 = points[tri[:, 2]] - points[tri[:, 0]]
    flip = d1[:, 0] * d2[:, 1] - d1[:, 1] * d2[:, 0] < 0
    tri[flip] = tri[flip][:, [0, 2, 1]]
    return tri


def _compact(mesh: Mesh, probe_nodes: np.ndarray):
    """Drop nodes no triangle uses (gmsh keeps geometry points of every entity)."""
    used = np.zeros(mesh.nodes, bool)
    used[mesh.triangles.ravel()] = True
    if used.all():
        return mesh, probe_nodes
    new = np.cumsum(used) - 1
    return Mesh(mesh.points[used], new[mesh.triangles], mesh.material,
                new[mesh.boundary_edges], mesh.boundary_group), new[probe_nodes]
