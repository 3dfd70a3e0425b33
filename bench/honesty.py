"""Does the certificate keep its word? ``python bench/honesty.py [--draws N] [--accuracy iso]``.

For every template and N random parameter sets (seeded), and for the example sections
ISO 10211 Case 2 and the thin bridge, the evaluation at the accuracy asked (default: 0.1 %,
0.01 K; iso: 1 %, 0.1 K) is compared with a reference of the same request whose levels
continue four doublings of nodes past the certified one (target set unreachable; up to 400k
nodes); the reference's own last change is shown beside. A certified result must be within
the target: |ΔL2D| < flow target × L2D and |Δθsi,min| (design run) and |ΔθfRsi,min| (fRsi run)
below the temperature target. Prints one row per draw and the number of broken promises;
exits 1 if there is any.
"""

from __future__ import annotations

import argparse
import json
import random
import sys
import time
from pathlib import Path

EXAMPLES = Path(__file__).resolve().parent.parent / "examples"
SECTIONS = ("iso10211-case2.json", "thin-bridge.json")


def draw(template, rng: random.Random) -> dict:
    out = {}
    for p in template.parameters:
        if p.kind == "number":
            low = p.min_nonzero if p.min_nonzero is not None else p.min
            value = rng.uniform(low, p.max)
            out[p.name] = 0.0 if p.min_nonzero is not None and rng.random() < 0.2 else value
        elif p.kind == "choice":
            out[p.name] = rng.choice(p.options)
    return out


def figures(result: dict) -> dict:
    interior = [k for k, s in result["surfaces"].items() if s["side"] == "interior"]
    return {"L2D": result["L2D"],
            "theta": min(result["surfaces"][k]["min_temperature"] for k in interior),
            "fRsi_theta": result["condensation"]["min_temperature"]}


def check(label: str, shown: str, request: dict, accuracy: str, targets) -> bool:
    """One row: the certified result at ``accuracy`` against the deeper reference."""
    from coldseam.schema import parse_request
    from coldseam.thermal import levels
    from coldseam.thermal.evaluate import evaluate

    flow_target, temperature_target = targets
    start = time.perf_counter()
    options = request.get("options") or {}
    result = evaluate(parse_request(
        {**request, "options": {**options, "accuracy": accuracy}})).result
    seconds = time.perf_counter() - start
    saved = levels.TARGETS["default"]
    levels.TARGETS["default"] = (0.0, 0.0)  # never met: run all the levels asked for
    deeper = len(result["mesh"]["levels"]) + 4
    try:
        fine = evaluate(parse_request(
            {**request, "options": {**options, "max_levels": deeper, "max_nodes": 400_000}})
        ).result
    finally:
        levels.TARGETS["default"] = saved
    own = fine["mesh"]["levels"][-1]
    a, b = figures(result), figures(fine)
    d_flow = abs(a["L2D"] - b["L2D"]) / b["L2D"]
    d_theta = abs(a["theta"] - b["theta"])
    d_frsi = abs(a["fRsi_theta"] - b["fRsi_theta"])
    certified = result["mesh"]["target_met"]
    ok = (not certified) or (d_flow < flow_target and d_theta < temperature_target
                             and d_frsi < temperature_target)
    print(f"| {label} | {shown} | {certified} ({seconds:.2f} s) | "
          f"{len(result['mesh']['levels'])} ({result['mesh']['nodes']}) | {d_flow:.1e} | "
          f"{d_theta:.1e} | {d_frsi:.1e} | {'yes' if ok else '**no**'} | "
          f"{own['nodes']}, {own['relative_change']:.1e}, "
          f"{own['design_temperature_change']:.1e} |", flush=True)
    return ok


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--draws", type=int, default=4)
    parser.add_argument("--seed", type=int, default=2026)
    parser.add_argument("--accuracy", choices=("default", "iso"), default="default")
    args = parser.parse_args()
    from coldseam.errors import InvalidSection
    from coldseam.templates import build, list_templates
    from coldseam.thermal import levels

    rng = random.Random(args.seed)
    targets = levels.TARGETS[args.accuracy]
    print("| section | parameters | certified | levels (nodes) | ΔL2D rel | Δθsi K | ΔθfRsi K | "
          "ok | reference nodes, last change: flow rel, θsi K |")
    print("|---|---|---|---|---|---|---|---|---|")
    oks = []
    for info in list_templates():
        done = 0
        for _ in range(args.draws * 5):
            if done >= args.draws:
                break
            params = {} if done == 0 else draw(info, rng)
            try:
                request = build(info.id, params)
            except InvalidSection:
                continue  # a cross-parameter rule: draw again
            done += 1
            shown = "defaults" if not params else ", ".join(
                f"{k}={v:.3g}" if isinstance(v, float) else f"{k}={v}"
                for k, v in list(params.items())[:4])
            oks.append(check(info.id, shown, request, args.accuracy, targets))
    for name in SECTIONS:
        request = json.loads((EXAMPLES / name).read_text())
        oks.append(check(name, "as given", request, args.accuracy, targets))
    broken, total = oks.count(False), len(oks)
    print(f"\n{broken} broken promises in {total} evaluations")
    return 1 if broken else 0


if __name__ == "__main__":
    sys.exit(main())
