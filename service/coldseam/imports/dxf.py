"""DXF drawings as model-v1 sections.

Without a layer map, :func:`import_dxf` lists the drawing's layers (entity counts, closed
outlines, open paths, problems) so that a person can say what each layer is. With a layer map
(see :mod:`coldseam.imports.dxf_layers`) closed outlines on material layers become regions and
lines on environment layers become boundary paths.

>>> import io, ezdxf
>>> doc = ezdxf.new(units=4)
>>> msp = doc.modelspace()
>>> _ = msp.add_lwpolyline([(0, 0), (300, 0), (300, 1000), (0, 1000)], close=True,
...                        dxfattribs={"layer": "CONCRETE"})
>>> _ = msp.add_line((300, 0), (300, 1000), dxfattribs={"layer": "INSIDE"})
>>> _ = msp.add_line((0, 0), (0, 1000), dxfattribs={"layer": "OUTSIDE"})
>>> text = io.StringIO(); doc.write(text)
>>> out = import_dxf(text.getvalue().encode(), {
...     "CONCRETE": {"material": "concrete", "conductivity": 2.3},
...     "INSIDE": {"environment": "in", "temperature": 20, "side": "interior",
...                "surface_resistance": 0.13},
...     "OUTSIDE": {"environment": "out", "temperature": 0, "side": "exterior",
...                 "surface_resistance": 0.04}}, None)
>>> out["section"]["unit"], len(out["section"]["regions"]), len(out["section"]["boundaries"])
('mm', 1, 2)
"""

from __future__ import annotations

import io
import logging
import struct
from collections import Counter
from typing import Any

import ezdxf
from ezdxf import recover
from ezdxf.document import Drawing
from ezdxf.filemanagement import dxf_stream_info
from ezdxf.lldxf.const import DXFError
from ezdxf.lldxf.tagger import binary_tags_loader

from coldseam import climate
from coldseam.errors import InvalidSection
from coldseam.imports.dxf_entities import DxfLimits, Shape, _Budget, iter_layer_entities, shapes_of
from coldseam.imports.dxf_layers import EnvironmentLayer, IgnoreLayer, parse_layer_map
from coldseam.imports.dxf_section import build_section
from coldseam.imports.dxf_shapes import (
    LayerGeometry,
    Ruler,
    Tolerance,
    assemble,
    describe_open,
    looks_unclosed,
)
from coldseam.imports.dxf_units import UNIT_MM, resolve_unit, size_warning
from coldseam.schema import parse_request

logger = logging.getLogger(__name__)

#: Chord error of tessellated arcs and circles, in mm.
CHORD_MM = 0.05
#: What ezdxf raises on damaged input: its own errors and the Python errors its parsers let
#: through on truncated or scrambled bytes (found by fuzzing truncated and altered files).
_READ_ERRORS = (DXFError, ValueError, TypeError, LookupError, AttributeError, AssertionError,
                StopIteration, struct.error, EOFError, RecursionError, OverflowError)
_ENTITY_ERRORS = (DXFError, ValueError, TypeError, IndexError, ZeroDivisionError, OverflowError,
                  RecursionError)  # ezdxf's flattening recurses on degenerate ellipses
_BINARY_SENTINEL = b"AutoCAD Binary DXF\r\n\x1a\x00"


def import_dxf(data: bytes, layer_map: dict | None = None, unit: str | None = None, *,
               name: str | None = None, gap_tolerance: float = 0.1,
               limits: DxfLimits | None = None) -> dict[str, Any]:
    """Read a DXF drawing (ASCII or binary) into a layer summary or a section.

    ``unit`` ("mm", "m", "cm" or "in") overrides the drawing's $INSUNITS; cm and inches are
    converted to mm. ``gap_tolerance`` (mm): outline gaps up to it are closed with a warning.
    Returns ``{"layers", "unit", "needs_mapping": True, "warnings"}`` without a layer map, and
    ``{"section", "warnings", "layers", "needs_mapping": False}`` with one.
    Raises InvalidSection (unreadable file, unit unknown, open outlines on material layers,
    bad layer map) and LimitExceeded (too many entities or vertices, blocks nested too deep).
    """
    doc = read_drawing(data)
    rules = parse_layer_map(layer_map) if layer_map is not None else None
    drawing_unit, notes = resolve_unit(doc, unit, required=rules is not None)
    mm_per_unit, ruler = _ruler(drawing_unit)
    budget = _Budget(limits or DxfLimits())
    shapes, counts = _collect(doc, budget, CHORD_MM / mm_per_unit)
    tol = _tolerance(shapes, gap_tolerance / mm_per_unit)
    geometry = {layer: assemble(s, tol, ruler, fill=_fills(layer, rules))
                for layer, s in shapes.items()}
    notes += size_warning(shapes, ruler)
    summary = [_layer_summary(layer, counts[layer], geometry.get(layer), ruler, rules)
               for layer in counts]
    if rules is None:
        return {"layers": summary, "unit": ruler.unit if drawing_unit else None,
                "needs_mapping": True, "warnings": notes, "climate": climate.defaults()}
    mapped = {k: g for k, g in geometry.items() if _role(k, rules) in ("material", "environment")}
    section, warnings = build_section(mapped, rules, ruler, 6 if ruler.unit == "mm" else 9)
    if name:
        section = {"name": name[:200], **section}
    warnings = notes + _mapping_warnings(counts, rules, budget) + warnings
    parse_request({"section": section})
    return {"section": section, "warnings": warnings, "layers": summary, "needs_mapping": False}


def read_drawing(data: bytes) -> Drawing:
    """The drawing in ``data``; InvalidSection (field /file) when it is not a readable DXF."""
    if not isinstance(data, bytes | bytearray) or not bytes(data).strip():
        raise InvalidSection("the file is empty", "/file")
    data = bytes(data)
    if data[:4] in (b"AC10", b"AC15", b"AC18", b"AC21", b"AC24", b"AC27", b"AC32"):
        raise InvalidSection("this is a DWG file, not DXF: save or export the drawing as DXF",
                             "/file")
    try:
        doc = _load(data)
    except _READ_ERRORS as exc:
        detail = str(exc)[:120]
        raise InvalidSection(f"the file is not a readable DXF drawing (ASCII or binary DXF "
                             f"expected): {detail}", "/file") from None
    if len(doc.modelspace()) == 0:
        raise InvalidSection("the drawing has no entities in model space (is the file "
                             "truncated, or is the detail drawn in a paper-space layout?)",
                             "/file")
    return doc


def _load(data: bytes) -> Drawing:
    if data.startswith(_BINARY_SENTINEL):
        doc = Drawing.load(binary_tags_loader(data))
        doc.audit()
        return doc
    if data[:2] in (b"\xff\xfe", b"\xfe\xff"):
        return ezdxf.read(io.StringIO(data.decode("utf-16")))
    data = data.removeprefix(b"\xef\xbb\xbf")
    try:  # the strict loader is twice as fast; damaged files go to the recovering one
        info = dxf_stream_info(io.StringIO(data.decode("utf-8", errors="ignore")))
        return ezdxf.read(io.StringIO(data.decode(info.encoding, errors="surrogateescape")))
    except _READ_ERRORS as exc:
        logger.info("strict DXF read failed (%s); recovering", str(exc)[:80])
    doc, auditor = recover.read(io.BytesIO(data))
    if auditor.has_errors:
        logger.info("DXF read with %d recovered errors", len(auditor.errors))
    return doc


def _ruler(drawing_unit: str | None) -> tuple[float, Ruler]:
    if drawing_unit is None:
        return 1.0, Ruler(1.0, "drawing units")
    mm = UNIT_MM[drawing_unit]
    if drawing_unit == "m":
        return mm, Ruler(1.0, "m")
    return mm, Ruler(mm, "mm")


def _collect(doc: Drawing, budget: _Budget, chord: float) -> tuple[dict[str, list[Shape]],
                                                                    dict[str, Counter]]:
    shapes: dict[str, list[Shape]] = {}
    counts: dict[str, Counter] = {}
    entities = iter_layer_entities(iter(doc.modelspace().entities_in_redraw_order()), budget)
    try:
        for index, (layer, entity) in enumerate(entities):
            counts.setdefault(layer, Counter())[entity.dxftype()] += 1
            try:
                found = shapes_of(entity, layer, index, chord, budget)
            except _ENTITY_ERRORS as exc:
                raise InvalidSection(f"layer {layer}: a {entity.dxftype()} entity (handle "
                                     f"{entity.dxf.get('handle', '?')}) cannot be read: "
                                     f"{str(exc)[:120]}", "/file") from None
            shapes.setdefault(layer, []).extend(found)
    except _ENTITY_ERRORS as exc:  # a damaged block reference, while exploding it
        raise InvalidSection(f"an entity of the drawing cannot be read: {str(exc)[:120]}",
                             "/file") from None
    return shapes, counts


def _tolerance(shapes: dict[str, list[Shape]], gap: float) -> Tolerance:
    xs = [p[0] for s in shapes.values() for shape in s for p in shape.points]
    ys = [p[1] for s in shapes.values() for shape in s for p in shape.points]
    extent = max(max(xs) - min(xs), max(ys) - min(ys)) if xs else 1.0
    coincident = max(1e-9 * extent, 1e-12)
    return Tolerance(coincident, max(gap, coincident))


def _role(layer: str, rules: dict | None) -> str:
    if rules is None or layer.casefold() not in rules:
        return "unmapped"
    rule = rules[layer.casefold()][1]
    if isinstance(rule, IgnoreLayer):
        return "ignored"
    return "environment" if isinstance(rule, EnvironmentLayer) else "material"


def _fills(layer: str, rules: dict | None) -> bool:
    return _role(layer, rules) != "environment"


def _layer_summary(layer: str, counts: Counter, geo: LayerGeometry | None, ruler: Ruler,
                   rules: dict | None) -> dict[str, Any]:
    geo = geo or LayerGeometry()
    entry: dict[str, Any] = {
        "name": layer,
        "entity_counts": dict(sorted(counts.items())),
        "closed_shapes": len(geo.loops),
        "open_paths": len(geo.open_paths),
        "problems": [describe_open(p, ruler) for p in geo.open_paths if looks_unclosed(p)][:5],
    }
    if rules is not None:
        entry["role"] = _role(layer, rules)
    return entry


def _mapping_warnings(counts: dict[str, Counter], rules: dict, budget: _Budget) -> list[str]:
    warnings = []
    unmapped = [f"{layer} ({_entities(sum(c.values()))})" for layer, c in counts.items()
                if _role(layer, rules) == "unmapped"]
    if unmapped:
        warnings.append("layers not in the layer map were ignored: " + ", ".join(unmapped))
    present = {layer.casefold() for layer in counts}
    warnings.extend(f"layer map names layer {name}, which the drawing does not have"
                    for key, (name, rule) in rules.items()
                    if key not in present and not isinstance(rule, EnvironmentLayer))
    skipped: dict[str, list[str]] = {}
    for (layer, kind), n in budget.skipped.items():
        if _role(layer, rules) in ("material", "environment"):
            skipped.setdefault(layer, []).append(f"{n} {kind}")
    warnings.extend(f"layer {layer}: ignored {', '.join(kinds)} (no outline to take)"
                    for layer, kinds in skipped.items())
    return warnings


def _entities(n: int) -> str:
    return f"{n} entity" if n == 1 else f"{n} entities"
