"""A bounded load test on 127.0.0.1: 300 requests from 16 clients at once against a real
server with two workers; small, medium and large sections, repeats, and some bad requests.
Every valid request must be answered 200, every bad one 4xx; the memory of the server and its
workers must stay flat. Latencies are printed, not asserted."""

from __future__ import annotations

import random
import statistics
import threading
import time
from collections import defaultdict

import httpx
import pytest
from robust_server import resident, serve
from robust_support import wall_request

from coldseam.templates import build

REQUESTS, CLIENTS = 300, 16
TEMPLATES = ["wall_corner", "floor_slab", "window_reveal", "eaves", "balcony"]
#: Growth of memory allowed between the warm-up point (100 requests) and the end: for the
#: server process alone (where state left behind by requests would pile up), and for server
#: and workers together (a worker's resident size follows its largest recent mesh: +-60 MiB
#: from run to run here, whatever the number of requests).
SERVER_FLAT, TOTAL_FLAT = 32 * 2**20, 128 * 2**20


def _small(n: int) -> dict:
    request = wall_request()
    request["section"]["materials"][1]["conductivity"] = round(1.0 + n * 1e-4, 6)
    return request


def _template(n: int, levels: int) -> dict:
    request = build(TEMPLATES[n % len(TEMPLATES)], {})
    environment = request["section"]["environments"][0]  # a distinct request per n
    environment["temperature"] = round(environment["temperature"] + n * 1e-3, 6)
    request["options"] = {"max_levels": levels}
    return request


BAD = [
    ("not JSON", b'{"section": '),
    ("no unit", lambda: {k: v for k, v in wall_request()["section"].items() if k != "unit"}),
    ("crossing polygon", lambda: _crossing()),
    ("unknown material", lambda: _unknown_material()),
]


def _crossing() -> dict:
    request = wall_request()
    request["section"]["regions"][0]["polygon"] = [[0, 0], [100, 1000], [100, 0], [0, 1000]]
    return request


def _unknown_material() -> dict:
    request = wall_request()
    request["section"]["regions"][0]["material"] = "granite"
    return request


def plan(seed: int = 20260114) -> list[tuple[str, object]]:
    """(kind, body) of every request, shuffled: 60 % small, 20 % medium, 4 % large,
    8 % repeats of earlier ones, 8 % bad."""
    rnd = random.Random(seed)
    out: list[tuple[str, object]] = []
    for n in range(REQUESTS):
        u = rnd.random()
        if u < 0.60:
            out.append(("small", _small(n)))
        elif u < 0.80:
            out.append(("medium", _template(n, 5)))
        elif u < 0.84:
            out.append(("large", _template(n, 7)))
        elif u < 0.92 and (valid := [body for kind, body in out if not kind.startswith("bad")]):
            out.append(("repeat", rnd.choice(valid)))
        else:
            name, body = BAD[n % len(BAD)]
            out.append((f"bad: {name}", body() if callable(body) else body))
    return out


class Run:
    def __init__(self, base: str, work: list[tuple[str, object]]) -> None:
        self.base, self.work = base, work
        self.lock = threading.Lock()
        self.next = 0
        self.latency: dict[str, list[float]] = defaultdict(list)
        self.wrong: list[tuple[str, int, str]] = []
        self.done = 0

    def client(self) -> None:
        with httpx.Client(base_url=self.base, timeout=120) as http:
            while (item := self._take()) is not None:
                kind, body = item
                started = time.perf_counter()
                if isinstance(body, bytes):
                    response = http.post("/api/v1/evaluations", content=body,
                                         headers={"content-type": "application/json"})
                else:
                    response = http.post("/api/v1/evaluations", json=body)
                self._record(kind, response, time.perf_counter() - started)

    def _take(self):
        with self.lock:
            if self.next >= len(self.work):
                return None
            self.next += 1
            return self.work[self.next - 1]

    def _record(self, kind: str, response: httpx.Response, seconds: float) -> None:
        expected = (400, 499) if kind.startswith("bad") else (200, 200)
        with self.lock:
            self.latency[kind.split(":")[0]].append(seconds)
            self.done += 1
            if not expected[0] <= response.status_code <= expected[1]:
                self.wrong.append((kind, response.status_code, response.text[:200]))


def _report(run: Run, wall: float, rss: list[tuple[str, int]]) -> None:
    print(f"\n{REQUESTS} requests, {CLIENTS} clients, 2 workers: {wall:.1f} s, "
          f"{REQUESTS / wall:.1f} requests/s")
    for kind, values in sorted(run.latency.items()):
        values = sorted(values)
        pick = [values[min(len(values) - 1, int(q * len(values)))] for q in (0.5, 0.9, 0.99)]
        print(f"  {kind:7s} n={len(values):3d}  p50 {pick[0] * 1000:7.0f} ms  p90 "
              f"{pick[1] * 1000:7.0f} ms  p99 {pick[2] * 1000:7.0f} ms  max "
              f"{values[-1] * 1000:7.0f} ms  mean {statistics.mean(values) * 1000:7.0f} ms")
    print("  memory of server + workers: " + ", ".join(f"{label} {value / 2**20:.0f} MiB"
                                                      for label, value in rss))


@pytest.mark.load
def test_three_hundred_mixed_requests_from_sixteen_clients(tmp_path):
    work = plan()
    with serve(tmp_path / "data", tmp_path / "server.log", workers=2) as server:
        run = Run(server.base, work)
        rss = [("idle", server.rss())]
        own = []  # the server process alone
        threads = [threading.Thread(target=run.client) for _ in range(CLIENTS)]
        started = time.monotonic()
        for thread in threads:
            thread.start()
        while run.done < 100 and any(t.is_alive() for t in threads):
            time.sleep(0.05)
        rss.append(("after 100", server.rss()))
        own.append(resident(server.process.pid))
        for thread in threads:
            thread.join(120)
        wall = time.monotonic() - started
        rss.append((f"after {run.done}", server.rss()))
        time.sleep(1.0)
        rss.append(("1 s later", server.rss()))
        own.append(resident(server.process.pid))
        rss += [("server alone after 100", own[0]), ("at the end", own[1])]
        _report(run, wall, rss)
        assert run.done == REQUESTS
        assert run.wrong == [], run.wrong[:5]
        assert own[1] - own[0] < SERVER_FLAT, rss
        assert rss[3][1] - rss[1][1] < TOTAL_FLAT, rss
        health = httpx.get(f"{server.base}/healthz").json()
        assert health["status"] == "ok"
