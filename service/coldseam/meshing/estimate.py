"""A quick estimate of the node count of a mesh level, made before gmsh runs.

The 1D discretisation of every segment is known exactly from the level's plan; the nodes
inside the faces are estimated as ∫ DENSITY / h² dA (equilateral triangles of side h, two
triangles per node, and the few more gmsh's Delaunay inserts). gmsh sizes a face's inside from
its boundary nodes, so h there is the smallest of

* the target size h(x) of the plan,
* the boundary spacing interpolated linearly over a Delaunay triangulation of the boundary
  nodes: a finely divided closed curve (a circle of a thousand vertices) fills its whole face
  with fine elements, not only a band along it,
* the boundary spacing grown into the face, sᵢ + g·|x − xᵢ| from every boundary node i, at
  BOUNDARY_GROWTH times the plan's growth rate: the band of fine elements a thin layer or a
  densely divided edge spreads into its neighbours.

The integral is sampled on cells split wherever they are coarse for the size there, so the
narrow bands of fine elements along such boundaries are counted. Measured against gmsh on the
templates, the ISO 10211 cases, thin layers and circles of 50 to 1 000 vertices, from the
coarsest level-0 factor to √2 (``tests/robustness/test_node_estimate.py``), the estimate is
0.95-1.5 times the real count on meshes of more than a few hundred nodes. It serves to refuse a
request whose first mesh would be over the node limit without spending the time and memory of
meshing it; every mesh made is still checked itself.
"""

from __future__ import annotations

import numpy as np
import shapely

from coldseam.errors import LimitExceeded
from coldseam.geometry.outline import Classified
from coldseam.meshing.sizes import SegmentPlan, plan

#: Grid samples per face to start the area integral with, cells split where they are wider
#: than REFINE times the size at their centre, at most MAX_SAMPLES cells looked at per face.
SAMPLES = 400
REFINE = 1.0
MAX_SAMPLES = 60_000
#: Nodes per h² of area: 2/√3 for equilateral triangles of side h (two triangles per node),
#: times what gmsh's Delaunay inserts beyond that (its edges come out shorter than h).
DENSITY = 2 / np.sqrt(3) * 1.1
#: How fast the spacing of a boundary grows into its face in gmsh's mesh, as a fraction of
#: the plan's growth rate, and over how many nearest boundary nodes that is looked for.
BOUNDARY_GROWTH = 0.8
NEAREST_BOUNDARY = 8
BRUTE_FORCE_NODES = 32
QUARTERS = np.array([[-1, -1], [1, -1], [-1, 1], [1, 1]], float)
#: Faces with at least this many boundary nodes get the bound of the sizes gmsh extends from
#: their boundary; at most this many of their nodes are triangulated for it.
MANY_NODES = 16
MAX_TRIANGULATED = 4000


def planned_nodes(classified: Classified) -> int:
    """The estimated nodes of the mesh of the size plan at factor 1 (kept on ``classified``)."""
    cached = vars(classified).get("_planned_nodes")
    if cached is None:
        cached = vars(classified)["_planned_nodes"] = estimate_nodes(classified,
                                                                     plan(classified, 1.0))
    return cached


def check_coarsest(classified: Classified, max_nodes: int, factor: float = 1.0) -> int:
    """The estimated nodes of the coarsest mesh, the one level 0 makes at size ``factor``;
    LimitExceeded when over ``max_nodes``."""
    estimated = planned_nodes(classified)
    if estimated > max_nodes and factor < 1.0:  # a coarser level 0 has fewer: estimate it
        estimated = estimate_nodes(classified, plan(classified, factor))
    if estimated > max_nodes:
        raise LimitExceeded(
            f"even the coarsest mesh of this section would need about {estimated} nodes "
            f"(estimated before meshing), above the limit of {max_nodes}: very thin layers, "
            "near-touching outlines and finely divided curves need many small elements",
            "/options/max_nodes")
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


class BoundaryTriangles:
    """A Delaunay triangulation of a face's boundary nodes with the spacing at each corner,
    made once per face for ``_boundary_sizes`` (None when the face has few nodes)."""

    def __init__(self, nodes: np.ndarray, spacing: np.ndarray) -> None:
        step = -(-len(nodes) // MAX_TRIANGULATED)
        nodes, spacing = nodes[::step], spacing[::step]
        self.triangles = shapely.get_parts(
            shapely.delaunay_triangles(shapely.multipoints(nodes)))
        size_of = {(x, y): h for (x, y), h in zip(map(tuple, nodes.tolist()), spacing,
                                                  strict=True)}
        self.corners = shapely.get_coordinates(self.triangles).reshape(-1, 4, 2)[:, :3]
        self.sizes = np.array([size_of.get(c, 0.0) for c in
                               map(tuple, self.corners.reshape(-1, 2).tolist())]).reshape(-1, 3)
        self.tree = shapely.STRtree(self.triangles)

    @classmethod
    def of(cls, nodes: np.ndarray, spacing: np.ndarray) -> BoundaryTriangles | None:
        return cls(nodes, spacing) if len(nodes) >= MANY_NODES else None


def _boundary_sizes(triangulated: BoundaryTriangles | None, xy: np.ndarray) -> np.ndarray:
    """The boundary spacing interpolated linearly at ``xy`` over a Delaunay triangulation of
    the boundary nodes (0 where there is none: no bound from it there). Faces with few
    boundary nodes keep h(x) alone (their nodes are the junction vertices h(x) grades from);
    many nodes are thinned to MAX_TRIANGULATED, each keeping its own spacing."""
    out = np.zeros(len(xy))
    if triangulated is None or not len(triangulated.triangles):
        return out
    corners, sizes = triangulated.corners, triangulated.sizes
    # the triangles whose boxes hold a sample, then the one its barycentric weights are in
    sample, triangle = triangulated.tree.query(shapely.points(xy))
    a, b, c = (corners[triangle, k] for k in range(3))
    p = xy[sample]
    det = (b[:, 0] - a[:, 0]) * (c[:, 1] - a[:, 1]) - (c[:, 0] - a[:, 0]) * (b[:, 1] - a[:, 1])
    with np.errstate(divide="ignore", invalid="ignore"):
        wb = ((p[:, 0] - a[:, 0]) * (c[:, 1] - a[:, 1]) - (c[:, 0] - a[:, 0]) *
              (p[:, 1] - a[:, 1])) / det
        wc = ((b[:, 0] - a[:, 0]) * (p[:, 1] - a[:, 1]) - (p[:, 0] - a[:, 0]) *
              (b[:, 1] - a[:, 1])) / det
        weights = np.column_stack([1 - wb - wc, wb, wc])
    # strictly inside (as GEOS's "within"): a sample on an edge between two triangles takes
    # no bound from them
    inside = np.flatnonzero(np.all(weights > 1e-12, axis=1) & (det != 0))
    sample, first = np.unique(sample[inside], return_index=True)
    rows = inside[first]
    value = np.einsum("ij,ij->i", weights[rows], sizes[triangle[rows]])
    out[sample] = np.where(np.isfinite(value) & (value > 0), value, 0.0)
    return out


def _grown_sizes(nodes: np.ndarray, spacing: np.ndarray, xy: np.ndarray,
                 growth: float) -> np.ndarray:
    """min over the NEAREST_BOUNDARY nearest boundary nodes of sᵢ + growth·|x − xᵢ|: how far
    the spacing of a finely divided boundary reaches into the face. Few nodes: all of them
    (which spares a small section the import of scipy.spatial)."""
    if len(nodes) <= BRUTE_FORCE_NODES:
        dist = np.linalg.norm(xy[:, None, :] - nodes[None, :, :], axis=2)
        return np.min(spacing[None, :] + growth * dist, axis=1)
    from scipy.spatial import cKDTree

    k = min(NEAREST_BOUNDARY, len(nodes))
    dist, idx = cKDTree(nodes).query(xy, k=k)
    dist, idx = dist.reshape(len(xy), k), idx.reshape(len(xy), k)
    return np.min(spacing[idx] + growth * dist, axis=1)


def _face_nodes(polygon: shapely.Polygon, plan: SegmentPlan,
                boundary: tuple[np.ndarray, np.ndarray]) -> float:
    """∫ DENSITY / h² over the face, h the smallest of the target size h(x), the boundary
    spacing interpolated over the face and the boundary spacing grown into it.

    Sampled on cells that start as a grid of about SAMPLES and are split in four wherever a
    cell is wider than REFINE times the size at its centre (fine sizes near a finely divided
    boundary are where the nodes are), until MAX_SAMPLES cells; cells whose centre lies
    inside the face count, scaled to the face's area."""
    x0, y0, x1, y1 = polygon.bounds
    side = np.sqrt((x1 - x0) * (y1 - y0) / SAMPLES)
    if not side > 0:
        return 0.0
    nodes, spacing = boundary
    (xs, sx), (ys, sy) = _cells(x0, x1, side), _cells(y0, y1, side)
    cells = np.stack(np.meshgrid(xs, ys), axis=-1).reshape(-1, 2)
    edges = shapely.STRtree(_edges(polygon))
    triangulated = BoundaryTriangles.of(nodes, spacing)
    shapely.prepare(polygon)
    total = counted = 0.0
    budget = MAX_SAMPLES
    while len(cells):
        inside = shapely.contains_xy(polygon, cells[:, 0], cells[:, 1])
        # cells whose centre is outside but which reach into the face are kept for splitting
        near = np.zeros(len(cells), bool)
        outside = np.flatnonzero(~inside)
        if len(outside):
            hit = edges.query(shapely.points(cells[outside]), predicate="dwithin",
                              distance=0.5 * np.hypot(sx, sy))[0]
            near[outside[np.unique(hit)]] = True
        cells, inside = cells[inside | near], inside[inside | near]
        if not len(cells):
            break
        h = _sizes(plan, nodes, spacing, triangulated, cells)
        budget -= len(cells)
        split = max(sx, sy) > REFINE * h
        if 4 * int(split.sum()) > budget:
            split[:] = False
        done = ~split & inside
        total += float(np.sum(DENSITY / h[done] ** 2)) * sx * sy
        counted += int(done.sum()) * sx * sy
        cells = (cells[split][:, None, :] + QUARTERS[None] * [sx / 4, sy / 4]).reshape(-1, 2)
        sx, sy = sx / 2, sy / 2
    return total * polygon.area / counted if counted else 0.0


def _cells(low: float, high: float, step: float) -> tuple[np.ndarray, float]:
    """Centres of cells ``step`` wide covering [low, high], placed symmetrically in it (so
    that a mirrored section gets the mirrored cells, and the same estimate)."""
    count = max(1, int(np.ceil((high - low) / step)))
    return 0.5 * (low + high) + step * (np.arange(count) - 0.5 * (count - 1)), step


def _edges(polygon: shapely.Polygon) -> np.ndarray:
    rings = [polygon.exterior, *polygon.interiors]
    xy = [np.asarray(r.coords) for r in rings]
    return shapely.linestrings(np.concatenate([np.stack([c[:-1], c[1:]], axis=1) for c in xy]))


def _sizes(plan: SegmentPlan, nodes: np.ndarray, spacing: np.ndarray,
           triangulated: BoundaryTriangles | None, xy: np.ndarray) -> np.ndarray:
    h = np.minimum(plan.size_at(xy),
                   _grown_sizes(nodes, spacing, xy, BOUNDARY_GROWTH * plan._growth))
    # where gmsh's sizes interpolated from the boundary are finer still, they govern
    interpolated = _boundary_sizes(triangulated, xy)
    return np.where(interpolated > 0, np.minimum(h, interpolated), h)
