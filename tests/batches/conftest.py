"""Fixtures of the batch tests: TestClients on fresh apps with the stand-in batch engine (or
the real one), and a helper that waits for a batch to finish."""

from __future__ import annotations

import os
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import Any

import pytest
from batch_support import FAKE
from fastapi.testclient import TestClient

from coldseam.api.main import create_app
from coldseam.settings import Settings


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
