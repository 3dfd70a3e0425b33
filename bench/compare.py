"""Equal-accuracy comparison of Coldseam with the peer pipeline on one section."""

from __future__ import annotations

import engine
import peer
from reference import errors

QUANTITIES = ("heat_flow", "theta_si_min", "probes")
#: The certificate's own targets (0.1 % of the heat flow, 0.01 K), the lenient tolerance.
FLOW_TARGET, TEMPERATURE_TARGET = 1e-3, 0.01


def tolerances(ref: dict, coldseam_errors: dict) -> tuple[dict, dict]:
    """Strict: Coldseam's achieved error (never below twice the reference's own uncertainty).
    Lenient: at least the certificate target. Quantities Coldseam cannot report are skipped."""
    uncertainty = dict(ref["uncertainty"])
    uncertainty["probes"] = 0.0 if ref.get("analytic_probes") else uncertainty["theta_si_min"]
    strict, lenient = {}, {}
    for q in QUANTITIES:
        achieved = coldseam_errors.get(q)
        if achieved is None:
            continue
        floor = 2 * (uncertainty.get(q) or 0.0)
        strict[q] = max(achieved, floor, 1e-12)
        target = (FLOW_TARGET * abs(ref["fine"]["heat_flow"]) if q == "heat_flow"
                  else TEMPERATURE_TARGET)
        lenient[q] = max(strict[q], target)
    return strict, lenient


def _within(ref: dict, tolerance: dict):
    def check(figures: dict) -> bool:
        err = errors(figures, ref)
        return all(err[q] is not None and err[q] <= tol for q, tol in tolerance.items())
    return check


def section(name: str, request: dict, ref: dict, repeats: int, peer_budget: float) -> dict:
    ours = engine.run(request, repeats)
    ours["errors"] = errors(ours["figures"], ref)
    strict, lenient = tolerances(ref, ours["errors"])
    checks = {"strict": _within(ref, strict), "lenient": _within(ref, lenient)}
    theirs = peer.to_accuracy(request, lambda f: checks["strict"](f), max_seconds=peer_budget)
    out = {"name": name, "coldseam": ours, "tolerance": {"strict": strict, "lenient": lenient},
           "reference": {"nodes": ref["fine"]["nodes"], "uncertainty": ref["uncertainty"]}}
    for label, check in checks.items():
        hit = next((r for r in theirs["runs"] if check(r)), None)
        out[f"peer_{label}"] = None if hit is None else {
            "seconds": hit["seconds"], "nodes": hit["nodes"], "size": hit["size"],
            "errors": errors(hit, ref), "stages": hit["stages"],
            "ratio": hit["seconds"] / ours["wall_median"]}
    last = theirs["runs"][-1]
    out["peer_last"] = {"seconds": last["seconds"], "nodes": last["nodes"],
                        "errors": errors(last, ref)}
    return out
