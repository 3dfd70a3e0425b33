"""Local refinement of triangle meshes by newest-vertex bisection.

Every triangle (a, b, c) carries its refinement edge a–b (the side between its first two
nodes) and its newest vertex c. Bisecting it at the midpoint m of a–b gives (c, a, m) and
(b, c, m), whose refinement edges are again their first sides, so the rule reproduces itself
and the shapes stay within finitely many similarity classes: quality cannot degrade however
often a region is refined. A marked triangle is bisected three times (its three sides are
halved, four children, like a uniform split); neighbours are bisected as far as conformity
needs (closure). Existing nodes keep their indices, new ones are appended, so nodes embedded
for probes stay where they are; boundaries are straight, so midpoints lie on them.

    longest_edge_first(mesh) -> Mesh       # initial refinement edges: the longest sides
    refine_marked(mesh, marked) -> (Mesh, parent)   # marked: (E,) bool; parent: (E',)
    refine_to_sizes(mesh, caps) -> Mesh   # caps(mesh): (E,) largest allowed side, metres
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np

from coldseam.fem.mesh import Mesh, edge_lookup


def longest_edge_first(mesh: Mesh) -> Mesh:
    """The same mesh with every triangle's nodes rotated so that its longest side comes first
    (a rotation keeps the orientation counter-clockwise)."""
    p = mesh.points[mesh.triangles]
    side = np.stack([np.linalg.norm(p[:, (k + 1) % 3] - p[:, k], axis=1) for k in range(3)], 1)
    shift = np.argmax(side, axis=1)
    order = (shift[:, None] + np.arange(3)[None]) % 3
    triangles = np.take_along_axis(mesh.triangles, order, axis=1)
    return Mesh(mesh.points, triangles, mesh.material, mesh.boundary_edges, mesh.boundary_group)


def longest_sides(mesh: Mesh) -> np.ndarray:
    """The longest side of every triangle (E,), metres."""
    p = mesh.points[mesh.triangles]
    return np.max([np.linalg.norm(p[:, (k + 1) % 3] - p[:, k], axis=1) for k in range(3)], axis=0)


def refine_to_sizes(mesh: Mesh, caps: Callable[[Mesh], np.ndarray], passes: int = 8) -> Mesh:
    """The mesh refined (``refine_marked``, so still nested and of bounded shape) until no
    triangle's longest side exceeds its cap ``caps(mesh)`` (E,), or after ``passes`` passes
    (each pass halves the sides of the triangles over their caps)."""
    for _ in range(passes):
        marked = longest_sides(mesh) > caps(mesh)
        if not marked.any():
            break
        mesh, _ = refine_marked(mesh, marked)
    return mesh


def closure(tri_edges: np.ndarray, marked_edges: np.ndarray) -> np.ndarray:
    """Edges to halve so that every triangle with a halved side also halves its refinement edge
    (side 0); iterates to the fixed point (each pass marks more, so it ends)."""
    marked = marked_edges.copy()
    while True:
        need = marked[tri_edges].any(axis=1) & ~marked[tri_edges[:, 0]]
        if not need.any():
            return marked
        marked[tri_edges[need, 0]] = True


def refine_marked(mesh: Mesh, marked: np.ndarray) -> tuple[Mesh, np.ndarray]:
    """Halve every side of the marked triangles, bisecting neighbours for conformity.

    Returns the refined mesh and, for each of its triangles, the triangle it came from."""
    edges, tri_edges = mesh.sides
    wanted = np.zeros(len(edges), bool)
    wanted[tri_edges[np.asarray(marked, bool)].ravel()] = True
    split = closure(tri_edges, wanted)
    n = mesh.nodes
    new_index = np.full(len(edges), -1)
    new_index[split] = n + np.arange(int(split.sum()))
    points = np.vstack([mesh.points, 0.5 * (mesh.points[edges[split, 0]] +
                                            mesh.points[edges[split, 1]])])
    a, b, c = mesh.triangles.T
    m = new_index[tri_edges[:, 0]]  # on a–b (side 0)
    q = new_index[tri_edges[:, 1]]  # on b–c (side 1)
    p = new_index[tri_edges[:, 2]]  # on c–a (side 2)
    has_m, has_q, has_p = m >= 0, q >= 0, p >= 0
    pieces, parents = [], []

    def add(select: np.ndarray, *corners: np.ndarray) -> None:
        if select.any():
            pieces.append(np.stack([corner[select] for corner in corners], axis=1))
            parents.append(np.flatnonzero(select))

    add(~has_m, a, b, c)
    # (c, a, m) is halved at p when side c–a is split; (b, c, m) at q when side b–c is.
    add(has_m & ~has_p, c, a, m)
    add(has_m & has_p, m, c, p)
    add(has_m & has_p, a, m, p)
    add(has_m & ~has_q, b, c, m)
    add(has_m & has_q, m, b, q)
    add(has_m & has_q, c, m, q)
    triangles = np.concatenate(pieces)
    parent = np.concatenate(parents)

    mid = new_index[edge_lookup(edges, mesh.boundary_edges)]
    cut = mid >= 0
    start, end = mesh.boundary_edges[:, 0], mesh.boundary_edges[:, 1]
    boundary_edges = np.concatenate([
        mesh.boundary_edges[~cut],
        np.stack([start[cut], mid[cut]], axis=1),
        np.stack([mid[cut], end[cut]], axis=1),
    ])
    boundary_group = np.concatenate([mesh.boundary_group[~cut], mesh.boundary_group[cut],
                                     mesh.boundary_group[cut]])
    refined = Mesh(points, triangles, mesh.material[parent], boundary_edges, boundary_group)
    return refined, parent
