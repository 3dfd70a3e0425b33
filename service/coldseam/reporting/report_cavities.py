"""The report's air-cavity and frame blocks: every cavity with its extent and λeq, and U_f of
the calibration-panel method. Empty markup when the result has neither."""

from __future__ import annotations

from coldseam.reporting.html_parts import (
    Html,
    as_dict,
    as_list,
    definitions,
    number,
    point,
    section,
    table,
)

VENTILATION = {"unventilated": "unventilated", "slightly_ventilated": "slightly ventilated",
               "well_ventilated": "well ventilated"}


def cavities_block(result: dict, unit: str) -> Html:
    """One row per cavity: material, region, b × d, direction, ha, hr, λeq (ISO 10077-2)."""
    rows = [_row(c, unit) for c in map(as_dict, as_list(result.get("cavities")))]
    if not rows:
        return Html("")
    return section("Air cavities", table(
        ["Material", "Region", "b mm", "d mm", "Heat flow", "Ventilation", "ha W/(m²·K)",
         "hr W/(m²·K)", "λeq W/(m·K)", "at"], rows,
        "Equivalent conductivity λeq = d·(ha + hr) of each cavity (ISO 10077-2; b across, "
        "d along the heat flow, of the equivalent rectangle)"), id_="cavities")


def _row(c: dict, unit: str) -> list:
    vent = VENTILATION.get(str(c.get("ventilation")), c.get("ventilation"))
    if c.get("equivalent_conductivity") is None:
        lam = (f"open air: exposed to {c.get('exposed_to')}, "
               f"Rs {number(c.get('surface_resistance'), 3)} m²·K/W")
    else:
        lam = number(c.get("equivalent_conductivity"), 4)
    return [c.get("material"), c.get("region"), _mm(c.get("width")), _mm(c.get("thickness")),
            c.get("heat_flow_direction"), vent, number(c.get("convection"), 3),
            number(c.get("radiation"), 3), lam, point(c.get("at"), unit)]


def _mm(value) -> str | None:
    return number(value * 1000, 1) if isinstance(value, int | float) else None


def frame_block(result: dict) -> Html:
    """U_f = (L2D − U_p·b_p)/b_f with its terms."""
    frame = as_dict(as_dict(result.get("psi")).get("frame"))
    if not frame:
        return Html("")
    panel = as_dict(frame.get("panel"))
    return section("Frame U-value (calibration panel)", definitions([
        ("U_f", number(frame.get("u_frame"), 4, "W/(m²·K)")),
        ("L2D", number(frame.get("L2D"), 4, "W/(m·K)")),
        ("Panel U_p · b_p", f"{number(panel.get('u_value'), 4)} W/(m²·K) × "
                           f"{number(panel.get('width'), 4)} m = {number(panel.get('UL'), 4)} "
                           "W/(m·K)"),
        ("Frame width b_f", number(frame.get("frame_width"), 4, "m")),
        ("Method", "U_f = (L2D − U_p·b_p)/b_f, ISO 10077-2"),
    ]), id_="frame")
