"""Engines for the fault tests, run inside real worker processes. Each wraps the real engine
or stands in for it; the behaviour is chosen by the section's description."""

from __future__ import annotations

import os
import signal
import time

from coldseam.thermal.evaluate import evaluate as real_evaluate


def crashing_mesher(request, progress=None):
    """The real engine, except that a section described ``gmsh-segfault`` makes gmsh's mesh
    generation die of SIGSEGV, as a crash inside the C++ library would."""
    if (request.section.description or "") == "gmsh-segfault":
        import gmsh

        def generate(dim: int = 3) -> None:
            os.kill(os.getpid(), signal.SIGSEGV)

        gmsh.model.mesh.generate = generate
    return real_evaluate(request, progress)


def greedy(request, progress=None):
    """``alloc=<MiB>``: allocate that much at once; ``sleep=<s>``: wait; else the real
    engine."""
    command = request.section.description or ""
    if command.startswith("alloc="):
        block = bytearray(int(float(command.split("=", 1)[1]) * 2**20))
        block[::4096] = b"\x01" * len(block[::4096])  # touch every page
        raise AssertionError(f"allocated {len(block)} bytes under the memory limit")
    if command.startswith("sleep="):
        time.sleep(float(command.split("=", 1)[1]))
    return real_evaluate(request, progress)
