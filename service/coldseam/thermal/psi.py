"""Flanking elements: U-values given or derived from a cut through the plain element.

ψ = L2D − Σ Uⱼ·lⱼ [ISO 10211]. A cut is a line from one exposed surface to another across the
layers of the plain part; U = 1/(Rsᵃ + Σ d/λ + Rsᵇ) [ISO 6946] with the design surface
resistances of the boundaries at its two ends, λ taken along the cut for orthotropic materials
(λ = λx·cx² + λy·cy² for the cut direction c).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import shapely
from shapely.geometry import LineString, Point

from coldseam.errors import InvalidSection
from coldseam.geometry.partition import where
from coldseam.schema.evaluation import Flanking
from coldseam.thermal.model import ThermalModel

GAP = 1e-6  # uncovered fraction of a cut that counts as a void


@dataclass
class Layer:
    material: int
    thickness: float  # metres along the cut
    conductivity: float  # along the cut, W/(m·K)


@dataclass
class FlankingU:
    id: str
    u_value: float  # W/(m²·K)
    length: float  # metres
    layers: list[Layer] = field(default_factory=list)
    surface_resistances: tuple[float, float] | None = None

    def dU_dlnlambda(self, materials: int) -> np.ndarray:
        """∂U/∂ln λₘ per material: U²·Σ d/λ over the cut's layers of m."""
        out = np.zeros(materials)
        for layer in self.layers:
            out[layer.material] += self.u_value ** 2 * layer.thickness / layer.conductivity
        return out


def flanking_values(model: ThermalModel) -> list[FlankingU]:
    psi = model.request.psi
    if psi is None:
        return []
    scale = model.section.scale
    out = []
    for k, element in enumerate(psi.flanking):
        if element.u_value is not None:
            out.append(FlankingU(element.id, element.u_value, element.length * scale))
        else:
            out.append(_from_cut(model, k, element))
    return out


def _from_cut(model: ThermalModel, k: int, element: Flanking) -> FlankingU:
    section, part = model.section, model.classified.partition
    pointer = f"/psi/flanking/{k}/cut"
    a, b = (np.asarray(p, float) * section.scale for p in element.cut)
    line = LineString([a, b])
    if line.length <= 0:
        raise InvalidSection(f"flanking element '{element.id}': the cut has no length", pointer)
    direction = (b - a) / line.length
    layers = []
    for face in part.faces:
        polygon = shapely.Polygon(part.points[face.rings[0]],
                                  [part.points[r] for r in face.rings[1:]])
        piece = line.intersection(polygon)
        for seg in shapely.get_parts(piece):
            if isinstance(seg, LineString) and seg.length > 0:
                start = line.project(Point(seg.coords[0]))
                layers.append((start, face.material, seg.length))
    covered = sum(t for _, _, t in layers)
    if covered < (1 - GAP) * line.length:
        raise InvalidSection(
            f"flanking element '{element.id}': the cut from {where(section, *a)} to "
            f"{where(section, *b)} leaves the section or crosses a void "
            f"({(line.length - covered) / section.scale:.4g} {section.unit} of it lies outside "
            "any region); draw it across the plain part of the element only", pointer)
    resistances = tuple(_end_resistance(model, element, p, pointer) for p in (a, b))
    lam = model.conductivities
    merged = [Layer(m, t, float(lam[m, 0] * direction[0] ** 2 + lam[m, 1] * direction[1] ** 2))
              for _, m, t in sorted(layers)]
    total = sum(resistances) + sum(layer.thickness / layer.conductivity for layer in merged)
    return FlankingU(element.id, 1.0 / total, element.length * section.scale, merged,
                     resistances)


def _end_resistance(model: ThermalModel, element: Flanking, p: np.ndarray, pointer: str):
    section, part = model.section, model.classified.partition
    tol = 1e-4 * part.extent
    for (i, j), boundary in model.classified.exposure.items():
        if LineString([part.points[i], part.points[j]]).distance(Point(p)) <= tol:
            return float(model.boundary_resistance[boundary])
    raise InvalidSection(
        f"flanking element '{element.id}': the cut must run from one exposed surface to "
        f"another, but its end at {where(section, *p)} is not on an exposed surface "
        "(it is inside the section, or on an adiabatic edge)", pointer)
