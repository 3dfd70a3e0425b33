"""A printable, self-contained HTML report of one evaluation.

Inputs (materials with λ and source, environments, boundaries, flanking elements), the
picture, the results (heat flows, L2D or coupling coefficients, ψ, surface temperatures, fRsi
and verdict, mesh convergence, sensitivities), warnings and the caution. Inline CSS, the
picture embedded as a data URI (an SVG shown through ``<img>`` cannot run scripts), no
external resources. Every user string is escaped. Optional blocks that are missing are
simply left out.
"""

from __future__ import annotations

import base64
from typing import Any

from coldseam import CAUTION, ENGINE_VERSION
from coldseam.reporting.html_parts import (
    DASH,
    Html,
    as_dict,
    as_list,
    bullet_list,
    definitions,
    esc,
    is_number,
    join,
    number,
    percent,
    point,
    section,
    table,
    tag,
)
from coldseam.reporting.report_cavities import cavities_block, frame_block
from coldseam.reporting.report_dynamics import dynamics_block
from coldseam.reporting.report_results import (
    condensation_block,
    convergence_block,
    psi_block,
    results_block,
    sensitivities_block,
    verdict_badge,
)
from coldseam.reporting.report_style import CSS


def render_report(result: dict, request: dict, svg: str, transient_svg: str | None = None, *,
                  generated: str | None = None, details: dict | None = None) -> str:
    """The report as one HTML document. ``transient_svg``: the transient picture of a
    dynamic evaluation; ``generated``: an optional date line; ``details``: the title block's
    ``project``, ``author``, ``checked_by`` and ``date`` (any missing one is left as a blank
    to fill in by hand)."""
    result, request = as_dict(result), as_dict(request)
    sec = as_dict(request.get("section"))
    unit = sec.get("unit") if sec.get("unit") in ("mm", "m") else "m"
    name = str(result.get("name") or sec.get("name") or "Section")
    body = join([
        _header(name, result, generated),
        _title_block(as_dict(details)),
        tag("div", Html(tag("strong", "Caution. ") + esc(CAUTION)), class_="caution"),
        _summary(result, unit),
        _picture(svg),
        _inputs(sec, request, result),
        results_block(result, sec, unit),
        psi_block(result),
        frame_block(result),
        cavities_block(result, unit),
        condensation_block(result, unit),
        dynamics_block(result, transient_svg),
        convergence_block(result),
        sensitivities_block(result),
        section("Warnings", bullet_list(str(w) for w in as_list(result.get("warnings")))),
        _footer(result),
    ])
    return ("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
            f"<title>{esc('Coldseam report: ' + name)}</title><style>{CSS}</style></head>"
            f"<body><main>{body}</main></body></html>\n")


def _header(name: str, result: dict, generated: str | None) -> Html:
    meta = [f"Evaluation {result.get('id') or DASH}", f"engine {ENGINE_VERSION}"]
    if generated:
        meta.append(generated)
    return tag("header", join([tag("p", "Coldseam thermal-bridge evaluation", class_="kicker"),
                               tag("h1", name), tag("p", " · ".join(meta), class_="meta")]))


#: The title block's fields, in print order.
TITLE_FIELDS = (("project", "Project"), ("author", "Prepared by"), ("checked_by", "Checked by"),
                ("date", "Date"))


def _title_block(details: dict) -> Html:
    """Project, prepared by, checked by and date; a blank line for a missing one."""
    cells = join(Html(tag("dt", label) + tag("dd", details.get(key) or Html("&nbsp;"),
                                               class_=None if details.get(key) else "blank"))
                 for key, label in TITLE_FIELDS)
    return tag("dl", cells, class_="title-block")


def _summary(result: dict, unit: str) -> Html:
    psi = as_dict(result.get("psi"))
    cond = as_dict(result.get("condensation"))
    mesh = as_dict(result.get("mesh"))
    interior = [(env, block) for env, block in as_dict(result.get("surfaces")).items()
                if as_dict(block).get("side", "interior") == "interior"]
    unbounded = "not given: the heat flow is unbounded (see Mesh convergence)"
    singular = mesh.get("certified_on") == "temperatures"
    rows = [
        ("L2D", (unbounded if singular else number(result.get("L2D"), 4, "W/(m·K)"))
         if "L2D" in result else None),
        ("ψ", (unbounded if singular else number(psi.get("value"), 3, "W/(m·K)"))
         if psi else None),
        *[(f"θsi,min ({env}), design run",
           f"{number(as_dict(b).get('min_temperature'), 2, '°C')} at "
           f"{point(as_dict(b).get('at'), unit)}") for env, b in interior],
        ("fRsi", _frsi_line(cond) if cond else None),
        ("Mesh", _mesh_line(mesh) if mesh else None),
    ]
    return section("Key figures", definitions(rows), id_="summary")


def _frsi_line(cond: dict) -> Html:
    if cond.get("not_assessed"):
        return esc(f"not assessed: {cond['not_assessed']}")
    return Html(esc(number(cond.get("fRsi"), 3)) + " " + verdict_badge(cond))


def _mesh_line(mesh: dict) -> str:
    converged = {True: "converged", False: "NOT converged"}.get(mesh.get("converged"), DASH)
    if mesh.get("certified_on") == "temperatures":
        change = mesh.get("probe_change")
        tail = f", probe temperatures changed by at most {change:.4f} K on the last " \
            "refinement" if is_number(change) else ""
        return f"temperatures {converged}{tail} (the heat flow is unbounded: not certified)"
    change = mesh.get("relative_change")
    tail = f", heat flow changed by {change * 100:.3f} % on the last refinement" \
        if is_number(change) else ""
    return f"{converged}{tail}"


def _picture(svg: Any) -> Html:
    if not isinstance(svg, str) or "<svg" not in svg:
        return section("Temperature field", tag("p", "No picture is available."))
    data = base64.b64encode(svg.encode("utf-8")).decode("ascii")
    image = Html(f'<img src="data:image/svg+xml;base64,{data}" '
                 'alt="Temperature field of the section with isotherms">')
    return section("Temperature field", tag("figure", image), id_="picture")


def _inputs(sec: dict, request: dict, result: dict) -> Html:
    return section("Inputs", _materials_table(sec, result), _environments_table(sec),
                   _boundaries_table(sec), _flanking_table(request, sec),
                   _condensation_inputs(request), id_="inputs")


def _materials_table(sec: dict, result: dict) -> Html:
    """Materials with the λ the engine used and its source (the result's list, falling back
    to the request's own materials)."""
    given = {str(m.get("id")): m for m in map(as_dict, as_list(sec.get("materials")))}
    used = [as_dict(m) for m in as_list(result.get("materials"))]
    listed = {str(m.get("id")) for m in used}
    used += [m for key, m in given.items() if key not in listed]
    dynamic = bool(result.get("dynamics"))
    rows = []
    for m in used:
        own = as_dict(given.get(str(m.get("id"))))
        source = m.get("source") or (f"library: {own['library']}" if own.get("library")
                                     else "given in the request")
        lam = ("air cavity: λeq per cavity, see Air cavities" if m.get("cavity") or own.get("cavity")
               else _conductivity(m.get("conductivity", own.get("conductivity"))))
        row = [m.get("id"), lam, source, own.get("description") or ""]
        if dynamic:
            row[3:3] = [number(m.get("density"), 0), number(m.get("specific_heat"), 0),
                        m.get("capacity_source") or DASH]
        rows.append(row)
    head = ["Material", "λ W/(m·K)", "Source of λ", "Description"]
    if dynamic:
        head[3:3] = ["ρ kg/m³", "c J/(kg·K)", "Source of ρ and c"]
    return table(head, rows, "Materials")


def _conductivity(value: Any) -> str:
    if isinstance(value, list | tuple) and len(value) == 2:
        if value[0] == value[1]:
            return number(value[0], 4)
        return f"λx {number(value[0], 4)} / λy {number(value[1], 4)}"
    return number(value, 4)


def _environments_table(sec: dict) -> Html:
    rows = [[e.get("id"), e.get("side"), number(e.get("temperature"), 1, "°C")]
            for e in map(as_dict, as_list(sec.get("environments")))]
    return table(["Environment", "Side", "Temperature"], rows, "Environments")


def _boundaries_table(sec: dict) -> Html:
    unit = sec.get("unit", "")
    rows = []
    for b in map(as_dict, as_list(sec.get("boundaries"))):
        path = as_list(b.get("path"))
        ends = f"{_xy(path[0])} → {_xy(path[-1])} {unit}" if path else DASH
        rs = b.get("surface_resistance")
        rows.append([b.get("environment"),
                     "0: known surface temperature" if rs == 0 else number(rs, 3),
                     number(b.get("condensation_surface_resistance"), 3), ends, len(path)])
    return table(["Environment", "Rs m²·K/W", "Rsi for fRsi m²·K/W", "Path", "Points"], rows,
                 "Exposed surfaces (every other edge of the outline is adiabatic)")


def _xy(p: Any) -> str:
    if isinstance(p, list | tuple) and len(p) == 2 and all(is_number(v) for v in p):
        return f"({p[0]:g}, {p[1]:g})"
    return DASH


def _flanking_table(request: dict, sec: dict) -> Html:
    psi = as_dict(request.get("psi"))
    rows = []
    for f in map(as_dict, as_list(psi.get("flanking"))):
        cut = as_list(f.get("cut"))
        source = (f"U given: {number(f.get('u_value'), 4)} W/(m²·K)" if f.get("u_value")
                  else f"U from the layers on the cut {_xy(cut[0])} → {_xy(cut[-1])}"
                  if cut else DASH)
        rows.append([f.get("id"), number(f.get("length"), 1, sec.get("unit", "")), source])
    if not rows:
        return Html("")
    dims = psi.get("dimensions")
    caption = "Flanking elements" + (f" ({dims} dimensions)" if dims else "")
    return table(["Element", "Length", "U-value"], rows, caption)


def _condensation_inputs(request: dict) -> Html:
    cond = as_dict(request.get("condensation"))
    if not cond:
        return Html("")
    indoor, outdoor = as_dict(cond.get("indoor")), as_dict(cond.get("outdoor"))
    rows = [("Interior surface resistance", number(cond.get("interior_surface_resistance"), 2,
                                                   "m²·K/W")),
            ("Indoor temperature", number(indoor.get("temperature"), 1, "°C")),
            ("Indoor relative humidity", percent(indoor.get("relative_humidity"), 0)
             if indoor.get("relative_humidity") is not None else None),
            ("Humidity class (ISO 13788)", indoor.get("humidity_class")),
            ("Outdoor temperature", number(outdoor.get("temperature"), 1, "°C")),
            ("Fixed critical fRsi", number(cond.get("criterion"), 3))]
    return Html(tag("h3", "Condensation check requested") + definitions(rows))


def _footer(result: dict) -> Html:
    used = result.get("engine_version")
    engine = f"Engine {ENGINE_VERSION}"
    if used and used != ENGINE_VERSION:
        engine = f"Computed by engine {used}; report drawn by engine {ENGINE_VERSION}"
    return tag("footer", join([tag("p", f"{engine} · evaluation {result.get('id') or DASH}"),
                               tag("p", CAUTION, class_="caution-small")]))
