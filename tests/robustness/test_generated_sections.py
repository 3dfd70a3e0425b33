"""Generated strange sections, straight through the engine: each one solves with a sound result
(energy balance, convergence certificate) or is refused with a typed error naming the field.
Any other exception is an engine bug; so is SolveFailed (a 500)."""

from __future__ import annotations

import json
import math

from hypothesis import HealthCheck, Phase, event, given, note, settings
from robust_support import check_result, request_of, solve_or_refuse
from section_strategies import (
    BUILDING_CONDUCTIVITY,
    bad_numbers,
    boards,
    extreme_scales,
    random_polygons,
)

from coldseam.errors import ColdseamError
from coldseam.schema import parse_request
from coldseam.thermal.evaluate import evaluate

#: Bounded for CI: no example database, no shrinking (a failure prints its example as drawn).
FAST = settings(deadline=None, max_examples=60, derandomize=True, database=None,
                phases=[Phase.explicit, Phase.generate],
                suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])


@FAST
@given(boards(conductivity=BUILDING_CONDUCTIVITY))
def test_boards_with_drawing_defects_solve_or_are_refused(section):
    note(json.dumps(section))
    event(solve_or_refuse(request_of(section, max_levels=5)))


@settings(FAST, max_examples=40)
@given(boards())
def test_boards_of_conductivities_1e_3_to_1e3_solve_honestly_or_are_refused(section):
    # A checkerboard junction of 0.1 and 100 W/(m·K) can still change by 2-4 % per level at
    # five levels: the certificate must then say "not converged", with a warning.
    note(json.dumps(section))
    event(solve_or_refuse(request_of(section, max_levels=5), require_converged=False))


@settings(FAST, max_examples=40)
@given(random_polygons())
def test_random_polygons_solve_or_are_refused(section):
    note(json.dumps(section))
    event(solve_or_refuse(request_of(section, max_levels=5)))


@settings(FAST, max_examples=40)
@given(extreme_scales())
def test_enormous_tiny_and_far_sections_solve_or_are_refused(section):
    note(json.dumps(section))
    # Robin boundaries on a section 1e9 times larger make the surface layer unresolvable on
    # five levels: the result must then say it is not converged rather than claim it.
    event(solve_or_refuse(request_of(section, max_levels=5), require_converged=False))


@settings(FAST, max_examples=80)
@given(bad_numbers())
def test_bad_numbers_are_refused_naming_their_field_or_solve(case):
    request, pointer = case
    note(f"{pointer}: {json.dumps(request)}")
    request["options"] = {"max_levels": 3, "max_nodes": 20_000, "sensitivities": False}
    value = _value_at(request, pointer)
    try:
        result = evaluate(parse_request(request)).result
    except ColdseamError as error:
        assert error.message, pointer
        if not math.isfinite(value):
            assert error.field == pointer, (error.field, pointer, error.message)
        return
    assert math.isfinite(value), pointer  # NaN and infinity never get through
    check_result(result, require_converged=False)  # 3 levels: not always converged


def _value_at(node, pointer: str) -> float:
    for part in pointer.strip("/").split("/"):
        node = node[int(part)] if isinstance(node, list) else node[part]
    return node


@settings(FAST, max_examples=40)
@given(boards(defects=["none", "repeated point", "midpoint"],
              conductivity=BUILDING_CONDUCTIVITY, sides=["exact", "overlong"]))
def test_clean_boards_solve_within_the_iso_6946_bounds(section):
    note(json.dumps(section))
    result = evaluate(parse_request(request_of(section, max_levels=5))).result
    check_result(result)
    lower, upper = resistance_bounds(section)
    height = 1000 * _scale_of(section) * (0.001 if section["unit"] == "mm" else 1.0)
    resistance = height / result["L2D"]
    # ISO 6946 (inhomogeneous layers): the true resistance lies between the isothermal-planes
    # and the parallel-paths limits [from memory]. The FEM flow is converged to 1 %.
    assert lower * 0.99 <= resistance <= upper * 1.01, (lower, resistance, upper)


def resistance_bounds(section: dict) -> tuple[float, float]:
    """ISO 6946 lower (isothermal planes) and upper (parallel paths) limits of the total
    resistance of a grid of rectangular boards exposed left and right, m²K/W."""
    scale = 0.001 if section["unit"] == "mm" else 1.0
    conductivity = {m["id"]: m["conductivity"] for m in section["materials"]}
    boxes = [(_box(r["polygon"]), conductivity[r["material"]]) for r in section["regions"]]
    xs = sorted({x for (x0, x1, _, _), _ in boxes for x in (x0, x1)})
    ys = sorted({y for (_, _, y0, y1), _ in boxes for y in (y0, y1)})
    surfaces = sum(b["surface_resistance"] for b in section["boundaries"])

    def lam(x: float, y: float) -> float:
        return next(k for (x0, x1, y0, y1), k in boxes if x0 <= x <= x1 and y0 <= y <= y1)

    height = ys[-1] - ys[0]
    rows = []  # (fraction of the height, resistance of the row)
    for y0, y1 in zip(ys, ys[1:], strict=False):
        ym = (y0 + y1) / 2
        r = surfaces + sum((x1 - x0) * scale / lam((x0 + x1) / 2, ym)
                           for x0, x1 in zip(xs, xs[1:], strict=False))
        rows.append(((y1 - y0) / height, r))
    upper = 1 / sum(f / r for f, r in rows)
    lower = surfaces
    for x0, x1 in zip(xs, xs[1:], strict=False):
        xm = (x0 + x1) / 2
        mean = sum((y1 - y0) / height * lam(xm, (y0 + y1) / 2)
                   for y0, y1 in zip(ys, ys[1:], strict=False))
        lower += (x1 - x0) * scale / mean
    return lower, upper


def _box(polygon: list) -> tuple[float, float, float, float]:
    xs, ys = [p[0] for p in polygon], [p[1] for p in polygon]
    return min(xs), max(xs), min(ys), max(ys)


def _scale_of(section: dict) -> float:
    ys = [p[1] for r in section["regions"] for p in r["polygon"]]
    return (max(ys) - min(ys)) / 1000
