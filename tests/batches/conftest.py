"""Fixtures of the batch tests: TestClients on fresh apps with the stand-in batch engine (or
the real one), and a helper that waits for a batch to finish."""

from __future__ import annotations

import os
import time
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import Any

import pytest
from fastapi.testclient import TestClient

from coldseam.api.main import create_app
from coldseam.settings import Settings

FAKE = "batch_engines:evaluate"


@pytest.fixture(autouse=True)
def _no_service_environment(monkeypatch: pytest.MonkeyPatch) -> None:
    for name in list(os.environ):
        if name.startswith("COLDSEAM_"):
            monkeypatch.delenv(name)


@pytest.fixture
def client_for(tmp_path: Path) -> Callable[..., Any]:
    """``with client_for(**settings) as client:`` a TestClient on a fresh app."""

    @contextmanager
    def open_client(**changes: Any) -> Iterator[TestClient]:
        values = {"data_dir": tmp_path / "data", "engine": FAKE, "workers": 1,
                  "frontend_dir": None, "prestart_workers": False, **changes}
        with TestClient(create_app(Settings(**values))) as client:
            yield client

    return open_client


@pytest.fixture
def client(client_for: Callable[..., Any]) -> Iterator[TestClient]:
    with client_for() as test_client:
        yield test_client


def finished(client: TestClient, batch_id: str, timeout: float = 60.0,
             **headers: str) -> dict[str, Any]:
    """The batch once every item has finished."""
    deadline = time.monotonic() + timeout
    while time.monotonic() < deadline:
        body = client.get(f"/api/v1/batches/{batch_id}", headers=headers).json()
        if body["status"] in ("done", "failed"):
            return body
        time.sleep(0.05)
    raise AssertionError(f"batch {batch_id} did not finish in {timeout} s: {body['counts']}")


REPO = Path(__file__).resolve().parents[2]


def wall(**section_changes: Any) -> dict[str, Any]:
    """The example wall request (examples/wall-1d.json) with some section fields changed."""
    import json

    request = json.loads((REPO / "examples" / "wall-1d.json").read_text())
    request["section"].update(section_changes)
    return request
