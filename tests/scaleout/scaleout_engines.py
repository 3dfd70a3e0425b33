"""Stand-in engines for the scale-out tests (the plumbing, not the physics), chosen by the
section's description: ``sleep=<s>`` (reporting progress), ``hog=<MiB>`` (holds that much
resident memory), ``limit`` (a typed LimitExceeded); anything else answers at once. The
result names the process that ran it, so a test can tell where an evaluation ran."""

from __future__ import annotations

import os
import time
from dataclasses import dataclass
from typing import Any

from coldseam.errors import LimitExceeded


@dataclass
class Outcome:
    result: dict[str, Any]
    field: dict[str, Any]


def evaluate(request, progress=None) -> Outcome:
    command = request.section.description or ""
    report = progress or (lambda stage, fraction: None)
    report("geometry", 0.05)
    if command.startswith("sleep="):
        seconds = float(command.split("=", 1)[1])
        for step in range(20):
            report("solving", 0.1 + 0.8 * step / 20)
            time.sleep(seconds / 20)
    elif command.startswith("hog="):
        _held = bytearray(int(command.split("=", 1)[1]) * 2**20)  # zero-filled: resident
        time.sleep(60)  # held until the slot stops the process for its memory
    elif command == "limit":
        raise LimitExceeded("the mesh would need more than 100 nodes", "/options/max_nodes")
    report("post-processing", 0.95)
    result = {"engine": "scaleout-test", "name": request.section.name, "pid": os.getpid(),
              "heat_flows": {env.id: 1.5 for env in request.section.environments},
              "warnings": []}
    field = {"unit": "m", "points": [[0.0, 0.0], [1.0, 0.0], [0.0, 1.0]],
             "triangles": [[0, 1, 2]], "temperature": [20.0, 0.0, 10.0]}
    return Outcome(result, field)
