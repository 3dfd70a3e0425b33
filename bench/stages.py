"""Exclusive wall time per stage of one evaluation, by wrapping engine functions.

Each wrapped call charges its own time minus the time of wrapped calls inside it to its stage;
everything not inside a wrapped call is "post-processing". Stages:
geometry (model preparation, flanking cuts), meshing (size plan, gmsh, uniform splits),
adapt (error indicators with their adjoint solves, and the bisection of the next level),
assembly (dof spaces, element matrices, boundary terms), solve (factorisation or AMG set-up,
substitutions, per-run heat flows), post-processing (figures, result blocks, field document).
"""

from __future__ import annotations

import functools
import importlib
import time
from contextlib import contextmanager

STAGES = ("geometry", "meshing", "adapt", "assembly", "solve", "post-processing")

#: (module, attribute, stage); a class attribute is "Class.method". Missing ones are skipped.
TARGETS = [
    ("coldseam.thermal.evaluate", "prepare", "geometry"),
    ("coldseam.thermal.evaluate", "flanking_values", "geometry"),
    ("coldseam.thermal.levels", "plan", "meshing"),
    ("coldseam.thermal.levels", "triangulate", "meshing"),
    ("coldseam.thermal.levels", "refine_uniform", "meshing"),
    ("coldseam.thermal.evaluate", "error_indicators", "adapt"),
    ("coldseam.thermal.evaluate", "next_level", "adapt"),
    ("coldseam.thermal.solve", "make_space", "assembly"),
    ("coldseam.fem.system", "ConductionProblem.__post_init__", "assembly"),
    ("coldseam.fem.system", "Stiffness.__init__", "assembly"),
    ("coldseam.thermal.solve", "run", "solve"),
    ("coldseam.fem.system", "factorize", "solve"),
    ("coldseam.fem.solvers", "DirectSolver.solve", "solve"),
    ("coldseam.fem.solvers", "MultigridSolver.solve", "solve"),
    ("coldseam.fem.solvers", "CholeskySolver.solve", "solve"),
]


class StageClock:
    def __init__(self) -> None:
        self.totals = dict.fromkeys(STAGES, 0.0)
        self._stack: list[float] = []  # child time accumulated per open call

    def wrap(self, fn, stage: str):
        @functools.wraps(fn)
        def timed(*args, **kwargs):
            self._stack.append(0.0)
            start = time.perf_counter()
            try:
                return fn(*args, **kwargs)
            finally:
                elapsed = time.perf_counter() - start
                children = self._stack.pop()
                self.totals[stage] += elapsed - children
                if self._stack:
                    self._stack[-1] += elapsed
        return timed

    def reset(self) -> None:
        self.totals = dict.fromkeys(STAGES, 0.0)


@contextmanager
def instrumented():
    """Patch the engine for the duration; yields the clock (reset it before each run)."""
    clock = StageClock()
    undo = []
    for module_name, attribute, stage in TARGETS:
        module = importlib.import_module(module_name)
        owner, name = module, attribute
        if "." in attribute:
            owner_name, name = attribute.split(".")
            owner = getattr(module, owner_name, None)
        original = getattr(owner, name, None) if owner is not None else None
        if original is None:
            continue
        setattr(owner, name, clock.wrap(original, stage))
        undo.append((owner, name, original))
    try:
        yield clock
    finally:
        for owner, name, original in reversed(undo):
            setattr(owner, name, original)


def split(clock: StageClock, total: float) -> dict[str, float]:
    """Stage times of one run, post-processing being the remainder of ``total``."""
    out = {k: clock.totals[k] for k in STAGES if k != "post-processing"}
    out["post-processing"] = max(0.0, total - sum(out.values()))
    return out
