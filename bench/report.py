"""The benchmark's Markdown report (bench/latest.md): tables and the targets, met or not."""

from __future__ import annotations


def _f(value, digits=3, unit="") -> str:
    if value is None:
        return "–"
    if isinstance(value, float):
        return f"{value:.{digits}g}{unit}"
    return f"{value}{unit}"


def _sections(rows: list[dict]) -> list[str]:
    out = ["## 1. Coldseam end to end (warm process, median wall time of the runs)", "",
           "| section | levels (nodes) | dofs | target met | wall s | CPU s | geometry | meshing"
           " | adapt | assembly | solve | post | err Φ W/m | err θsi K | err probes K | ref nodes |",
           "|---|---|---|---|---|---|---|---|---|---|---|---|---|---|---|---|"]
    for r in rows:
        c, s, e = r["coldseam"], r["coldseam"]["stages"], r["coldseam"]["errors"]
        out.append(
            f"| {r['name']} | {'/'.join(map(str, c['levels']))} | {c['figures']['dofs']} | "
            f"{'yes' if c['target_met'] else 'no'} | {c['wall_median']:.3f} | "
            f"{c['cpu_median']:.3f} | " + " | ".join(f"{s.get(k, 0.0):.3f}" for k in (
                "geometry", "meshing", "adapt", "assembly", "solve", "post-processing")) +
            f" | {_f(e['heat_flow'], 2)} | {_f(e['theta_si_min'], 2)} | {_f(e['probes'], 2)} | "
            f"{r['reference']['nodes']} |")
    out += ["", "## 2. Peer pipeline at equal accuracy (gmsh OCC + fragment, uniform size, "
            "scikit-fem P1, scipy spsolve)", "",
            "Strict: the peer's errors at most Coldseam's achieved errors (floored at twice the "
            "reference's own uncertainty). Lenient: at most max(Coldseam's error, the "
            "certificate target 0.1 % of Φ / 0.01 K). The peer's time is one run at the first "
            "halved size that qualifies (it is credited with knowing that size).", "",
            "| section | Coldseam s | peer strict: nodes | s | ratio | peer lenient: nodes | s "
            "| ratio | peer finest tried: nodes, s |", "|---|---|---|---|---|---|---|---|---|"]
    for r in rows:
        cells = [r["name"], f"{r['coldseam']['wall_median']:.3f}"]
        for label in ("strict", "lenient"):
            p = r[f"peer_{label}"]
            if p is None:
                bound = r["peer_last"]["seconds"] / r["coldseam"]["wall_median"]
                cells += ["not reached", "–", f"> {bound:.1f}"]
            else:
                cells += [str(p["nodes"]), f"{p['seconds']:.3f}", f"{p['ratio']:.1f}"]
        cells.append(f"{r['peer_last']['nodes']}, {r['peer_last']['seconds']:.2f}")
        out.append("| " + " | ".join(cells) + " |")
    return out + [""]


def _scaling(block: dict) -> list[str]:
    out = ["## 3. Scaling of one level (facade section; design + condensation runs, "
           "sensitivities, field)", "",
           "| element | nodes | dofs | total s | peak GiB | geometry s | meshing s | "
           "assembly+solve s | post s | peak GiB per stage (mesh/solve/post) |",
           "|---|---|---|---|---|---|---|---|---|---|"]
    for r in block["rows"]:
        if "error" in r:
            out.append(f"| P{r['order']} | ~{r['target_nodes']} | – | failed: {r['error']} "
                       "| | | | | | |")
            continue
        s = r["stages"]
        out.append(
            f"| P{r['order']} | {r['nodes']} | {r['dofs']} | {r['seconds']:.2f} | "
            f"{r['peak_gib']:.2f} | {s['geometry']['seconds']:.2f} | "
            f"{s['meshing']['seconds']:.2f} | {s['solve_level']['seconds']:.2f} | "
            f"{s['post-processing']['seconds']:.2f} | " + "/".join(
                f"{s[k]['peak_gib']:.2f}" for k in ("meshing", "solve_level",
                                                    "post-processing")) + " |")
    exps = ", ".join(f"{k}: {_f(v, 2)}" for k, v in block["exponent"].items())
    return out + ["", f"Growth exponent of the total time (time ∝ nodes^k): {exps}", ""]


def _service(rows: list[dict], cli: dict | None) -> list[str]:
    out = ["## 4. Service (2 workers, loopback, templates in turn, every request unique)", "",
           "| clients | requests | failed | p50 s | p95 s | max s | evaluations/s |",
           "|---|---|---|---|---|---|---|"]
    for r in rows:
        out.append(f"| {r['clients']} | {r['requests']} | {r['failures']} | {r['p50']:.3f} | "
                   f"{r['p95']:.3f} | {r['max']:.3f} | {r['throughput']:.2f} |")
    if cli:
        out += ["", f"CLI cold start (`{cli['command']}`, fresh interpreter): median "
                f"{cli['median']:.3f} s, min {cli['min']:.3f} s over {cli['repeats']} runs."]
    return out + [""]


def targets(data: dict) -> list[tuple[str, str, bool | None]]:
    """(target, measured, met) rows; met None when that part was not run."""
    rows = []
    sections = {r["name"]: r for r in data.get("sections", [])}
    thin = sections.get("thin_bridge")
    if thin:
        c, e = thin["coldseam"], thin["coldseam"]["errors"]
        ok = c["wall_median"] <= 0.2 and e["heat_flow"] <= 0.01 and e["theta_si_min"] <= 0.01
        rows.append(("Thin-layer section with a metal bridge to 0.01 W/m and 0.01 K, ≤ 0.2 s warm",
                     f"{c['wall_median']:.3f} s; errors {e['heat_flow']:.1e} W/m, "
                     f"{e['theta_si_min']:.1e} K", ok))
    tpl = [r for n, r in sections.items() if n.startswith("template:")]
    if tpl:
        slow = [r["name"] for r in tpl if r["coldseam"]["wall_median"] > 0.5
                or not r["coldseam"]["target_met"]]
        worst = max(r["coldseam"]["wall_median"] for r in tpl)
        rows.append(("Template full evaluation (ψ, fRsi run, certificate 0.1 %) ≤ 0.5 s p50",
                     f"worst {worst:.3f} s; over or uncertified: {', '.join(slow) or 'none'}",
                     not slow))
    if sections:
        rows += [_peer_target(sections, "strict"), _peer_target(sections, "lenient")]
    for r in data.get("scaling", {}).get("rows", []):
        if r["target_nodes"] == 1_000_000:
            ok = "error" not in r and r["seconds"] <= 20 and r["peak_gib"] <= 2 / 1.073741824
            measured = r.get("error") or (f"{r['nodes']} nodes: {r['seconds']:.1f} s, "
                                          f"{r['peak_gib']:.2f} GiB")
            rows.append((f"1e6 nodes ≤ 20 s and ≤ 2 GB peak (P{r['order']}; largest size run)",
                         measured, ok))
    if data.get("cli"):
        rows.append(("`coldseam evaluate` small section ≤ 1.0 s cold",
                     f"{data['cli']['median']:.3f} s", data["cli"]["median"] <= 1.0))
    four = next((r for r in data.get("service", []) if r["clients"] == 4), None)
    if four:
        rows.append(("Service, 2 workers: ≥ 4 template evaluations/s (4 clients)",
                     f"{four['throughput']:.2f}/s", four["throughput"] >= 4))
        rows.append(("Service: no request slower than 3× the median at 4 clients",
                     f"max {four['max']:.2f} s, median {four['p50']:.2f} s, "
                     f"{four['failures']} failed",
                     four["max"] <= 3 * four["p50"] and not four["failures"]))
    return rows


def _peer_target(sections: dict, label: str) -> tuple[str, str, bool | None]:
    """≥ 5× at equal accuracy; an unreached peer counts by its lower bound (its finest run
    was not accurate enough, so it needs longer), inconclusive when that bound is below 5."""
    low, unknown, shown = [], [], []
    for name, r in sections.items():
        hit = r[f"peer_{label}"]
        if hit is not None:
            shown.append(hit["ratio"])
            if hit["ratio"] < 5:
                low.append(f"{name} {hit['ratio']:.1f}×")
        else:
            bound = r["peer_last"]["seconds"] / r["coldseam"]["wall_median"]
            if bound < 5:
                unknown.append(f"{name} (> {bound:.1f}×)")
    text = f"min measured ratio {min(shown):.1f}×" if shown else "no measured ratio"
    text += f"; below 5×: {', '.join(low) or 'none'}"
    if unknown:
        text += f"; inconclusive: {', '.join(unknown)}"
    name = {"strict": "≥ 5× faster than the peer at equal accuracy (Coldseam's achieved "
                      "errors), every section",
            "lenient": "(extra comparison, not the issue's target) ≥ 5× faster than the peer "
                       "at the looser certificate targets, the peer credited with knowing the "
                       "right uniform size, every section"}[label]
    return name, text, None if (unknown and not low) else not low and not unknown


def markdown(data: dict, notes: str = "") -> str:
    m = data["machine"]
    out = ["# Coldseam benchmark", "",
           f"Machine: {m['cpu']}, {m['cores']} cores, Python {m['python']}; {m['date']}; "
           f"load average {m['load_at_start']:.1f} at start, {m.get('load_at_end', 0):.1f} at "
           f"end{' (quick run)' if data['quick'] else ''}. Command: `python bench/run.py"
           f"{' --quick' if data['quick'] else ''}`.", ""]
    if data.get("sections"):
        out += _sections(data["sections"])
    if data.get("scaling"):
        out += _scaling(data["scaling"])
    if data.get("service") or data.get("cli"):
        out += _service(data.get("service", []), data.get("cli"))
    out += ["## Targets", "", "| target | measured | met |", "|---|---|---|"]
    for name, measured, ok in targets(data):
        verdict = "inconclusive" if ok is None else "yes" if ok else "no"
        out.append(f"| {name} | {measured} | {verdict} |")
    if notes:
        out += ["", notes.strip()]
    return "\n".join(out) + "\n"
