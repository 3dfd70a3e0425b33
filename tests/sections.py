"""Section builders shared by the engine tests (plain dicts in the model-v1 contract)."""

from __future__ import annotations

import math

from coldseam.schema import parse_request
from coldseam.thermal.evaluate import evaluate


def run(request: dict):
    """Evaluate a request (or bare section) dict; returns the result document."""
    return evaluate(parse_request(request)).result


def layered_wall(layers, height=1000.0, unit="mm", vertical=False, rsi=0.13, rse=0.04,
                 theta_i=20.0, theta_e=-5.0, extra_regions=()):
    """A plain wall of ``layers`` [(id, λ, thickness)] from the exterior face at 0.

    Layers run across x (heat flows horizontally) or, with vertical=True, across y.
    """
    materials, regions, x = [], [], 0.0
    for ident, lam, thickness in layers:
        materials.append({"id": ident, "conductivity": lam})
        box = [[x, 0], [x + thickness, 0], [x + thickness, height], [x, height]]
        regions.append({"material": ident, "polygon": _orient(box, vertical)})
        x += thickness
    outside = _orient([[0, 0], [0, height]], vertical)
    inside = _orient([[x, 0], [x, height]], vertical)
    return {
        "unit": unit, "materials": materials, "regions": regions + list(extra_regions),
        "environments": [{"id": "inside", "temperature": theta_i, "side": "interior"},
                         {"id": "outside", "temperature": theta_e, "side": "exterior"}],
        "boundaries": [{"environment": "outside", "surface_resistance": rse, "path": outside},
                       {"environment": "inside", "surface_resistance": rsi, "path": inside}],
    }


def _orient(points, vertical):
    return [[y, x] for x, y in points] if vertical else [list(p) for p in points]


def total_resistance(layers, rsi=0.13, rse=0.04, scale=0.001):
    return rsi + rse + sum(t * scale / lam for _, lam, t in layers)


def corner(thickness=300.0, leg=2000.0, lam=1.0, rsi=0.0, rse=0.0, insulation=None):
    """Homogeneous external L-corner of two walls, outer legs ``leg`` long (mm)."""
    t, L = thickness, leg
    outline = [[0, 0], [L, 0], [L, t], [t, t], [t, L], [0, L]]
    return {
        "unit": "mm", "materials": [{"id": "wall", "conductivity": lam}],
        "regions": [{"material": "wall", "polygon": outline}],
        "environments": [{"id": "inside", "temperature": 20, "side": "interior"},
                         {"id": "outside", "temperature": 0, "side": "exterior"}],
        "boundaries": [
            {"environment": "outside", "surface_resistance": rse, "path": [[L, 0], [0, 0], [0, L]]},
            {"environment": "inside", "surface_resistance": rsi, "path": [[L, t], [t, t], [t, L]]},
        ],
    }


def cavity_frame(columns=2, rows=1, cavity=None, solid_lambda=None, pitch=20.0, wall=4.0):
    """A PVC-like block (λ 0.17) of ``columns × rows`` rectangular air cavities, each
    ``pitch - wall`` mm square with ``wall`` mm webs; heat flows across x (interior at the
    right). ``cavity`` is the cavity block of the air material; ``solid_lambda`` replaces the
    cavity by a solid of that λ (same regions, same order)."""
    width, height = columns * pitch + wall, rows * pitch + wall
    air = ({"id": "air", "conductivity": solid_lambda} if solid_lambda is not None
           else {"id": "air", "cavity": cavity or {}})
    regions = [{"material": "pvc", "polygon": [[0, 0], [width, 0], [width, height], [0, height]]}]
    for i in range(columns):
        for j in range(rows):
            x, y = wall + i * pitch, wall + j * pitch
            side = pitch - wall
            regions.append({"material": "air", "polygon": [[x, y], [x + side, y],
                                                           [x + side, y + side], [x, y + side]]})
    return {
        "unit": "mm", "materials": [{"id": "pvc", "conductivity": 0.17}, air],
        "regions": regions,
        "environments": [{"id": "inside", "temperature": 20, "side": "interior"},
                         {"id": "outside", "temperature": 0, "side": "exterior"}],
        "boundaries": [
            {"environment": "outside", "surface_resistance": 0.04, "path": [[0, 0], [0, height]]},
            {"environment": "inside", "surface_resistance": 0.13,
             "path": [[width, 0], [width, height]]}],
    }


def wavy_wall(n: int) -> dict:
    """A 1000 x 3000 mm wall: its exterior face (x ≈ 0) a wave of n vertices exposed along
    them, its interior face straight and exposed along a path of n points (each one splits
    the face), a disc of n vertices inside, n/50 small square inserts, a probe per insert."""
    wave = [[5 * math.sin(k * 0.7), 3000 * k / (n - 1)] for k in range(n)]
    disc = [[500 + 200 * math.cos(2 * math.pi * k / n), 1500 + 200 * math.sin(2 * math.pi * k / n)]
            for k in range(n)]
    inserts = [{"material": "steel", "polygon": [[x, y], [x + 20, y], [x + 20, y + 20],
                                                 [x, y + 20]]}
               for i in range(max(1, n // 50)) for x, y in [(100 + 15 * (i % 50),
                                                             100 + 60 * (i // 50))]]
    return {"unit": "mm",
            "materials": [{"id": "wall", "conductivity": 0.5}, {"id": "steel", "conductivity": 50},
                          {"id": "core", "conductivity": 0.04}],
            "regions": [{"material": "wall", "polygon": [*wave, [1000, 3000], [1000, 0]]},
                        {"material": "core", "polygon": disc}, *inserts],
            "environments": [{"id": "out", "temperature": -5, "side": "exterior"},
                             {"id": "in", "temperature": 20, "side": "interior"}],
            "boundaries": [{"environment": "out", "surface_resistance": 0.04, "path": wave},
                           {"environment": "in", "surface_resistance": 0.13,
                            "path": [[1000, 3000 * k / (n - 1)] for k in range(n)]}],
            "probes": [{"id": f"p{i}", "point": [r["polygon"][0][0] + 10,
                                                  r["polygon"][0][1] + 10]}
                       for i, r in enumerate(inserts[:100])]}
