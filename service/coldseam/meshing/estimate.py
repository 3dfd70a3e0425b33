"""A quick estimate of the node count of a mesh level, made before gmsh runs.

The 1D discretisation of every segment is known exactly from the level's plan; the nodes
inside the faces are estimated as ∫ 2 / (√3 h²) dA (equilateral triangles of side h, two
triangles per node), the integral taken by sampling each face on a regular grid. gmsh sizes a
face's inside from its boundary (sizes extended from the boundary nodes, interpolated over a
triangulation of them), so h there is at least the target size h(x) and at least the size
interpolated linearly between the boundary node spacings over a Delaunay triangulation of the
boundary nodes: a finely divided curve (a circle of a thousand vertices) fills its whole face
with fine elements, not only a band along it. The estimate serves to refuse a request whose coarsest mesh is plainly over the
node limit, without spending the time and memory of meshing it. It errs low (gmsh carries fine
boundary spacing further into a face than h(x) says), so a request it lets through is still
checked on the real mesh.
"""

from __future__ import annotations

import numpy as np
import shapely

from coldseam.errors import LimitExceeded
from coldseam.geometry.outline import Classified
from coldseam.meshing.sizes import SegmentPlan, plan

#: Grid samples per face for the area integral.
SAMPLES = 400
NODES_PER_AREA = 2 / np.sqrt(3)
#: Faces with at least this many boundary nodes get the bound of the sizes gmsh extends from
#: their boundary; at most this many of their nodes are triangulated for it.
MANY_NODES = 64
MAX_TRIANGULATED = 4000


def planned_nodes(classified: Classified) -> int:
    """The estimated nodes of the mesh of the size plan at factor 1 (kept on ``classified``)."""
    cached = vars(classified).get("_planned_nodes")
    if cached is None:
        cached = vars(classified)["_planned_nodes"] = estimate_nodes(classified,
                                                                     plan(classified, 1.0))
    return cached


def check_coarsest(classified: Classified, max_nodes: int) -> int:
    """The estimated nodes of the coarsest mesh; LimitExceeded when over ``max_nodes``."""
    estimated = planned_nodes(classified)
    if estimated > max_nodes:
        raise LimitExceeded(
            f"even the coarsest mesh of this section would need about {estimated} nodes "
            f"(estimated before meshing), above the limit of {max_nodes}: very thin layers or "
            "near-touching outlines need many small elements", "/options/max_nodes")
    return estimated


def estimate_nodes(classified: Classified, plan: SegmentPlan) -> int:
    """Estimated nodes of the mesh gmsh would make from ``plan``."""
    part = classified.partition
    boundary = len(part.points) + sum(len(inner) for inner in plan.inner.values())
    interior = 0.0
    for face in part.faces:
        polygon = shapely.Polygon(part.points[face.rings[0]],
                                  [part.points[r] for r in face.rings[1:]])
        interior += _face_nodes(polygon, plan, _ring_nodes(part.points, face.rings, plan))
    return int(boundary + interior)


def _ring_nodes(points: np.ndarray, rings: list[list[int]],
                plan: SegmentPlan) -> tuple[np.ndarray, np.ndarray]:
    """The boundary nodes of a face (segment ends and the plan's inner nodes) and the node
    spacing at each: the mean length of its two edges."""
    nodes, spacing = [], []
    for ring in rings:
        chain = []
        for a, b in zip(ring, ring[1:] + ring[:1], strict=True):
            inner = plan.inner.get((a, b))
            if inner is None:
                inner = plan.inner.get((b, a), np.empty((0, 2)))[::-1]
            chain.append(points[a][None, :])
            chain.append(inner)
        ring_xy = np.vstack(chain)
        edges = np.linalg.norm(np.roll(ring_xy, -1, axis=0) - ring_xy, axis=1)
        nodes.append(ring_xy)
        spacing.append(0.5 * (edges + np.roll(edges, 1)))
    return np.vstack(nodes), np.concatenate(spacing)


def _boundary_sizes(nodes: np.ndarray, spacing: np.ndarray, xy: np.ndarray) -> np.ndarray:
    """The boundary spacing interpolated linearly at ``xy`` over a Delaunay triangulation of
    the boundary nodes (0 where there is none: no bound from it there). Faces with few
    boundary nodes keep h(x) alone (their nodes are the junction vertices h(x) grades from);
    many nodes are thinned to MAX_TRIANGULATED, each keeping its own spacing."""
    out = np.zeros(len(xy))
    if len(nodes) < MANY_NODES:
        return out
    step = -(-len(nodes) // MAX_TRIANGULATED)
    nodes, spacing = nodes[::step], spacing[::step]
    triangles = shapely.get_parts(shapely.delaunay_triangles(shapely.multipoints(nodes)))
    if not len(triangles):
        return out
    size_of = {(x, y): h for (x, y), h in zip(map(tuple, nodes.tolist()), spacing, strict=True)}
    corners = shapely.get_coordinates(triangles).reshape(-1, 4, 2)[:, :3]
    sizes = np.array([size_of.get(c, 0.0) for c in map(tuple, corners.reshape(-1, 2).tolist())]
                     ).reshape(-1, 3)
    sample, triangle = shapely.STRtree(triangles).query(shapely.points(xy),
                                                        predicate="within")
    sample, first = np.unique(sample, return_index=True)
    a, b, c = (corners[triangle[first], k] for k in range(3))
    p = xy[sample]
    det = (b[:, 0] - a[:, 0]) * (c[:, 1] - a[:, 1]) - (c[:, 0] - a[:, 0]) * (b[:, 1] - a[:, 1])
    with np.errstate(divide="ignore", invalid="ignore"):
        wb = ((p[:, 0] - a[:, 0]) * (c[:, 1] - a[:, 1]) - (c[:, 0] - a[:, 0]) *
              (p[:, 1] - a[:, 1])) / det
        wc = ((b[:, 0] - a[:, 0]) * (p[:, 1] - a[:, 1]) - (p[:, 0] - a[:, 0]) *
              (b[:, 1] - a[:, 1])) / det
    weights = np.column_stack([1 - wb - wc, wb, wc])
    value = np.einsum("ij,ij->i", weights, sizes[triangle[first]])
    out[sample] = np.where(np.isfinite(value) & (value > 0), value, 0.0)
    return out


def _face_nodes(polygon: shapely.Polygon, plan: SegmentPlan,
                boundary: tuple[np.ndarray, np.ndarray]) -> float:
    x0, y0, x1, y1 = polygon.bounds
    step = np.sqrt((x1 - x0) * (y1 - y0) / SAMPLES)
    if not step > 0:
        return 0.0
    xs = np.arange(x0 + step / 2, x1, step)
    ys = np.arange(y0 + step / 2, y1, step)
    grid = np.stack(np.meshgrid(xs, ys), axis=-1).reshape(-1, 2)
    inside = grid[shapely.contains_xy(polygon, grid[:, 0], grid[:, 1])]
    if not len(inside):
        return 0.0
    h = plan.size_at(inside)
    # where gmsh's sizes from the boundary are finer than h(x), they govern
    interpolated = _boundary_sizes(*boundary, inside)
    h = np.where(interpolated > 0, np.minimum(h, interpolated), h)
    density = NODES_PER_AREA / h ** 2
    return float(polygon.area * density.mean())
