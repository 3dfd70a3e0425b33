"""Air cavities: each cavity region becomes a solid of its own equivalent conductivity λeq.

Runs after model preparation, before meshing. Faces of a cavity material that share an edge
longer than ``SLIT`` are one cavity (joined); a cavity whose outline narrows below ``SLIT`` is
split there into separate cavities (``coldseam.thermal.cavity_split``, run on the partition
before the outline is classified). Each cavity's extent
along (d) and across (b) the heat flow is that of the equivalent rectangle of ISO 10077-2
[recalled from memory]: same area and same aspect ratio as the bounding rectangle. Each cavity
gets its own internal material entry appended to ``model.materials`` (id
``"<material> [cavity n]"``), so the mesh carries one λ per cavity and fem needs no change.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import shapely
from shapely.geometry import Polygon

from coldseam.errors import InvalidSection
from coldseam.geometry.partition import where
from coldseam.thermal.cavity_formula import C1, equivalent_conductivity
from coldseam.thermal.cavity_split import SLIT

CAVITY_SOURCE = "air cavity: λeq computed per cavity (ISO 10077-2), listed under `cavities`"


@dataclass
class CavityGroup:
    material: int  # index into section.materials
    faces: list[int]
    polygon: Polygon  # metres


def apply_cavities(model) -> list[dict]:
    """Give every cavity face its λeq; the result's ``cavities`` entries, in region order."""
    section = model.section
    kinds = {k for k, m in enumerate(section.materials) if m.cavity is not None}
    partition = model.classified.partition
    if not kinds or not any(f.material in kinds for f in partition.faces):
        return []
    segments = partition.segments()
    groups = _groups(partition, segments, kinds)
    axis, default_direction = heat_flow_axis(model)
    shapes = _region_shapes(section)
    placed = sorted(((_regions_of(shapes, partition, g), g) for g in groups),
                    key=lambda rg: (rg[0], rg[1].polygon.bounds))
    air = {k for k, f in enumerate(partition.faces) if f.material in kinds}
    entries = []
    for n, (regions, group) in enumerate(placed, start=1):
        _check_closed(model, segments, group, air, regions)
        entries.append(_assign(model, group, n, regions, axis, default_direction))
    _settle_placeholders(model, kinds, entries)
    return entries


def check_cavity_regions(section) -> None:
    """A cavity region whose outline encloses no area (zero width) is refused with words
    about the cavity, before the general polygon checks."""
    for i, region in enumerate(section.regions):
        material = next(m for m in section.materials if m.id == region.material)
        if material.cavity is None:
            continue
        xy = np.asarray(region.polygon, float)
        span = float(np.ptp(xy, axis=0).max()) if len(xy) else 0.0
        area = 0.5 * abs(float(np.dot(xy[:, 0], np.roll(xy[:, 1], 1))
                               - np.dot(xy[:, 1], np.roll(xy[:, 0], 1))))
        if area <= 1e-12 * max(span, 1e-300) ** 2:
            raise InvalidSection(
                f"region {i} ({material.id}) is an air cavity of zero width: its outline "
                "encloses no area (a cavity needs a width and a thickness)",
                f"/section/regions/{i}/polygon")


def face_polygon(partition, face) -> Polygon:
    rings = [partition.points[r] for r in face.rings]
    return Polygon(rings[0], rings[1:])


def _groups(partition, segments, kinds) -> list[CavityGroup]:
    """Faces of one cavity material joined where one connected opening between two of
    them is longer than SLIT (separate openings of at most SLIT each keep them apart)."""
    parent = {k: k for k, f in enumerate(partition.faces) if f.material in kinds}

    def root(k: int) -> int:
        while parent[k] != k:
            k = parent[k]
        return k

    shared: dict[tuple[int, int], list] = {}
    for (a, b), faces in segments.items():
        if len(faces) == 2 and faces[0] in parent and faces[1] in parent and \
                partition.faces[faces[0]].material == partition.faces[faces[1]].material:
            shared.setdefault((min(faces), max(faces)), []).append(
                partition.points[[a, b]].tolist())
    opening = {pair: max(part.length for part in shapely.get_parts(  # longest connected run
        shapely.line_merge(shapely.MultiLineString(pieces)))) for pair, pieces in shared.items()}
    for (f, g), length in opening.items():
        if length > SLIT:
            parent[root(f)] = root(g)
    members: dict[int, list[int]] = {}
    for k in parent:
        members.setdefault(root(k), []).append(k)
    groups = []
    for faces in sorted(members.values()):
        polygon = shapely.union_all([face_polygon(partition, partition.faces[k]) for k in faces])
        groups.append(CavityGroup(partition.faces[faces[0]].material, faces, polygon))
    return groups


def _region_shapes(section) -> np.ndarray:
    """Every region as a shapely polygon in metres (valid: the partition checked them)."""
    scale = section.scale
    return np.array([Polygon(np.asarray(r.polygon, float) * scale,
                             [np.asarray(h, float) * scale for h in r.holes])
                     for r in section.regions], dtype=object)


def _regions_of(shapes: np.ndarray, partition, group: CavityGroup) -> list[int]:
    """Indices of the regions whose visible part makes up the cavity (the top region wins)."""
    found: set[int] = set()
    for k in group.faces:
        inside = face_polygon(partition, partition.faces[k]).representative_point()
        top = np.flatnonzero(shapely.covers(shapes, inside))
        if len(top):
            found.add(int(top[-1]))
    return sorted(found) or [0]


def _check_closed(model, segments, group: CavityGroup, air: set[int], regions: list[int]) -> None:
    """A cavity must lie between solids: not exposed to an environment, and with at least one
    solid neighbour (an adiabatic cut-off or symmetry line may cut through it)."""
    section, partition = model.section, model.classified.partition
    material = section.materials[group.material]
    faces = set(group.faces)
    label = f"region {regions[0]} ({material.id})"
    pointer = f"/section/regions/{regions[0]}"
    solid_neighbour = False
    for seg, owners in segments.items():
        inside = [f for f in owners if f in faces]
        if not inside:
            continue
        others = [f for f in owners if f not in faces]
        if seg in model.classified.exposure and material.cavity.ventilation != "well_ventilated":
            env = section.boundaries[model.classified.exposure[seg]].environment
            x, y = partition.points[list(seg)].mean(axis=0)
            raise InvalidSection(
                f"{label} is an air cavity but lies open to environment '{env}' near "
                f"{where(section, x, y)}: a cavity must be closed by solids (draw the frame "
                "or wall around it, or describe an open cavity as 'well_ventilated')", pointer)
        solid_neighbour |= any(f not in air for f in others)
    if not solid_neighbour:
        raise InvalidSection(f"{label} is an air cavity with no solid around it: a cavity "
                             "is air enclosed by solid material", pointer)


def heat_flow_axis(model) -> tuple[int, str]:
    """Drawing axis (0: x, 1: y) of the heat flow and its default direction name.

    The flow runs from the exposed surfaces of the warmest environment towards those of the
    coldest; the nearer drawing axis is taken (y is taken as up in the building)."""
    partition, exposure = model.classified.partition, model.classified.exposure
    temps = model.env_temperature
    centres = {}
    for env in (int(np.argmax(temps)), int(np.argmin(temps))):
        segs = [s for s, b in exposure.items() if model.boundary_env[b] == env]
        if segs:
            a, c = partition.points[[s[0] for s in segs]], partition.points[[s[1] for s in segs]]
            weight = np.linalg.norm(c - a, axis=1) + 1e-300
            centres[env] = (0.5 * (a + c) * weight[:, None]).sum(axis=0) / weight.sum()
    if len(centres) < 2:
        return 0, "horizontal"
    flow = centres[int(np.argmin(temps))] - centres[int(np.argmax(temps))]
    if abs(flow[0]) >= abs(flow[1]):
        return 0, "horizontal"
    return 1, "upward" if flow[1] > 0 else "downward"


def equivalent_rectangle(polygon: Polygon, axis: int) -> tuple[float, float]:
    """(d, b) in m: the rectangle of the polygon's area and its bounding box's aspect ratio
    [recalled from memory, ISO 10077-2], d along drawing axis ``axis``."""
    x0, y0, x1, y1 = polygon.bounds
    along, across = (x1 - x0, y1 - y0) if axis == 0 else (y1 - y0, x1 - x0)
    area = polygon.area
    return math.sqrt(area * along / across), math.sqrt(area * across / along)


def _assign(model, group: CavityGroup, n: int, regions: list[int], axis: int,
            default_direction: str) -> dict:
    from coldseam.thermal.model import MaterialUse

    material = model.section.materials[group.material]
    cavity = material.cavity
    d, b = equivalent_rectangle(group.polygon, axis)
    direction = cavity.heat_flow_direction or default_direction
    eps1, eps2 = cavity.emissivities
    coefficients = equivalent_conductivity(d, b, direction, eps1, eps2,
                                           cavity.temperature_difference,
                                           cavity.mean_temperature, cavity.ventilation)
    lam = coefficients.conductivity
    index = len(model.materials)
    model.materials.append(MaterialUse(f"{material.id} [cavity {n}]", (lam, lam),
                                       f"cavity {n} of '{material.id}': λeq, ISO 10077-2",
                                       cavity=True))
    for k in group.faces:
        model.classified.partition.faces[k].material = index
    x, y = group.polygon.representative_point().coords[0]
    return {"material": material.id, "region": regions[0], "regions": regions,
            "cavity": n, "width": b, "thickness": d, "heat_flow_direction": direction,
            "equivalent_conductivity": lam, "convection": coefficients.convection,
            "radiation": coefficients.radiation, "ventilation": cavity.ventilation,
            "emissivity": [eps1, eps2], "area": group.polygon.area, "at": [x, y],
            "material_index": index, "_rings": rings_of(group.polygon)}


def rings_of(polygon) -> list[list[list[float]]]:
    """Every ring of a (multi)polygon, metres, for drawing."""
    return [np.round(np.asarray(ring.coords), 7).tolist()
            for part in getattr(polygon, "geoms", [polygon])
            for ring in [part.exterior, *part.interiors]]


def _settle_placeholders(model, kinds, entries: list[dict]) -> None:
    """The cavity material's own entry carries the area-weighted mean λeq of its cavities
    (still air, C1 = 0.025 W/(m·K), if none): no triangle uses it, but λ stays finite."""
    for k in kinds:
        mine = [e for e in entries if e["material"] == model.materials[k].id]
        area = sum(e["area"] for e in mine)
        lam = sum(e["area"] * e["equivalent_conductivity"] for e in mine) / area if mine else C1
        model.materials[k].conductivity = (lam, lam)
        model.materials[k].source = CAVITY_SOURCE
