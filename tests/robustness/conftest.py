"""Fixtures of the robustness tests: settings on a temporary data folder with the real engine,
and TestClients on fresh apps."""

from __future__ import annotations

import os
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import Any

import pytest
from fastapi.testclient import TestClient

from coldseam.api.main import create_app
from coldseam.settings import Settings


@pytest.fixture(autouse=True)
def _no_service_environment(monkeypatch: pytest.MonkeyPatch) -> None:
    """Settings of the machine running the tests must not leak into them."""
    for name in list(os.environ):
        if name.startswith("COLDSEAM_"):
            monkeypatch.delenv(name)


@pytest.fixture
def make_settings(tmp_path: Path) -> Callable[..., Settings]:
    def make(**changes: Any) -> Settings:
        values = {"data_dir": tmp_path / "data", "workers": 1, "frontend_dir": None,
                  "prestart_workers": False, **changes}
        return Settings(**values)

    return make


@pytest.fixture
def client_for(make_settings: Callable[..., Settings]) -> Callable[..., Any]:
    """``with client_for(**settings) as client:`` a TestClient on a fresh app."""

    @contextmanager
    def open_client(**changes: Any) -> Iterator[TestClient]:
        app = create_app(make_settings(**changes))
        with TestClient(app, raise_server_exceptions=False) as client:
            yield client

    return open_client
