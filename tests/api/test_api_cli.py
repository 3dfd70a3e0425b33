"""``coldseam evaluate``: result JSON on stdout, bad input exits 2 with the reason on stderr."""

from __future__ import annotations

import json
import os
import subprocess
import sys

import pytest
from api_support import REPO

from coldseam.schema.evaluation import parse_request, request_digest

WALL = REPO / "examples" / "wall-1d.json"
# ISO 6946: U = 1 / (Rsi + Σ d/λ + Rse) of the example wall.
WALL_U = 1 / (0.13 + 0.100 / 0.035 + 0.200 / 1.0 + 0.04)


def _run(*args: str, stdin: str | None = None, **env: str) -> subprocess.CompletedProcess:
    environment = {k: v for k, v in os.environ.items() if not k.startswith("COLDSEAM_")}
    environment.update(env)
    return subprocess.run([sys.executable, "-m", "coldseam.cli", *args], input=stdin,
                          capture_output=True, text=True, env=environment, timeout=120)


def test_evaluate_prints_the_result_with_its_id():
    done = _run("evaluate", str(WALL))
    assert done.returncode == 0, done.stderr
    result = json.loads(done.stdout)
    assert result["id"] == request_digest(parse_request(json.loads(WALL.read_text())))
    assert result["L2D"] == pytest.approx(WALL_U, rel=1e-6)
    assert "competent person" in result["caution"]


def test_evaluate_reads_a_bare_section_from_stdin():
    section = json.loads(WALL.read_text())["section"]
    done = _run("evaluate", "-", "--indent", "0", stdin=json.dumps(section))
    assert done.returncode == 0, done.stderr
    assert len(done.stdout.strip().splitlines()) == 1
    assert json.loads(done.stdout)["L2D"] > 0


@pytest.mark.parametrize(("text", "words"), [
    ('{"section": ', "not valid JSON"),
    ('{"section": {"regions": []}}', "/section/unit: 'unit' is required"),
])
def test_bad_input_exits_2_with_the_reason(text, words):
    done = _run("evaluate", "-", stdin=text)
    assert done.returncode == 2
    assert words in done.stderr
    assert done.stdout == ""


def test_missing_file_exits_2():
    done = _run("evaluate", "no-such-section.json")
    assert done.returncode == 2
    assert "no-such-section.json" in done.stderr


def test_evaluate_does_not_load_the_web_stack(tmp_path):
    probe = ("import sys, io, contextlib; from coldseam.cli import main\n"
             "with contextlib.redirect_stdout(io.StringIO()):\n"
             f"    code = main(['evaluate', {str(WALL)!r}])\n"
             "web = sorted(m for m in sys.modules if m.split('.')[0] in "
             "('fastapi', 'uvicorn', 'starlette', 'httpx'))\n"
             "print(code, web)")
    done = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True,
                          timeout=120)
    assert done.stdout.strip() == "0 []", done.stderr


def test_evaluate_of_a_small_section_skips_what_it_does_not_need():
    # Cold-start cost (bench/notes.md, "CLI cold start (session 2)"): the settings, the
    # worker's multiprocessing and scipy.spatial (a k-d tree; brute force for few vertices).
    probe = ("import sys, io, contextlib; from coldseam.cli import main\n"
             "with contextlib.redirect_stdout(io.StringIO()):\n"
             f"    code = main(['evaluate', {str(WALL)!r}])\n"
             "skipped = ('pydantic_settings', 'coldseam.settings', 'multiprocessing', "
             "'scipy.spatial')\n"
             "print(code, sorted(m for m in sys.modules if m in skipped))")
    done = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True,
                          timeout=120)
    assert done.stdout.strip() == "0 []", done.stderr


def test_serve_refuses_an_open_server_off_loopback():
    done = _run("serve", "--host", "0.0.0.0", "--port", "1")
    assert done.returncode == 2
    assert "refusing to serve without API keys" in done.stderr


def test_evaluate_runs_the_dynamic_example():
    example = REPO / "examples" / "dynamics-slab-edge.json"
    done = _run("evaluate", str(example))
    assert done.returncode == 0, done.stderr
    dynamics = json.loads(done.stdout)["dynamics"]
    series = json.loads(example.read_text())["dynamics"]["transient"]["temperatures"]["outside"]
    assert len(dynamics["transient"]["times_hours"]) == len(series)
    assert set(dynamics["periodic"]["coupling"]) == {"inside|outside"}
    assert len(dynamics["time_constants_hours"]) == 3


def test_a_dynamic_request_without_density_exits_2_naming_the_material(tmp_path):
    request = json.loads(WALL.read_text())
    request["dynamics"] = {"time_constants": {}}
    path = tmp_path / "wall-dynamic.json"
    path.write_text(json.dumps(request))
    done = _run("evaluate", str(path))
    assert done.returncode == 2
    assert "/section/materials/0/density" in done.stderr and "'mineral_wool'" in done.stderr
