"""Assembled layer geometry and a layer map as a model-v1 section.

Regions keep the painter's rule of the contract: they are listed by the ``order`` of their
layer, then in drawing order, so what was drawn last (or ordered higher) wins where regions
overlap. A region that later ones cover completely is reported: usually a small part drawn
before the large one around it, which needs a higher ``order``.
"""

from __future__ import annotations

from typing import Any

from shapely import Polygon, STRtree, unary_union

from coldseam.errors import InvalidSection
from coldseam.imports.dxf_layers import (
    EnvironmentLayer,
    LayerRule,
    MaterialLayer,
    environments_of,
    layer_pointer,
    materials_of,
)
from coldseam.imports.dxf_regions import RegionDraft, nest
from coldseam.imports.dxf_shapes import LayerGeometry, Ruler, describe_open

#: Share of a region's area that may stay visible for it to count as covered.
COVERED_SHARE = 1e-6
#: Regions beyond this count are not checked for being covered (the check is quadratic).
COVER_CHECK_LIMIT = 3000


def build_section(geometry: dict[str, LayerGeometry], rules: dict[str, tuple[str, LayerRule]],
                  ruler: Ruler, digits: int) -> tuple[dict[str, Any], list[str]]:
    """The section dict and warnings; InvalidSection when layers do not make a section."""
    warnings: list[str] = []
    drafts: list[tuple[int, RegionDraft]] = []
    boundaries: list[dict[str, Any]] = []
    for layer, geo in geometry.items():
        rule = rules[layer.casefold()][1]
        if isinstance(rule, MaterialLayer):
            _refuse_open(layer, geo, ruler)
            regions, notes = nest(layer, geo.loops, ruler, layer_pointer(layer))
            drafts.extend((rule.order, r) for r in regions)
        elif isinstance(rule, EnvironmentLayer):
            boundaries.extend(_boundaries(layer, geo, rule, ruler, digits))
            notes = []
        else:
            continue
        warnings.extend(f"layer {layer}: {note}" for note in geo.notes + notes)
    drafts.sort(key=lambda item: (item[0], item[1].index))
    ordered = [d for _, d in drafts]
    warnings.extend(covered_regions(ordered, ruler))
    regions = [_region(d, rules, ruler, digits) for d in ordered]
    _require(regions, boundaries, rules, geometry)
    section = {
        "unit": ruler.unit,
        "materials": materials_of(rules, {r["material"] for r in regions}),
        "regions": regions,
        "environments": environments_of(rules, {b["environment"] for b in boundaries}),
        "boundaries": boundaries,
    }
    return section, warnings


def _refuse_open(layer: str, geo: LayerGeometry, ruler: Ruler) -> None:
    if not geo.open_paths:
        return
    listed = "; ".join(describe_open(p, ruler) for p in geo.open_paths[:5])
    more = f" (and {len(geo.open_paths) - 5} more)" if len(geo.open_paths) > 5 else ""
    raise InvalidSection(
        f"layer {layer}: {listed}{more}. A material layer needs closed outlines: close them "
        "in the drawing, or move stray lines to a layer mapped to {\"ignore\": true}",
        layer_pointer(layer),
    )


def _boundaries(layer: str, geo: LayerGeometry, rule: EnvironmentLayer, ruler: Ruler,
                digits: int) -> list[dict[str, Any]]:
    paths = [p.points for p in geo.open_paths] + [p.points + p.points[:1] for p in geo.loops]
    out = []
    for points in paths:
        entry: dict[str, Any] = {"environment": rule.environment,
                                 "surface_resistance": rule.resistance,
                                 "path": _coords(points, ruler, digits)}
        if rule.condensation_surface_resistance is not None:
            entry["condensation_surface_resistance"] = rule.condensation_surface_resistance
        out.append(entry)
    return out


def _region(draft: RegionDraft, rules: dict[str, tuple[str, LayerRule]], ruler: Ruler,
            digits: int) -> dict[str, Any]:
    rule = rules[draft.layer.casefold()][1]
    assert isinstance(rule, MaterialLayer)
    region: dict[str, Any] = {"material": rule.material,
                              "polygon": _coords(draft.polygon, ruler, digits)}
    if draft.holes:
        region["holes"] = [_coords(h, ruler, digits) for h in draft.holes]
    return region


def covered_regions(drafts: list[RegionDraft], ruler: Ruler) -> list[str]:
    """Warnings for regions that the regions after them hide completely."""
    if len(drafts) > COVER_CHECK_LIMIT:
        return []
    polygons = [Polygon(d.polygon, d.holes) for d in drafts]
    tree = STRtree(polygons)
    warnings = []
    for i, poly in enumerate(polygons):
        later = [int(j) for j in tree.query(poly) if j > i]
        if not later:
            continue
        cover = unary_union([polygons[j] for j in later])
        if poly.difference(cover).area <= COVERED_SHARE * poly.area:
            above = sorted({drafts[j].layer for j in later})
            warnings.append(
                f"layer {drafts[i].layer}: the region starting at "
                f"{ruler.point(drafts[i].polygon[0])} is hidden entirely by regions drawn after "
                f"it (layer {', '.join(above)}); give layer {drafts[i].layer} a higher "
                "\"order\" if it should lie on top")
    return warnings


def _require(regions: list, boundaries: list, rules: dict[str, tuple[str, LayerRule]],
             geometry: dict[str, LayerGeometry]) -> None:
    if not regions:
        raise InvalidSection("no material layer holds a closed outline: map at least one "
                             "layer with closed polylines, circles or hatches to a material",
                             "/layer_map")
    if not boundaries:
        raise InvalidSection("no environment layer holds a line: map the layers with the "
                             "exposed surfaces (lines along the inside and outside faces) to "
                             "environments", "/layer_map")
    present = {layer.casefold() for layer in geometry}
    used = {b["environment"] for b in boundaries}
    for key, (name, rule) in rules.items():
        if isinstance(rule, EnvironmentLayer) and rule.environment not in used:
            state = "holds no lines" if key in present else "is not in the drawing"
            raise InvalidSection(f"layer {name} stands for environment '{rule.environment}' "
                                 f"but {state}", layer_pointer(name))


def _coords(points: list, ruler: Ruler, digits: int) -> list[list[float]]:
    f = ruler.factor
    return [[round(x * f, digits), round(y * f, digits)] for x, y in points]
