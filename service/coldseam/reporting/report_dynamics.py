"""The dynamics section of the report: the ISO 13786 periodic figures per metre of junction,
the slowest time constants and the transient picture with its extremes."""

from __future__ import annotations

import base64
from typing import Any

from coldseam.reporting.html_parts import (
    DASH,
    Html,
    as_dict,
    as_list,
    definitions,
    join,
    number,
    section,
    table,
    tag,
)


def periodic_rows(periodic: dict) -> list[list[Any]]:
    """One row per figure: name, environments, modulus with its unit, time shift."""
    rows = []
    for pair, entry in as_dict(periodic.get("coupling")).items():
        entry = as_dict(entry)
        rows.append(["Periodic coupling", pair.replace("|", " → "),
                     number(entry.get("modulus"), 4, "W/(m·K)"),
                     number(entry.get("time_shift_hours"), 2, "h")])
    for pair, value in as_dict(periodic.get("decrement_factor")).items():
        rows.append(["Decrement factor", pair.replace("|", " → "), number(value, 3), DASH])
    for env, entry in as_dict(periodic.get("admittance")).items():
        entry = as_dict(entry)
        rows.append(["Admittance", env, number(entry.get("modulus"), 3, "W/(m·K)"),
                     number(entry.get("time_shift_hours"), 2, "h")])
    for env, value in as_dict(periodic.get("heat_capacity")).items():
        kilo = value / 1000 if isinstance(value, int | float) else None
        rows.append(["Heat capacity", env, number(kilo, 1, "kJ/(m·K)"), DASH])
    return rows


def _transient_summary(result: dict) -> Html:
    block = as_dict(as_dict(result.get("dynamics")).get("transient"))
    surfaces = as_dict(block.get("condensation_min_surface_temperature")
                       or block.get("min_surface_temperature"))
    dew = as_dict(result.get("condensation")).get("dew_point")
    hours = as_list(block.get("times_hours"))
    rows = []
    for env, series in surfaces.items():
        values = [v for v in as_list(series) if isinstance(v, int | float)]
        if not values:
            continue
        rows.append((f"Lowest surface temperature, {env}", number(min(values), 2, "°C")))
        if isinstance(dew, int | float) and len(hours) > 1:
            below = sum(1 for v in values if v < dew)
            rows.append((f"Series times at or below the dew point ({number(dew, 1, '°C')}), {env}",
                         f"{below} of {len(values)}"))
    return definitions(rows)


def dynamics_block(result: dict, transient_svg: str | None) -> Html:
    dynamics = as_dict(result.get("dynamics"))
    if not dynamics:
        return Html("")
    periodic = as_dict(dynamics.get("periodic"))
    parts = []
    if periodic:
        caption = (f"Periodic figures at a period of {number(periodic.get('period_hours'), 1)} h "
                   "(ISO 13786, per metre of junction; time shift: lag behind the cause)")
        parts.append(table(["Figure", "Environments", "Value", "Time shift"],
                           periodic_rows(periodic), caption))
    taus = as_list(dynamics.get("time_constants_hours"))
    if taus:
        parts.append(definitions([("Slowest time constants",
                                   ", ".join(number(t, 2, "h") for t in taus))]))
    if transient_svg and "<svg" in transient_svg:
        data = base64.b64encode(transient_svg.encode("utf-8")).decode("ascii")
        parts.append(tag("figure", Html(f'<img src="data:image/svg+xml;base64,{data}" '
                                        'alt="Transient surface temperatures and heat flows">')))
        parts.append(_transient_summary(result))
    certificate = as_dict(dynamics.get("certificate"))
    if certificate:
        change = certificate.get("relative_change")
        parts.append(definitions([("Dynamic figures, last refinement",
                                   f"changed by {number(change * 100 if isinstance(change, float) else None, 3, '%')}"
                                   f" (target {number(certificate.get('target', 0) * 100, 2, '%')})")]))
    return section("Dynamic behaviour", join(parts), id_="dynamics")
