"""A quick estimate of the node count of a mesh level, made before gmsh runs.

The 1D discretisation of every segment is known exactly from the level's plan; the nodes
inside the faces are estimated from the target size h(x) as ∫ 2 / (√3 h²) dA (equilateral
triangles of side h, two triangles per node), the integral taken by sampling each face on a
regular grid. The estimate serves to refuse a request whose coarsest mesh is plainly over the
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
        interior += _face_nodes(polygon, plan)
    return int(boundary + interior)


def _face_nodes(polygon: shapely.Polygon, plan: SegmentPlan) -> float:
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
    density = NODES_PER_AREA / h ** 2
    return float(polygon.area * density.mean())
