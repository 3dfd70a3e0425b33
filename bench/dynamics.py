"""Speed of the dynamic results on the junction templates: ``python bench/dynamics.py
[--quick] [--repeat N]``.

Targets (issue 14): a periodic result for a template junction in at most 2× the time of the
steady evaluation; a 24 h transient (hourly series) of a template junction in at most 1 s.
Measured warm, in this process, median of ``--repeat`` runs:
- steady: ``evaluate`` of the template request as it is;
- periodic: the same with ``dynamics.periodic`` (24 h), certificate included (the levels
  continue until the periodic figures change by < 0.5 %);
- transient: the same with ``dynamics.transient`` (25 hourly values outside), whole
  evaluation, and the transient alone on the certified final mesh (``TransientRun``).
Prints a table; numbers live here, never in timed tests.
"""

from __future__ import annotations

import argparse
import math
import statistics
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "service"))

from coldseam.schema import parse_request  # noqa: E402
from coldseam.templates import build, list_templates  # noqa: E402
from coldseam.thermal.evaluate import evaluate  # noqa: E402

OUTSIDE = [round(-3 + 5 * math.sin(2 * math.pi * (h - 9) / 24), 2) for h in range(25)]


def timed(request: dict, repeat: int) -> tuple[float, dict]:
    parsed = parse_request(request)
    times, result = [], None
    for _ in range(repeat):
        start = time.perf_counter()
        result = evaluate(parsed).result
        times.append(time.perf_counter() - start)
    return statistics.median(times), result


def transient_alone(request: dict, repeat: int) -> float:
    """The transient of the final level only: the certified mesh, solved once, then timed."""
    from coldseam.thermal import dynamics_result
    from coldseam.thermal.dynamics import dynamic_problem
    from coldseam.thermal.transient import TransientRun

    captured = {}
    original = dynamics_result._block

    def keep(model, solution, watch):
        captured.update(model=model, solution=solution)
        return original(model, solution, watch)

    dynamics_result._block = keep
    try:
        evaluate(parse_request(request))
    finally:
        dynamics_result._block = original
    model, solution = captured["model"], captured["solution"]
    from threadpoolctl import threadpool_limits

    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        with threadpool_limits(1, user_api="blas"):  # as the engine runs it
            dyn = dynamic_problem(model, solution.design)
            TransientRun(model, dyn, solution.design).evaluate()
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="two templates, one repeat")
    parser.add_argument("--repeat", type=int, default=3)
    args = parser.parse_args()
    ids = [t.id for t in list_templates()]
    repeat = 1 if args.quick else args.repeat
    if args.quick:
        ids = ["floor_slab", "balcony"]
    print("template      nodes  steady s  periodic s  ratio  transient eval s  transient alone s")
    for template in ids:
        steady_request = build(template)
        try:
            steady, result = timed(steady_request, repeat)
            periodic, _ = timed({**steady_request, "dynamics": {"periodic": {}}}, repeat)
            transient_request = {**steady_request, "dynamics": {"transient": {
                "time_step_hours": 1, "temperatures": {"outside": OUTSIDE}}}}
            transient, _ = timed(transient_request, repeat)
            alone = transient_alone(transient_request, repeat)
        except Exception as exc:  # noqa: BLE001 - a template the dynamics cannot take
            print(f"{template:12s}  {type(exc).__name__}: {exc}")
            continue
        print(f"{template:12s} {result['mesh']['nodes']:6d}  {steady:8.3f}  {periodic:10.3f}  "
              f"{periodic / steady:5.2f}  {transient:16.3f}  {alone:17.3f}")


if __name__ == "__main__":
    main()
