"""The generated hostile sweep (hostile_cases.py) against the app and against one served
build: zero 5xx. Every status is recorded in the test report (``record_property`` for the
JUnit XML, and a table printed, shown with ``-rA``)."""

from __future__ import annotations

from collections import Counter

import httpx
import pytest
from hostile_cases import cases, send
from robust_server import serve

CASES = cases()


def _sweep(client, record_property, label: str) -> None:
    statuses = {case.name: send(client, case) for case in CASES}
    table = Counter(statuses.values())
    record_property(f"{label} statuses", dict(sorted(table.items())))
    record_property(f"{label} cases", statuses)
    print(f"\n{label}: {len(statuses)} hostile requests, statuses {dict(sorted(table.items()))}")
    for name, status in statuses.items():
        print(f"  {status}  {name}")
    failures = {name: status for name, status in statuses.items() if status >= 500}
    assert not failures, failures


def test_the_sweep_has_every_kind():
    names = {case.name.split(": ")[0] for case in CASES}
    assert {"evaluation", "cavity", "dynamics", "template", "template-evaluation",
            "layer-map", "batch", "section", "value query"} <= names
    assert len(CASES) > 400


def test_the_app_answers_the_sweep_without_a_5xx(client_for, record_property):
    with client_for(evaluation_timeout=60) as client:
        _sweep(client, record_property, "app")


@pytest.mark.slow
def test_a_served_build_answers_the_sweep_without_a_5xx(tmp_path, record_property):
    with serve(tmp_path / "data", tmp_path / "server.log", workers=2,
               evaluation_timeout="60") as server, \
            httpx.Client(base_url=server.base, timeout=120) as client:
        _sweep(client, record_property, "served")
        assert client.get("/healthz").status_code == 200
        assert server.process.poll() is None
