"""``coldseam evaluate``: a DXF drawing with its layer map, and a reader that stops early."""

from __future__ import annotations

import json
import os
import subprocess
import sys

import pytest
from api_support import REPO

from coldseam.imports.dxf import import_dxf
from coldseam.schema.evaluation import parse_request, request_digest

DXF = REPO / "examples" / "demo-parapet.dxf"
LAYERS = REPO / "examples" / "demo-parapet-layers.json"
WALL = REPO / "examples" / "wall-1d.json"


def _run(*args: str, stdout: int | None = subprocess.PIPE) -> subprocess.CompletedProcess:
    environment = {k: v for k, v in os.environ.items() if not k.startswith("COLDSEAM_")}
    return subprocess.run([sys.executable, "-m", "coldseam.cli", *args], stdout=stdout,
                          stderr=subprocess.PIPE, text=True, env=environment, timeout=120)


def test_evaluate_imports_a_dxf_drawing_with_its_layer_map():
    done = _run("evaluate", str(DXF), "--layers", str(LAYERS), "--indent", "0")
    assert done.returncode == 0, done.stderr
    result = json.loads(done.stdout)
    imported = import_dxf(DXF.read_bytes(), json.loads(LAYERS.read_text()), None,
                          name=DXF.name)
    # the same section the import endpoint builds: the id is the digest of that request
    assert result["id"] == request_digest(parse_request({"section": imported["section"]}))
    assert set(result["heat_flows"]) == {"outside", "library"}
    assert result["L2D"] > 0
    for warning in imported["warnings"]:
        assert warning in result["warnings"]


def test_a_dxf_drawing_without_a_layer_map_is_refused_with_the_way_out():
    done = _run("evaluate", str(DXF))
    assert done.returncode == 2
    assert "needs a layer map: --layers map.json" in done.stderr


def test_a_bad_layer_map_names_the_layer(tmp_path):
    bad = tmp_path / "map.json"
    layers = json.loads(LAYERS.read_text())
    layers["PIR"] = {"material": "pir"}  # neither λ nor library
    bad.write_text(json.dumps(layers))
    done = _run("evaluate", str(DXF), "--layers", str(bad))
    assert done.returncode == 2
    assert "/layer_map/PIR" in done.stderr, done.stderr


@pytest.mark.parametrize("source", [WALL, DXF])
def test_a_reader_that_stops_early_ends_the_command_quietly(source):
    """``coldseam evaluate x.json | head``: the pipe is closed before the result is written."""
    read_end, write_end = os.pipe()
    os.close(read_end)
    try:
        extra = ["--layers", str(LAYERS)] if source == DXF else []
        done = _run("evaluate", str(source), *extra, stdout=write_end)
    finally:
        os.close(write_end)
    assert "Traceback" not in done.stderr and "BrokenPipe" not in done.stderr, done.stderr
    assert done.returncode == 0
