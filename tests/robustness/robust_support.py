"""Shared helpers of the robustness tests: small sections, and the one property every
generated input must have (it solves with a sound result, or is refused with a typed error
that names the field)."""

from __future__ import annotations

import copy
import json
import math
from pathlib import Path
from typing import Any

from coldseam.errors import ColdseamError, SolveFailed
from coldseam.schema import parse_request
from coldseam.thermal.evaluate import evaluate

REPO = Path(__file__).resolve().parents[2]
WALL_1D: dict[str, Any] = json.loads((REPO / "examples" / "wall-1d.json").read_text())
#: ISO 10211 asks for an energy balance within 1e-4 of the heat flow [from memory].
BALANCE = 1e-4
#: Kept small so that generated sections stay fast; everything larger is refused quickly.
FAST_OPTIONS = {"max_levels": 3, "max_nodes": 20_000, "sensitivities": False}
USER_ERRORS = ("InvalidSection", "MeshingFailed", "LimitExceeded")


def environments(theta_i: float = 20.0, theta_e: float = -5.0) -> list[dict[str, Any]]:
    return [{"id": "inside", "temperature": theta_i, "side": "interior"},
            {"id": "outside", "temperature": theta_e, "side": "exterior"}]


def two_sided(regions: list[dict], materials: list[dict], x0: float, x1: float, y0: float,
              y1: float, unit: str = "mm", rse: float = 0.04, rsi: float = 0.13) -> dict:
    """A section exposed outside along x = x0 and inside along x = x1 (paths y0..y1)."""
    return {"unit": unit, "materials": materials, "regions": regions,
            "environments": environments(),
            "boundaries": [
                {"environment": "outside", "surface_resistance": rse,
                 "path": [[x0, y0], [x0, y1]]},
                {"environment": "inside", "surface_resistance": rsi,
                 "path": [[x1, y0], [x1, y1]]}]}


def request_of(section: dict, **options: Any) -> dict[str, Any]:
    return {"section": section, "options": {**FAST_OPTIONS, **options}}


def wall_request(**options: Any) -> dict[str, Any]:
    request = copy.deepcopy(WALL_1D)
    request["options"] = {**FAST_OPTIONS, **options}
    return request


def energy_imbalance(heat_flows: dict[str, float]) -> float:
    """|Σ flows| over half the sum of their magnitudes (0 when nothing flows)."""
    total = sum(abs(v) for v in heat_flows.values())
    return abs(sum(heat_flows.values())) / (0.5 * total) if total > 0 else 0.0


def check_result(result: dict[str, Any], require_converged: bool = True) -> None:
    """A solved section: finite figures, energy balance, convergence certificate."""
    flows = result["heat_flows"]
    assert all(math.isfinite(v) for v in flows.values()), flows
    assert energy_imbalance(flows) < BALANCE, flows
    assert not [w for w in result["warnings"] if "energy balance" in w], result["warnings"]
    mesh = result["mesh"]
    assert mesh["nodes"] > 0 and mesh["relative_change"] is not None
    assert mesh["converged"] == (mesh["relative_change"] < 0.01)
    if require_converged:
        assert mesh["converged"], mesh
    elif not mesh["converged"]:
        assert any("refinement stopped" in w for w in result["warnings"]), result["warnings"]
    if "L2D" in result:
        assert math.isfinite(result["L2D"]) and result["L2D"] >= 0, result["L2D"]


def check_refusal(error: ColdseamError) -> None:
    """A refusal a user can act on: a user error kind, a message, a field when it is ours."""
    assert type(error).__name__ in USER_ERRORS, (type(error).__name__, error.message)
    assert error.message and len(error.message) > 10, error.message
    if type(error).__name__ != "MeshingFailed":
        assert error.field.startswith("/"), (error.field, error.message)


def solve_or_refuse(request: Any, require_converged: bool = True) -> str:
    """Evaluate ``request`` in this process; "solved" or "refused", else the test fails.

    Anything raised that is not a ColdseamError is an engine bug and propagates as such;
    SolveFailed is an engine fault too (a 500), so it fails the check.
    """
    try:
        result = evaluate(parse_request(request)).result
    except SolveFailed:
        raise
    except ColdseamError as error:
        check_refusal(error)
        return "refused"
    check_result(result, require_converged)
    return "solved"


def singular_corner(side: float = 100.0) -> dict[str, Any]:
    """A square held at -5 °C on the left and 20 °C on the top and right (no surface
    resistance): the two temperatures meet at a corner, the heat flow there is unbounded, and
    refinement never converges: it runs until the level or node limit."""
    square = [[0, 0], [side, 0], [side, side], [0, side]]
    section = two_sided([{"material": "a", "polygon": square}],
                        [{"id": "a", "conductivity": 1.0}], 0, side, 0, side, rse=0.0, rsi=0.0)
    section["boundaries"][1]["path"] = [[0, side], [side, side], [side, 0]]
    return section


def big_request(name: str = "singular corner") -> dict[str, Any]:
    """A request that refines to a million nodes (seconds of work and hundreds of MiB)."""
    section = singular_corner()
    section["name"] = name
    return {"section": section, "options": {"max_levels": 12, "max_nodes": 1_000_000,
                                            "sensitivities": False}}
