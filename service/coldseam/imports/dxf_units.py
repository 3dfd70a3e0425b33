"""The unit of a DXF drawing: the caller's word, else the drawing's $INSUNITS.

A unit is never guessed: a drawing in mm read as metres is the classic silent 1000x error.
Centimetres, decimetres, feet and inches are converted to mm, with a note.
"""

from __future__ import annotations

from ezdxf.document import Drawing

from coldseam.errors import InvalidSection
from coldseam.imports.dxf_entities import Shape
from coldseam.imports.dxf_shapes import Ruler

#: Millimetres per drawing unit, for the units Coldseam reads.
UNIT_MM = {"mm": 1.0, "cm": 10.0, "dm": 100.0, "m": 1000.0, "in": 25.4, "ft": 304.8}
#: $INSUNITS codes of the DXF reference, for the units above.
INSUNITS = {1: "in", 2: "ft", 4: "mm", 5: "cm", 6: "m", 14: "dm"}
_INSUNITS_NAMES = {3: "miles", 7: "kilometres", 8: "microinches", 9: "mils", 10: "yards",
                   11: "angstroms", 12: "nanometres", 13: "microns", 15: "decametres",
                   16: "hectometres", 17: "gigametres", 18: "astronomical units",
                   19: "light years", 20: "parsecs"}
_ALIASES = {"inch": "in", "inches": "in", "millimetre": "mm", "millimeter": "mm",
            "metre": "m", "meter": "m", "centimetre": "cm", "centimeter": "cm"}
_UNSTATED = ("the drawing does not state its unit ($INSUNITS is unset or 'unitless'): give "
             "the unit its coordinates are in, mm or m (a drawing in mm read as metres is a "
             "silent 1000x error)")
#: A section drawn in the stated unit should be between these sizes (in mm) across.
PLAUSIBLE_MM = (10.0, 50_000.0)


def resolve_unit(doc: Drawing, unit: str | None, required: bool) -> tuple[str | None, list[str]]:
    """The drawing unit (a key of UNIT_MM, or None when unknown and not required) and notes."""
    code = doc.header.get("$INSUNITS", 0)
    stated = INSUNITS.get(code)
    if unit is not None:
        chosen = _ALIASES.get(str(unit).strip().lower(), str(unit).strip().lower())
        if chosen not in UNIT_MM:
            raise InvalidSection(f"unit '{unit}' is not one Coldseam reads: give mm, m, cm "
                                 "or in", "/unit")
        notes = []
        named = stated or _INSUNITS_NAMES.get(code)
        if named is not None and named != chosen:
            notes.append(f"the drawing states its unit as {named} ($INSUNITS); its "
                         f"coordinates were read in {chosen} as requested")
        return chosen, notes + _conversion(chosen)
    if code in _INSUNITS_NAMES:
        raise InvalidSection(f"the drawing states its unit as {_INSUNITS_NAMES[code]} "
                             "($INSUNITS), which Coldseam does not read: give the unit "
                             "(mm, m, cm or in)", "/unit")
    if stated is None:
        if required:
            raise InvalidSection(_UNSTATED, "/unit")
        return None, []
    return stated, _conversion(stated)


def size_warning(shapes: dict[str, list[Shape]], ruler: Ruler) -> list[str]:
    """A warning when the drawing is implausibly small or large in the unit it was read in."""
    xs = [p[0] for s in shapes.values() for shape in s for p in shape.points]
    ys = [p[1] for s in shapes.values() for shape in s for p in shape.points]
    if not xs or ruler.unit not in ("mm", "m"):
        return []
    extent = max(max(xs) - min(xs), max(ys) - min(ys)) * ruler.factor
    extent_mm = extent * (1000.0 if ruler.unit == "m" else 1.0)
    if extent_mm < PLAUSIBLE_MM[0]:
        hint = "if it was drawn in metres, give the unit m"
    elif extent_mm > PLAUSIBLE_MM[1]:
        hint = "if it was drawn in millimetres, give the unit mm"
    else:
        return []
    return [f"the drawing is {extent:.4g} {ruler.unit} across, an unusual size "
            f"for a junction detail: {hint}"]


def _conversion(unit: str) -> list[str]:
    if unit in ("mm", "m"):
        return []
    return [f"coordinates converted from {unit} to mm"]
