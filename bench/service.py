"""The service on loopback: latency and throughput of POST /api/v1/evaluations, and the
cold start of ``coldseam evaluate``.

The server runs as ``python -m coldseam.cli serve`` with 2 workers in its own data folder.
Results are stored by content hash (the same request again is answered from the store), so
every request gets a unique section name — part of the hash, harmless to the physics — and
the store never answers. Requests cycle through the templates at their defaults.
"""

from __future__ import annotations

import json
import os
import socket
import statistics
import subprocess
import sys
import tempfile
import time
from concurrent.futures import ThreadPoolExecutor
from pathlib import Path

from sections import layered_wall, template_sections


def _free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


def _start(data_dir: str, workers: int, extra_env: dict | None = None):
    port = _free_port()
    env = {**os.environ, "COLDSEAM_LOG_LEVEL": "WARNING", **(extra_env or {})}
    process = subprocess.Popen(
        [sys.executable, "-m", "coldseam.cli", "serve", "--host", "127.0.0.1", "--port",
         str(port), "--data-dir", data_dir, "--workers", str(workers)],
        env=env, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    import httpx

    base = f"http://127.0.0.1:{port}"
    deadline = time.monotonic() + 60
    while time.monotonic() < deadline:
        try:
            if httpx.get(base + "/healthz", timeout=1).status_code == 200:
                return process, base
        except httpx.HTTPError:
            time.sleep(0.2)
    process.terminate()
    raise RuntimeError("the service did not start within 60 s")


def _requests(count: int, tag: str) -> list[dict]:
    templates = list(template_sections().values())
    out = []
    for k in range(count):
        request = json.loads(json.dumps(templates[k % len(templates)]))
        request["section"]["name"] = f"bench {tag} {k} {time.time_ns()}"
        out.append(request)
    return out


def _post(client, base: str, request: dict) -> tuple[float, int]:
    start = time.perf_counter()
    response = client.post(base + "/api/v1/evaluations", json=request, timeout=300)
    return time.perf_counter() - start, response.status_code


def load(base: str, clients: int, count: int) -> dict:
    import httpx

    requests = _requests(count, f"c{clients}")
    with httpx.Client() as client, ThreadPoolExecutor(clients) as pool:
        _post(client, base, _requests(1, "warm")[0])
        start = time.perf_counter()
        done = list(pool.map(lambda r: _post(client, base, r), requests))
        elapsed = time.perf_counter() - start
    latencies = sorted(t for t, status in done if status == 200)
    failures = sum(1 for _, status in done if status != 200)
    p50 = statistics.median(latencies) if latencies else float("nan")
    p95 = latencies[min(len(latencies) - 1, int(0.95 * len(latencies)))] if latencies else p50
    return {"clients": clients, "requests": count, "failures": failures, "p50": p50,
            "p95": p95, "max": max(latencies, default=float("nan")),
            "throughput": len(latencies) / elapsed}


def service(counts: dict[int, int], workers: int = 2) -> list[dict]:
    with tempfile.TemporaryDirectory() as data_dir:
        process, base = _start(data_dir, workers)
        try:
            return [load(base, clients, count) for clients, count in counts.items()]
        finally:
            process.terminate()
            process.wait(timeout=30)


def cli_cold_start(repeats: int = 5) -> dict:
    """Wall time of ``coldseam evaluate small.json`` in a fresh interpreter (median, min)."""
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "small.json"
        path.write_text(json.dumps(layered_wall()))
        script = Path(sys.executable).parent / "coldseam"
        command = [str(script)] if script.exists() else [sys.executable, "-m", "coldseam.cli"]
        times = []
        for _ in range(repeats):
            start = time.perf_counter()
            subprocess.run(command + ["evaluate", str(path)], check=True,
                           stdout=subprocess.DEVNULL)
            times.append(time.perf_counter() - start)
    return {"median": statistics.median(times), "min": min(times), "repeats": repeats,
            "command": " ".join(Path(c).name for c in command) + " evaluate small.json"}
