"""The benchmark sections: ISO 10211 Case 1, every template at its defaults, the thin
aluminium bridge and a large synthetic facade section (plain model-v1 request dicts)."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np

#: ISO 10211 Annex A, Case 1 probe grid (rows from the hot edge, columns from the cold edge).
CASE_1_PROBES = [(r, c) for r in range(1, 8) for c in range(1, 5)]
EXAMPLES = Path(__file__).resolve().parent.parent / "examples"


def case_1() -> dict:
    """ISO 10211 Case 1 (examples/iso10211-case1.json, shared with the validation tests)."""
    return json.loads((EXAMPLES / "iso10211-case1.json").read_text())


def case_1_series(x: float, y: float, a: float = 1.0, terms: int = 4001) -> float:
    """Analytical series of ISO 10211 Case 1 (hot edge y = a at 20 °C, other edges 0 °C)."""
    n = np.arange(1, terms, 2)[:, None]
    ratio = np.exp(n * np.pi * (y / a - 1)) * (1 - np.exp(-2 * n * np.pi * y / a)) / (
        1 - np.exp(-2 * n * np.pi))
    return float(80 / np.pi * np.sum(np.sin(n * np.pi * x / a) * ratio / n))


def _two_envs(rse: float, rsi: float, outside_path, inside_path, theta_i=20.0, theta_e=0.0):
    return (
        [{"id": "inside", "temperature": theta_i, "side": "interior"},
         {"id": "outside", "temperature": theta_e, "side": "exterior"}],
        [{"environment": "outside", "surface_resistance": rse, "path": outside_path},
         {"environment": "inside", "surface_resistance": rsi, "path": inside_path}],
    )


def thin_bridge() -> dict:
    """330 × 500 mm: concrete, insulation, render, a 2 mm aluminium bridge drawn last
    (examples/thin-bridge.json, shared with the tests)."""
    return json.loads((EXAMPLES / "thin-bridge.json").read_text())


def facade(brackets: int = 24, height: float = 3000.0) -> dict:
    """A large synthetic section: a 3 m concrete wall with external insulation, a ventilated
    cladding, a floor slab and ``brackets`` steel brackets (4 mm) through the insulation."""
    envs, bounds = _two_envs(0.04, 0.13, [[420, 0], [420, height]],
                             [[0, 0], [0, 1400], [0, 1600], [0, height]])
    regions = [
        {"material": "concrete", "polygon": [[0, 0], [200, 0], [200, height], [0, height]]},
        {"material": "insulation", "polygon": [[200, 0], [380, 0], [380, height],
                                               [200, height]]},
        {"material": "board", "polygon": [[400, 0], [420, 0], [420, height], [400, height]]},
        {"material": "air", "polygon": [[380, 0], [400, 0], [400, height], [380, height]]},
    ]
    pitch = height / brackets
    for k in range(brackets):
        y = (k + 0.5) * pitch
        regions.append({"material": "steel",
                        "polygon": [[150, y], [400, y], [400, y + 4], [150, y + 4]]})
    section = {
        "name": f"Facade with {brackets} brackets", "unit": "mm",
        "materials": [{"id": "concrete", "conductivity": 2.3},
                      {"id": "insulation", "conductivity": 0.035},
                      {"id": "air", "conductivity": 0.18},
                      {"id": "board", "conductivity": 0.25},
                      {"id": "steel", "conductivity": 50.0}],
        "regions": regions, "environments": envs, "boundaries": bounds,
    }
    return {"section": section}


def template_sections() -> dict[str, dict]:
    """Every template of ``coldseam.templates`` at its defaults (empty when absent)."""
    try:
        from coldseam import templates
    except ImportError:
        return {}
    return {f"template:{info.id}": templates.build(info.id, {})
            for info in templates.list_templates()}


def benchmark_sections(quick: bool = False) -> dict[str, dict]:
    out = {"case_1": case_1(), "thin_bridge": thin_bridge()}
    out.update(template_sections())
    out["facade"] = facade(8 if quick else 24)
    return out


def layered_wall() -> dict:
    """A small section for the CLI cold start: a plain two-layer wall, 1 m high."""
    envs, bounds = _two_envs(0.04, 0.13, [[0, 0], [0, 1000]], [[300, 0], [300, 1000]])
    return {"section": {
        "name": "Two-layer wall", "unit": "mm",
        "materials": [{"id": "brick", "conductivity": 0.8}, {"id": "eps", "conductivity": 0.035}],
        "regions": [{"material": "eps", "polygon": [[0, 0], [120, 0], [120, 1000], [0, 1000]]},
                    {"material": "brick",
                     "polygon": [[120, 0], [300, 0], [300, 1000], [120, 1000]]}],
        "environments": envs, "boundaries": bounds}}
