"""Section builders shared by the engine tests (plain dicts in the model-v1 contract)."""

from __future__ import annotations

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
