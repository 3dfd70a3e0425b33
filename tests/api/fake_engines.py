"""Stand-in engines for the service tests: they exercise the plumbing (workers, progress,
crashes, time limits), never the physics. Behaviour is chosen by the section's description:
``fake: sleep=<s>``, ``fake: exit``, ``fake: meshing-failed``, ``fake: solve-failed``,
``fake: limit``."""

from __future__ import annotations

import os
import time
from dataclasses import dataclass
from typing import Any

from coldseam.errors import LimitExceeded, MeshingFailed, SolveFailed


@dataclass
class FakeEvaluation:
    result: dict[str, Any]
    field: dict[str, Any]


def evaluate(request, progress=None) -> FakeEvaluation:
    command = (request.section.description or "").removeprefix("fake: ")
    report = progress or (lambda stage, fraction: None)
    report("geometry", 0.05)
    if command.startswith("sleep="):
        _sleep(float(command.split("=", 1)[1]), report)
    elif command == "exit":
        os._exit(3)
    elif command == "meshing-failed":
        raise MeshingFailed("region 0 (brick) polygon crosses itself near (10, 20) mm",
                            "/section/regions/0/polygon")
    elif command == "solve-failed":
        raise SolveFailed("the linear solve did not converge")
    elif command == "limit":
        raise LimitExceeded("the mesh would need more than 100 nodes", "/options/max_nodes")
    report("post-processing", 0.95)
    return FakeEvaluation(result=_result(request), field=_field(request))


def _sleep(seconds: float, report) -> None:
    steps = 10
    for i in range(steps):
        report("solving", 0.1 + 0.8 * i / steps)
        time.sleep(seconds / steps)


def _result(request) -> dict[str, Any]:
    section = request.section
    return {
        "engine": "fake",
        "regions": len(section.regions),
        "heat_flows": {env.id: 0.0 for env in section.environments},
        "warnings": [],
    }


def _field(request) -> dict[str, Any]:
    return {"unit": "m", "points": [[0.0, 0.0], [1.0, 0.0], [0.0, 1.0]],
            "triangles": [[0, 1, 2]], "temperature": [20.0, 0.0, 10.0]}


def real_with_exit_hook(request, progress=None):
    """The real engine; a section described ``exit-while-meshing`` makes the worker process
    end itself (``os._exit``) when the engine reports the meshing stage."""
    from coldseam.thermal.evaluate import evaluate as real_evaluate

    report = progress or (lambda stage, fraction: None)
    if (request.section.description or "") != "exit-while-meshing":
        return real_evaluate(request, report)

    def hook(stage: str, fraction: float) -> None:
        report(stage, fraction)
        if stage == "meshing":
            os._exit(9)

    return real_evaluate(request, hook)


def drawing_needing_a_terabyte(data, mapping, unit):
    """A stand-in DXF reader that runs out of memory."""
    return {"size": len(bytearray(2**40))}


def drawing_never_finishing(data, mapping, unit):
    time.sleep(600)


def drawing_refused(data, mapping, unit):
    from coldseam.errors import InvalidSection

    raise InvalidSection("layer 'WALL' has an open polyline", "/layer_map/WALL")


def drawing_read(data, mapping, unit):
    return {"bytes": len(data), "pid": os.getpid()}
