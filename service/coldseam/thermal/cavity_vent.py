"""Well-ventilated cavities: no λeq, the cavity is open air.

ISO 10077-2 treats a well-ventilated cavity or groove as part of the environment it opens onto
[recalled from memory]. Coldseam does this literally: the cavity's faces leave the solid
(a void), and every surface of the solid around it becomes exposed to that environment, through
the surface resistance of the boundary the cavity opens onto. The environment is the one whose
boundary path touches the cavity; a well-ventilated cavity touching none is refused.
"""

from __future__ import annotations

import numpy as np
import shapely
from shapely.geometry import LineString, Polygon

from coldseam.errors import InvalidSection
from coldseam.geometry.outline import TOLERANCE
from coldseam.geometry.partition import Partition
from coldseam.schema.section import Boundary, Section


def open_ventilated(section: Section, partition: Partition) -> tuple[Section, list[dict]]:
    """Remove well-ventilated cavity faces; the section with their surfaces as boundaries,
    and one result entry per such cavity."""
    kinds = {k for k, m in enumerate(section.materials)
             if m.cavity is not None and m.cavity.ventilation == "well_ventilated"}
    faces = [k for k, f in enumerate(partition.faces) if f.material in kinds]
    if not faces:
        return section, []
    tol = TOLERANCE * partition.extent
    paths = [LineString(np.asarray(b.path, float) * section.scale) for b in section.boundaries]
    extra, entries = [], []
    for k in faces:
        face = partition.faces[k]
        rings = [partition.points[r] for r in face.rings]
        polygon = Polygon(rings[0], rings[1:])
        boundary = _opening(section, polygon, paths, tol, face.material)
        for ring in rings:
            closed = np.vstack([ring, ring[:1]]) / section.scale
            extra.append(boundary.model_copy(update={"path": [tuple(p) for p in closed]}))
        x, y = polygon.representative_point().coords[0]
        entries.append({"material": section.materials[face.material].id,
                        "ventilation": "well_ventilated", "exposed_to": boundary.environment,
                        "surface_resistance": boundary.surface_resistance,
                        "equivalent_conductivity": None, "area": polygon.area, "at": [x, y],
                        "region": _region_index(section, face.material),
                        "_rings": [np.round(r, 7).tolist() for r in rings]})
    partition.faces = [f for k, f in enumerate(partition.faces) if k not in set(faces)]
    return section.model_copy(update={"boundaries": [*section.boundaries, *extra]}), entries


def _region_index(section: Section, material: int) -> int:
    name = section.materials[material].id
    return next(i for i, r in enumerate(section.regions) if r.material == name)


def _opening(section: Section, polygon: Polygon, paths, tol: float, material: int) -> Boundary:
    """The boundary whose path touches the cavity (the later one wins, as on the outline)."""
    touching = [i for i, path in enumerate(paths)
                if shapely.distance(path, polygon.exterior) <= tol]
    if not touching:
        name, index = section.materials[material].id, _region_index(section, material)
        raise InvalidSection(
            f"region {index} ({name}) is a well-ventilated cavity but opens onto no exposed "
            "surface: its outline must meet a boundary path (the environment it is open to); "
            "a closed cavity is 'unventilated'", f"/section/regions/{index}")
    return section.boundaries[touching[-1]]
