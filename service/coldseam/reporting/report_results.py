"""The result blocks of the report: heat flows, coupling, ψ, condensation, convergence,
sensitivities. Each returns empty markup when its block is missing from the result."""

from __future__ import annotations

import math
from typing import Any

from coldseam.reporting.html_parts import (
    DASH,
    Html,
    as_dict,
    as_list,
    bullet_list,
    definitions,
    esc,
    is_number,
    number,
    percent,
    point,
    section,
    table,
    tag,
)


def results_block(result: dict, sec: dict, unit: str) -> Html:
    """Heat flows, L2D or the coupling matrix, surface temperatures and probes."""
    sides = {str(e.get("id")): e for e in map(as_dict, as_list(sec.get("environments")))}
    flows = as_dict(result.get("heat_flows"))
    rows = [[env, as_dict(sides.get(str(env))).get("side", DASH),
             number(as_dict(sides.get(str(env))).get("temperature"), 1, "°C"),
             number(q, 3, "W/m")] for env, q in flows.items()]
    if rows and all(is_number(q) for q in flows.values()):
        rows.append(["Balance (sum, ideally 0)", "", "", number(sum(flows.values()), 4, "W/m")])
    parts = [table(["Environment", "Side", "θ", "Heat flow into the section"], rows,
                   "Heat flows per metre of junction") if rows else "",
             definitions([("L2D (thermal coupling coefficient)",
                           number(result.get("L2D"), 4, "W/(m·K)") if "L2D" in result
                           else None)]),
             _coupling(as_dict(result.get("coupling_coefficients"))),
             _surfaces(as_dict(result.get("surfaces")), unit),
             _probes(as_dict(result.get("probes")))]
    return section("Results", *parts, id_="results")


def _coupling(block: dict) -> Html:
    envs, matrix = as_list(block.get("environments")), as_list(block.get("matrix"))
    if not envs or len(matrix) != len(envs):
        return Html("")
    rows = [[env, *[number(v, 4) for v in as_list(row)]]
            for env, row in zip(envs, matrix, strict=True)]
    return table(["Lij W/(m·K)", *envs], rows,
                 "Coupling coefficients (ISO 10211): Φij = Lij·(θi − θj)")


def _surfaces(surfaces: dict, unit: str) -> Html:
    rows = [[env, b.get("side", DASH), number(b.get("min_temperature"), 2, "°C"),
             point(b.get("at"), unit), number(b.get("max_temperature"), 2, "°C")]
            for env, b in ((e, as_dict(v)) for e, v in surfaces.items())]
    return table(["Surface", "Side", "Minimum θs", "at", "Maximum θs"], rows,
                 "Surface temperatures, design run") if rows else Html("")


def _probes(probes: dict) -> Html:
    rows = [[probe, number(theta, 2, "°C")] for probe, theta in probes.items()]
    return table(["Probe", "θ"], rows, "Probe temperatures") if rows else Html("")


def psi_block(result: dict) -> Html:
    """ψ = L2D − Σ Uj·lj with each flanking element's U, length and U·l."""
    psi = as_dict(result.get("psi"))
    if not psi:
        return Html("")
    envs = as_list(psi.get("environments"))
    summary = definitions([
        ("ψ (linear thermal transmittance)", number(psi.get("value"), 4, "W/(m·K)")),
        ("L2D", number(psi.get("L2D"), 4, "W/(m·K)")),
        ("Σ Uj·lj", number(psi.get("sum_UL"), 4, "W/(m·K)")),
        ("Dimension system", psi.get("dimensions")),
        ("Between", " and ".join(str(e) for e in envs) if envs else None),
    ])
    rows = [[f.get("id"), number(f.get("u_value"), 4), number(f.get("length"), 3),
             number(f.get("UL"), 4), f.get("source") or "", _layers(f.get("layers"))]
            for f in map(as_dict, as_list(psi.get("flanking")))]
    flanking = table(["Flanking element", "U W/(m²·K)", "l m", "U·l W/(m·K)", "Source",
                      "Layers on the cut"], rows, "Flanking elements") if rows else ""
    return section("Linear thermal transmittance ψ", summary, flanking, id_="psi")


def _layers(layers: Any) -> Html:
    items = [f"{esc(layer.get('material'))}: d = {esc(number(layer.get('thickness'), 4))} m, "
             f"λ = {esc(_lam(layer.get('conductivity')))} W/(m·K)"
             for layer in map(as_dict, as_list(layers))]
    return Html("<br>".join(items))


def _lam(value: Any) -> str:
    if isinstance(value, list | tuple) and value:
        return " / ".join(number(v, 4) for v in value)
    return number(value, 4)


def condensation_block(result: dict, unit: str) -> Html:
    """fRsi against the critical value, the verdict and margin, and the climate used."""
    c = as_dict(result.get("condensation"))
    if not c:
        return Html("")
    if c.get("not_assessed"):
        return section("Surface condensation and mould (ISO 13788)",
                       tag("p", f"Not assessed: {c['not_assessed']}."), id_="condensation")
    figures = definitions([
        ("fRsi", number(c.get("fRsi"), 3)),
        ("fRsi,critical", number(c.get("fRsi_critical"), 3)),
        ("Verdict", Html(verdict_badge(c) + esc(_margin(c)))),
        ("Criterion", c.get("criterion")),
        ("θsi,min (fRsi run)", number(c.get("min_temperature"), 2, "°C")),
        ("at", point(c.get("at"), unit) if c.get("at") is not None else None),
        ("Interior surface resistance", number(c.get("interior_surface_resistance"), 2,
                                               "m²·K/W")),
        ("Indoor / outdoor temperature", _pair(c.get("indoor_temperature"),
                                               c.get("outdoor_temperature"))),
        ("Indoor relative humidity", percent(c.get("indoor_relative_humidity"), 0)
         if c.get("indoor_relative_humidity") is not None else None),
        ("Dew point", number(c.get("dew_point"), 2, "°C")),
        ("θsi required", number(c.get("min_temperature_required"), 2, "°C")),
    ])
    weights = as_dict(c.get("temperature_weighting"))
    weighting = table(["Environment", "Weighting factor g"],
                      [[env, number(g, 4)] for env, g in weights.items()],
                      "Temperature weighting factors (θsi = Σ gj·θj)") if weights else ""
    notes = bullet_list(str(a) for a in as_list(c.get("assumptions")))
    return section("Surface condensation and mould (ISO 13788)", figures, weighting,
                   Html(tag("h3", "Assumptions") + notes) if notes else "", id_="condensation")


def verdict_badge(block: dict) -> Html:
    verdict = block.get("verdict")
    if verdict not in ("pass", "fail"):
        return esc(verdict if verdict is not None else DASH)
    return tag("span", verdict.upper(), class_=f"badge {verdict}")


def _margin(c: dict) -> str:
    margin = c.get("margin")
    return f" (margin {margin:+.3f} on fRsi)".replace("-", "−") if is_number(margin) else ""


def _pair(a: Any, b: Any) -> str | None:
    if a is None and b is None:
        return None
    return f"{number(a, 1, '°C')} / {number(b, 1, '°C')}"


def convergence_block(result: dict) -> Html:
    """The mesh-convergence certificate: final mesh and the table of refinement levels (on
    temperatures when the heat flow is unbounded)."""
    mesh = as_dict(result.get("mesh"))
    if not mesh:
        return Html("")
    if mesh.get("certified_on") == "temperatures":
        return _temperature_certificate(mesh)
    summary = definitions([
        ("Element", mesh.get("element")),
        ("Nodes / elements", f"{mesh.get('nodes', DASH)} / {mesh.get('elements', DASH)}"),
        ("Unknowns", mesh.get("dofs")),
        ("Heat-flow change on the last refinement", percent(mesh.get("relative_change"))),
        ("Converged", {True: "yes", False: "NO"}.get(mesh.get("converged"))),
    ])
    rows = [[level.get("nodes", DASH), level.get("elements", DASH),
             number(level.get("heat_flow"), 4), number(level.get("psi"), 4),
             number(level.get("min_temperature"), 3), percent(level.get("relative_change")),
             number(level.get("temperature_change"), 4)]
            for level in map(as_dict, as_list(mesh.get("levels")))]
    levels = table(["Nodes", "Elements", "Heat flow W/m", "ψ W/(m·K)", "θsi,min °C",
                    "Change of heat flow", "Change of θsi,min K"], rows,
                   "Refinement levels (ISO 10211 asks for a change under 1 %)") if rows else ""
    return section("Mesh convergence", summary, levels, id_="convergence")


def _temperature_certificate(mesh: dict) -> Html:
    singular = as_dict(mesh.get("heat_flow_singular"))
    target = as_dict(mesh.get("target")).get("temperature_change")
    summary = definitions([
        ("Certified on", "temperatures (probes and surface minima)"),
        ("Why", singular.get("reason")),
        ("Element", mesh.get("element")),
        ("Nodes / elements", f"{mesh.get('nodes', DASH)} / {mesh.get('elements', DASH)}"),
        ("Largest probe change on the last refinement", number(mesh.get("probe_change"), 4,
                                                               "K")),
        ("Target", number(target, 3, "K") if is_number(target) else None),
        ("Converged", {True: "yes", False: "NO"}.get(mesh.get("converged"))),
    ])
    rows = [[level.get("nodes", DASH), level.get("elements", DASH),
             number(level.get("probe_change"), 4), number(level.get("min_temperature"), 3)]
            for level in map(as_dict, as_list(mesh.get("levels")))]
    levels = table(["Nodes", "Elements", "Largest probe change K", "θsi,min °C"], rows,
                   "Refinement levels") if rows else ""
    return section("Mesh convergence", summary, levels, id_="convergence")


def sensitivities_block(result: dict) -> Html:
    """How L2D, and ψ when it was computed, move with each material's λ."""
    entries = list(map(as_dict, as_list(result.get("sensitivities"))))
    if not entries:
        return Html("")
    with_psi = any(is_number(s.get("dpsi_dlnlambda")) for s in entries)
    symbol = "ψ" if with_psi else "L2D"
    rows = []
    for s in entries:
        main = s.get("dpsi_dlnlambda") if with_psi else s.get("dL2D_dlnlambda")
        effect = number(main * math.log(1.1), 4) if is_number(main) else DASH
        rows.append([s.get("material"), number(s.get("dL2D_dlnlambda"), 4)]
                    + ([number(main, 4)] if with_psi else []) + [effect])
    headers = ["Material", "∂L2D/∂ln λ W/(m·K)"] + (["∂ψ/∂ln λ W/(m·K)"] if with_psi else [])
    note = tag("p", f"∂X/∂ln λ is the change of X for a relative change of λ: a 10 % higher λ "
               f"changes {symbol} by about ∂{symbol}/∂ln λ × ln 1.1.", class_="note")
    return section(f"Sensitivity of {symbol} to the conductivities λ",
                   table(headers + [f"{symbol} change for λ +10 % W/(m·K)"], rows), note,
                   id_="sensitivities")
