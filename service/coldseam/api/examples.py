"""Worked examples for the OpenAPI page (the request is examples/wall-1d.json, checked by a
test). The result figures follow from ISO 6946 U = 1/(Rsi + Σ d/λ + Rse) for this wall; they
show the shape of an answer, they are not a reference."""

from __future__ import annotations

from typing import Any

from coldseam import CAUTION

WALL_1D: dict[str, Any] = {
    "section": {
        "name": "Harrowgate Lane workshop, north wall (invented)",
        "description": "Plain wall: 100 mm mineral wool outside 200 mm sand-lime masonry, 1 m of height; the top and bottom edges are cut-off planes.",
        "unit": "mm",
        "materials": [
            {
                "id": "mineral_wool",
                "conductivity": 0.035
            },
            {
                "id": "masonry",
                "conductivity": 1.0
            }
        ],
        "regions": [
            {
                "material": "mineral_wool",
                "polygon": [
                    [
                        0,
                        0
                    ],
                    [
                        100,
                        0
                    ],
                    [
                        100,
                        1000
                    ],
                    [
                        0,
                        1000
                    ]
                ]
            },
            {
                "material": "masonry",
                "polygon": [
                    [
                        100,
                        0
                    ],
                    [
                        300,
                        0
                    ],
                    [
                        300,
                        1000
                    ],
                    [
                        100,
                        1000
                    ]
                ]
            }
        ],
        "environments": [
            {
                "id": "inside",
                "temperature": 20,
                "side": "interior"
            },
            {
                "id": "outside",
                "temperature": -5,
                "side": "exterior"
            }
        ],
        "boundaries": [
            {
                "environment": "outside",
                "surface_resistance": 0.04,
                "path": [
                    [
                        0,
                        0
                    ],
                    [
                        0,
                        1000
                    ]
                ]
            },
            {
                "environment": "inside",
                "surface_resistance": 0.13,
                "path": [
                    [
                        300,
                        0
                    ],
                    [
                        300,
                        1000
                    ]
                ]
            }
        ],
        "probes": [
            {
                "id": "interface",
                "point": [
                    100,
                    500
                ]
            },
            {
                "id": "inner_face",
                "point": [
                    300,
                    500
                ]
            }
        ]
    },
    "psi": {
        "flanking": [
            {
                "id": "wall",
                "length": 1000,
                "cut": [
                    [
                        0,
                        500
                    ],
                    [
                        300,
                        500
                    ]
                ]
            }
        ]
    },
    "condensation": {
        "interior_surface_resistance": 0.25,
        "indoor": {
            "temperature": 20,
            "relative_humidity": 0.5
        }
    }
}

WALL_1D_RESULT: dict[str, Any] = {
    "id": "87ba8666853334fb4631cc900ba32c19",
    "status": "done",
    "heat_flows": {"inside": 7.747, "outside": -7.747},
    "L2D": 0.3099,
    "psi": {"value": 0.0, "L2D": 0.3099, "sum_UL": 0.3099,
            "flanking": [{"id": "wall", "u_value": 0.3099, "length": 1.0}]},
    "probes": {"interface": 17.44, "inner_face": 18.99},
    "surfaces": {"inside": {"min_temperature": 18.99, "at": [0.3, 0.0]}},
    "condensation": {"fRsi": 0.925, "min_temperature": 18.13, "at": [0.3, 0.0],
                     "fRsi_critical": 0.705, "verdict": "pass"},
    "mesh": {"nodes": 1200, "elements": 2200, "relative_change": 0.0, "converged": True},
    "warnings": [],
    "caution": CAUTION,
    "created_at": "2025-01-01T12:00:00Z",
    "request": WALL_1D,
}

ACCEPTED: dict[str, Any] = {
    "id": "87ba8666853334fb4631cc900ba32c19",
    "status": "queued",
    "location": "/api/v1/evaluations/87ba8666853334fb4631cc900ba32c19",
}

RUNNING: dict[str, Any] = {
    "id": "87ba8666853334fb4631cc900ba32c19",
    "status": "running",
    "stage": "solving",
    "progress": 0.55,
    "created_at": "2025-01-01T12:00:00Z",
}

INVALID: dict[str, Any] = {
    "detail": "/section/unit: 'unit' is required: say whether coordinates are in \"mm\" or "
              "\"m\" (a drawing in mm read as metres is a silent 1000x error)",
    "field": "/section/unit",
    "message": "'unit' is required: say whether coordinates are in \"mm\" or \"m\" "
               "(a drawing in mm read as metres is a silent 1000x error)",
    "kind": "InvalidSection",
    "request_id": "3f2a9c0d1b7e4a55",
}

BATCH: dict[str, Any] = {
    "name": "Harrowgate schedule (invented)",
    "items": [
        {"id": "J2", "template": "floor_slab", "parameters": {"insulation_thickness": 160},
         "length": 64},
        {"id": "J3", "template": "wall_corner", "length": 28.8},
    ],
    "grid": {"template": "floor_slab",
             "parameters": {"insulation_thickness": [100, 160, 200],
                            "slab_thickness": [200, 250]}},
}
BATCH_CSV = ("id,template,length,insulation_thickness\n"
             "J2 slab edge,floor_slab,64,160\n"
             "J3 corners,wall_corner,28.8,\n")
