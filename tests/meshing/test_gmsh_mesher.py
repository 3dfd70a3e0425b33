"""The mesher's output depends on its input alone, not on what the process meshed before."""

from __future__ import annotations

import json
import os
import signal
import threading
from pathlib import Path

import numpy as np
import pytest

from coldseam.meshing.gmsh_mesher import triangulate
from coldseam.meshing.sizes import plan
from coldseam.schema import parse_request
from coldseam.templates import build
from coldseam.thermal.model import prepare


def thin_bridge() -> dict:
    """Thin layers crossed by a 2 mm aluminium strip (the benchmark's section): thin layers are
    where gmsh's length scale matters."""
    return json.loads((Path(__file__).resolve().parents[2] / "examples" /
                       "thin-bridge.json").read_text())


def mesh_of(request: dict):
    model = prepare(parse_request(request))
    return triangulate(model.classified, plan(model.classified))[0]


def test_a_mesh_does_not_depend_on_what_was_meshed_before():
    alone = mesh_of(thin_bridge())
    mesh_of(build("balcony", {}))  # another, larger model in between
    after_other = mesh_of(thin_bridge())
    again = mesh_of(thin_bridge())
    for mesh in (after_other, again):
        assert np.array_equal(mesh.points, alone.points)
        assert np.array_equal(mesh.triangles, alone.triangles)


def ignored_signals() -> int:
    status = Path("/proc/self/status").read_text()
    return int(status.split("SigIgn:")[1].split()[0], 16)


@pytest.mark.skipif(not Path("/proc/self/status").exists(), reason="reads Linux's /proc")
def test_meshing_leaves_sigpipe_ignored_so_a_closed_socket_is_an_exception_not_death():
    """gmsh's start-up reset SIGPIPE to 'terminate': a process that meshed and then wrote to a
    closed pipe died with status 141 instead of raising BrokenPipeError."""
    bit = 1 << (signal.SIGPIPE - 1)
    assert ignored_signals() & bit  # Python ignores it from the start
    thread = threading.Thread(target=lambda: mesh_of(thin_bridge()))
    thread.start()
    thread.join()
    mesh_of(thin_bridge())
    assert ignored_signals() & bit
    reader, writer = os.pipe()
    os.close(reader)
    with pytest.raises(BrokenPipeError):
        os.write(writer, b"x")
    os.close(writer)
