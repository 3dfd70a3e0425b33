"""Slow and idle clients against a served build on loopback: a body trickled in is cut off
with 408 after the body time limit, headers trickled in (or none sent) close the connection
after the header time limit, and other clients are served meanwhile; /healthz answers at once
while evaluations and DXF reads keep the server busy. Bounded in time: every socket has a
timeout, and the limits are set to 2 s here."""

from __future__ import annotations

import json
import socket
import subprocess
import sys
import threading
import time
from concurrent.futures import ThreadPoolExecutor

import httpx
import pytest
from robust_server import serve
from robust_support import wall_request

LIMIT = 2.0


@pytest.fixture(scope="module")
def server(tmp_path_factory):
    folder = tmp_path_factory.mktemp("slow")
    with serve(folder / "data", folder / "server.log", workers=1,
               body_timeout=str(LIMIT), header_timeout=str(LIMIT)) as running:
        running.log = folder / "server.log"
        yield running


def _connect(server) -> socket.socket:
    host, port = server.base.removeprefix("http://").split(":")
    connection = socket.create_connection((host, int(port)), timeout=30)
    return connection


def _answer(connection: socket.socket) -> bytes:
    chunks = []
    while True:
        try:
            chunk = connection.recv(65536)
        except (ConnectionResetError, TimeoutError):
            break
        if not chunk:
            break
        chunks.append(chunk)
    return b"".join(chunks)


def _trickle(connection: socket.socket, data: bytes, stop: threading.Event,
             every: float = 0.25) -> None:
    for byte in data:
        if stop.is_set():
            return
        try:
            connection.sendall(bytes([byte]))
        except OSError:
            return
        time.sleep(every)


def test_a_body_trickled_in_is_cut_off_with_408_and_others_are_served(server):
    connection = _connect(server)
    stop = threading.Event()
    try:
        connection.sendall(b"POST /api/v1/evaluations HTTP/1.1\r\nHost: x\r\n"
                           b"Content-Type: application/json\r\nContent-Length: 5000\r\n\r\n")
        started = time.monotonic()
        sender = threading.Thread(target=_trickle, args=(connection, b"{" * 5000, stop))
        sender.start()
        during = httpx.post(f"{server.base}/api/v1/evaluations", json=wall_request(),
                            timeout=60)
        assert during.status_code == 200, during.text
        answer = _answer(connection)
        elapsed = time.monotonic() - started
    finally:
        stop.set()
        connection.close()
    assert answer.startswith(b"HTTP/1.1 408"), answer[:200]
    assert b"did not arrive within 2 s" in answer
    assert elapsed < LIMIT + 10, elapsed


def test_headers_trickled_in_close_the_connection(server):
    connection = _connect(server)
    stop = threading.Event()
    try:
        started = time.monotonic()
        sender = threading.Thread(target=_trickle, args=(
            connection, b"GET /healthz HTTP/1.1\r\nHost: x\r\nX-Slow: " + b"a" * 400, stop))
        sender.start()
        assert httpx.get(f"{server.base}/healthz", timeout=5).status_code == 200
        answer = _answer(connection)
        elapsed = time.monotonic() - started
    finally:
        stop.set()
        connection.close()
    assert answer == b"", answer[:200]
    assert LIMIT - 0.5 < elapsed < LIMIT + 5, elapsed


def test_a_connection_that_sends_nothing_is_closed(server):
    connection = _connect(server)
    try:
        started = time.monotonic()
        assert _answer(connection) == b""
        elapsed = time.monotonic() - started
    finally:
        connection.close()
    assert LIMIT - 0.5 < elapsed < LIMIT + 5, elapsed


def test_a_keep_alive_connection_serves_requests_one_after_another(server):
    with httpx.Client(base_url=server.base, timeout=10) as client:
        for _ in range(3):
            assert client.get("/healthz").status_code == 200
            time.sleep(LIMIT / 4)


def _many_lines(count: int) -> bytes:
    lines = "".join(f"0\nLINE\n8\nPART\n10\n{i * 0.01:.3f}\n20\n0\n11\n"
                    f"{(i + 1) * 0.01:.3f}\n21\n0\n" for i in range(count))
    return ("0\nSECTION\n2\nHEADER\n9\n$INSUNITS\n70\n4\n0\nENDSEC\n0\nSECTION\n2\nENTITIES\n"
            + lines + "0\nENDSEC\n0\nEOF\n").encode()


#: Health checks from a process of their own (in this one, the load's client threads would
#: hold the GIL and the delay measured would be the test's own).
HEALTH_PROBE = """
import json, sys, time, httpx
base, seconds = sys.argv[1], float(sys.argv[2])
delays = []
with httpx.Client(timeout=10) as client:
    client.get(base + "/healthz")
    end = time.monotonic() + seconds
    while time.monotonic() < end:
        started = time.monotonic()
        assert client.get(base + "/healthz").status_code == 200
        delays.append(time.monotonic() - started)
        time.sleep(0.05)
print(json.dumps(delays))
"""


def test_health_answers_at_once_while_evaluations_and_drawings_load_the_server(server):
    drawing = _many_lines(19_000)  # a second or more of reading each
    requests = []
    for k in range(6):
        request = wall_request(max_levels=4)
        request["section"]["description"] = f"load {k}"
        requests.append(request)
    statuses: list[int] = []

    def upload() -> None:
        answer = httpx.post(f"{server.base}/api/v1/imports/dxf", timeout=120,
                            files={"file": ("x.dxf", drawing)})
        statuses.append(answer.status_code)

    def evaluate(request) -> None:
        statuses.append(httpx.post(f"{server.base}/api/v1/evaluations", json=request,
                                   timeout=120).status_code)

    probe = subprocess.Popen([sys.executable, "-c", HEALTH_PROBE, server.base, "10"],
                             stdout=subprocess.PIPE, text=True)
    with ThreadPoolExecutor(24) as pool:
        load = [pool.submit(upload) for _ in range(12)]
        load += [pool.submit(evaluate, r) for r in requests]
        for future in load:
            future.result()
    out, _ = probe.communicate(timeout=60)
    delays = sorted(json.loads(out))
    print(f"/healthz under load: {len(delays)} checks, median {delays[len(delays) // 2]:.3f} s,"
          f" max {delays[-1]:.3f} s; statuses {sorted(statuses)}")
    assert 429 in statuses, statuses  # the DXF reader's waiting line filled: refused at once
    assert statuses.count(200) >= len(requests), statuses
    assert 500 not in statuses
    assert delays[-1] < 1.0, delays  # the 0.1 s aim is measured in bench/, not asserted here


def test_a_body_cut_short_by_the_client_leaving_is_no_server_fault(server):
    connection = _connect(server)
    connection.sendall(b"POST /api/v1/evaluations HTTP/1.1\r\nHost: x\r\n"
                       b"Content-Type: application/json\r\nContent-Length: 5000\r\n\r\n"
                       + b'{"section": {"unit": "mm"')
    connection.close()
    time.sleep(0.5)
    assert httpx.get(f"{server.base}/healthz", timeout=10).status_code == 200
    text = server.log.read_text()
    assert "client went away before its request body arrived" in text
    assert "unexpected failure" not in text
