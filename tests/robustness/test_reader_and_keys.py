"""The DXF reader under concurrent uploads, after its process died, and with curves of
enormous size; and a key setting that holds no key, which must not start an open server."""

from __future__ import annotations

import io
import os
import signal
import subprocess
import sys
import time
from concurrent.futures import ThreadPoolExecutor

import ezdxf
import pytest

from coldseam.api.reader import drawing_reader

LAYERS = ('{"PART": {"material": "part", "conductivity": 1.0}, '
          '"IN": {"environment": "in", "temperature": 20, "side": "interior", '
          '"surface_resistance": 0.13}, '
          '"OUT": {"environment": "out", "temperature": 0, "side": "exterior", '
          '"surface_resistance": 0.04}}')


def _drawing(build) -> bytes:
    doc = ezdxf.new()
    doc.header["$INSUNITS"] = 4
    build(doc.modelspace())
    text = io.StringIO()
    doc.write(text)
    return text.getvalue().encode()


def _wall(msp) -> None:
    msp.add_lwpolyline([(0, 0), (300, 0), (300, 1000), (0, 1000)], close=True,
                       dxfattribs={"layer": "PART"})
    msp.add_line((0, 0), (0, 1000), dxfattribs={"layer": "OUT"})
    msp.add_line((300, 0), (300, 1000), dxfattribs={"layer": "IN"})


WALL = _drawing(_wall)


def _upload(client, data: bytes):
    return client.post("/api/v1/imports/dxf", files={"file": ("x.dxf", data)},
                       data={"layer_map": LAYERS, "unit": "mm"})


def test_a_dead_reader_process_is_replaced_not_blamed_on_the_next_upload(client_for):
    # Found: a reader killed between drawings failed the next, innocent upload with a false
    # 413 "needed more than the 4096 MiB memory limit".
    with client_for() as client:
        assert _upload(client, WALL).status_code == 200
        reader = drawing_reader(4096)  # the default worker memory limit
        (process,) = reader._executor._processes.values()
        os.kill(process.pid, signal.SIGKILL)
        process.join(10)
        after = _upload(client, WALL)
        assert after.status_code == 200, after.text
        assert len(after.json()["section"]["regions"]) == 1


def test_an_ellipse_of_enormous_axis_is_read_in_moments(client_for):
    # Found: a 16 KB drawing with one ellipse of 1e12 axis took ~40 s to read.
    def build(msp) -> None:
        _wall(msp)
        msp.add_ellipse((0, 0), major_axis=(1e12, 0), ratio=0.5, dxfattribs={"layer": "X"})

    with client_for() as client:
        started = time.monotonic()
        response = client.post("/api/v1/imports/dxf", files={"file": ("x.dxf", _drawing(build))})
        assert response.status_code == 200, response.text
        assert time.monotonic() - started < 15


def test_a_spline_of_too_many_spans_is_refused_before_it_is_flattened(client_for):
    def build(msp) -> None:
        _wall(msp)
        msp.add_spline([(k, (k % 2) * 10, 0) for k in range(5000)],
                       dxfattribs={"layer": "X"})

    with client_for() as client:
        response = client.post("/api/v1/imports/dxf", files={"file": ("x.dxf", _drawing(build))})
        assert response.status_code == 413, response.text
        assert "estimated before flattening" in response.json()["detail"]


def test_uploads_past_the_waiting_line_are_429_and_the_server_answers_meanwhile(client_for):
    lines = "".join(f"0\nLINE\n8\nPART\n10\n{i * 0.01:.3f}\n20\n0\n11\n{(i + 1) * 0.01:.3f}\n"
                    "21\n0\n" for i in range(15_000))
    slow = ("0\nSECTION\n2\nENTITIES\n" + lines + "0\nENDSEC\n0\nEOF\n").encode()
    with client_for() as client, ThreadPoolExecutor(10) as pool:
        uploads = [pool.submit(client.post, "/api/v1/imports/dxf",
                               files={"file": ("x.dxf", slow)}) for _ in range(10)]
        time.sleep(0.3)
        started = time.monotonic()
        assert client.get("/healthz").status_code == 200
        assert client.get("/api/v1/evaluations").status_code == 200
        answered = time.monotonic() - started
        statuses = sorted(f.result().status_code for f in uploads)
    refused = [f.result() for f in uploads if f.result().status_code == 429]
    assert refused and all(r.headers["retry-after"] == "5" for r in refused), statuses
    # their bodies are not read: the connection is closed so the server stops parsing them
    assert all(r.headers["connection"] == "close" for r in refused), statuses
    assert "waiting line is full" in refused[0].json()["detail"]
    assert 500 not in statuses
    assert answered < 5, answered


def _serve(*args: str, **env: str) -> subprocess.CompletedProcess:
    environment = {k: v for k, v in os.environ.items() if not k.startswith("COLDSEAM_")}
    environment.update(env)
    return subprocess.run([sys.executable, "-m", "coldseam.cli", "serve", "--host", "0.0.0.0",
                           "--port", "1", *args], capture_output=True, text=True, timeout=60,
                          env=environment)


@pytest.mark.parametrize("keys", [",", " ", " , ,"])
def test_a_key_setting_without_a_key_refuses_to_start(keys):
    # Found: COLDSEAM_API_KEYS="," served an open API on a public address.
    done = _serve(COLDSEAM_API_KEYS=keys)
    assert done.returncode == 2, done.stderr
    assert "COLDSEAM_API_KEYS is set but holds no key" in done.stderr


@pytest.mark.parametrize("text", ["", "# keys of the Eastmere office\n\n"])
def test_a_key_file_without_a_digest_refuses_to_start(tmp_path, text):
    path = tmp_path / "keys"
    path.write_text(text)
    done = _serve(COLDSEAM_API_KEY_HASHES_FILE=str(path))
    assert done.returncode == 2, done.stderr
    assert "holds no key digest" in done.stderr


def test_an_app_with_an_empty_key_setting_does_not_start(make_settings):
    from fastapi.testclient import TestClient

    from coldseam.api.auth import NoKeysLoaded
    from coldseam.api.main import create_app

    with pytest.raises(NoKeysLoaded), TestClient(create_app(make_settings(api_keys=","))):
        pass
