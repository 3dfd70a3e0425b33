"""The section's unit in a result: a warning when a section's size is implausible for its
declared unit, and result locations given in the section's unit beside the metres.

A building-envelope cross-section, cut-off planes included, is between about 2 cm (a window
frame detail) and 50 m across (a whole storey-high facade is far less): outside that range the
declared unit is more likely wrong than the drawing — a millimetre drawing declared ``"m"`` is
a 300 m thick wall with a U-value of 0.0003 W/(m²·K).
"""

from __future__ import annotations

from typing import Any

from coldseam.schema.section import Section

#: Plausible extent of a section (its larger bounding-box side), metres.
PLAUSIBLE_EXTENT_M = (0.02, 50.0)


def extent_m(section: Section) -> float:
    """The larger side of the section's bounding box, in metres."""
    xs = [p[0] for r in section.regions for p in r.polygon]
    ys = [p[1] for r in section.regions for p in r.polygon]
    return max(max(xs) - min(xs), max(ys) - min(ys)) * section.scale


def plausibility_warnings(section: Section) -> list[str]:
    """A warning when the section is implausibly large or small for its declared unit."""
    size = extent_m(section)
    low, high = PLAUSIBLE_EXTENT_M
    across = f"{size / section.scale:.6g} {section.unit} across"
    if section.unit != "m":
        across += f" ({size:.6g} m)"
    if size > high:
        other = " if the drawing is in millimetres, declare \"unit\": \"mm\"" if (
            section.unit == "m") else " check the unit and the coordinates"
        return [f"the section is {across}, larger than a building-envelope "
                f"section ({high:g} m at most is plausible): every figure is for a section "
                f"that size;{other} (/section/unit)"]
    if size < low:
        other = " if the coordinates are in metres, declare \"unit\": \"m\"" if (
            section.unit == "mm") else " check the unit and the coordinates"
        return [f"the section is {across}, smaller than a building-envelope "
                f"section ({low * 1000:g} mm at least is plausible):{other} (/section/unit)"]
    return []


def add_section_coordinates(result: dict[str, Any], section: Section) -> dict[str, Any]:
    """Beside every ``at`` (metres, as the contract has it) an ``at_section`` in the section's
    unit, and ``section_unit`` naming that unit."""
    scale = section.scale

    def visit(value: Any) -> None:
        if isinstance(value, dict):
            at = value.get("at")
            if isinstance(at, list) and len(at) == 2 and all(
                    isinstance(v, int | float) for v in at):
                value["at_section"] = [round(v / scale, 9) for v in at]
            for item in list(value.values()):
                visit(item)
        elif isinstance(value, list):
            for item in value:
                visit(item)

    visit(result)
    result["section_unit"] = section.unit
    return result
