"""A real ``coldseam serve`` on 127.0.0.1: evaluate, stop, start again, the result is still there."""

from __future__ import annotations

import json
import os
import signal
import socket
import subprocess
import sys
import time
from contextlib import contextmanager

import httpx
import pytest
from api_support import WALL_1D

# ISO 6946: U = 1 / (Rsi + Σ d/λ + Rse) of the example wall.
WALL_U = 1 / (0.13 + 0.100 / 0.035 + 0.200 / 1.0 + 0.04)


def _free_port() -> int:
    with socket.socket() as probe:
        probe.bind(("127.0.0.1", 0))
        return probe.getsockname()[1]


@contextmanager
def _serve(data_dir, port: int, log_path):
    environment = {k: v for k, v in os.environ.items() if not k.startswith("COLDSEAM_")}
    with open(log_path, "ab") as log:
        server = subprocess.Popen(
            [sys.executable, "-m", "coldseam.cli", "serve", "--host", "127.0.0.1", "--port",
             str(port), "--data-dir", str(data_dir), "--workers", "1"],
            stdout=log, stderr=log, env=environment)
        try:
            _wait_healthy(f"http://127.0.0.1:{port}", server)
            yield f"http://127.0.0.1:{port}"
        finally:
            server.send_signal(signal.SIGTERM)
            try:
                server.wait(timeout=20)
            except subprocess.TimeoutExpired:
                server.kill()
                server.wait()
    # uvicorn shuts down cleanly on SIGTERM, then re-raises the signal: -15 is a clean stop.
    assert server.returncode in (0, -signal.SIGTERM), log_path.read_text()
    assert "Application shutdown complete" in log_path.read_text()


def _wait_healthy(base: str, server: subprocess.Popen) -> None:
    deadline = time.monotonic() + 30
    while time.monotonic() < deadline:
        if server.poll() is not None:
            raise AssertionError(f"server exited with {server.returncode}")
        try:
            if httpx.get(f"{base}/healthz", timeout=1).status_code == 200:
                return
        except httpx.TransportError:
            time.sleep(0.1)
    raise AssertionError("server did not become healthy")


@pytest.mark.slow
def test_served_results_survive_a_restart(tmp_path):
    port, log_path = _free_port(), tmp_path / "server.log"
    with _serve(tmp_path / "data", port, log_path) as base:
        posted = httpx.post(f"{base}/api/v1/evaluations", json=WALL_1D, timeout=60,
                            headers={"x-request-id": "first-post"})
        assert posted.status_code == 200, posted.text
        body = posted.json()
        assert body["L2D"] == pytest.approx(WALL_U, rel=1e-6)
    with _serve(tmp_path / "data", port, log_path) as base:
        again = httpx.get(f"{base}/api/v1/evaluations/{body['id']}", timeout=10)
        assert again.status_code == 200
        assert again.json() == body
    lines = [json.loads(line.split(" coldseam.access ", 1)[1])
             for line in log_path.read_text().splitlines() if " coldseam.access " in line]
    first = next(line for line in lines if line["request_id"] == "first-post")
    assert (first["method"], first["path"], first["status"]) == (
        "POST", "/api/v1/evaluations", 200)
