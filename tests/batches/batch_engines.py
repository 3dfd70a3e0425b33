"""A stand-in engine for the batch tests: it exercises the plumbing, never the physics. Its
ψ, L2D, fRsi and θsi,min are made up from the request's digest (different requests, different
figures; the same request, the same figures). A section described ``fake: sleep=<s>`` takes
that long, ``fake: meshing-failed`` fails."""

from __future__ import annotations

import time
from dataclasses import dataclass
from typing import Any

from coldseam.errors import MeshingFailed
from coldseam.schema.evaluation import request_digest


@dataclass
class FakeEvaluation:
    result: dict[str, Any]
    field: dict[str, Any]


def evaluate(request, progress=None) -> FakeEvaluation:
    command = (request.section.description or "").removeprefix("fake: ")
    if progress is not None:
        progress("geometry", 0.1)
    if command.startswith("sleep="):
        time.sleep(float(command.split("=", 1)[1]))
    elif command == "meshing-failed":
        raise MeshingFailed("region 0 (brick) polygon crosses itself near (10, 20) mm",
                            "/section/regions/0/polygon")
    share = int(request_digest(request)[:8], 16) / 16**8
    result = {"engine": "fake", "L2D": 0.5 + share, "psi": {"value": 0.2 * share},
              "condensation": {"fRsi": 0.9 - 0.1 * share, "min_temperature": 18 - share,
                               "verdict": "pass"}, "warnings": []}
    field = {"unit": "m", "points": [[0.0, 0.0], [1.0, 0.0], [0.0, 1.0]],
             "triangles": [[0, 1, 2]], "temperature": [20.0, 0.0, 10.0]}
    return FakeEvaluation(result, field)
