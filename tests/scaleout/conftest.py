"""Session fixtures of the scale-out tests: one PostgreSQL server and one Dask cluster (a
scheduler and two single-threaded worker processes), started here and torn down after."""

from __future__ import annotations

import os
import sys
from collections.abc import Iterator
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parent))

from scaleout_support import Dask, Postgres, dask_cluster, postgres  # noqa: E402


@pytest.fixture(autouse=True)
def _no_service_environment(monkeypatch: pytest.MonkeyPatch) -> None:
    for name in list(os.environ):
        if name.startswith("COLDSEAM_"):
            monkeypatch.delenv(name)


@pytest.fixture(scope="session")
def pg() -> Iterator[Postgres]:
    with postgres() as server:
        yield server


@pytest.fixture
def database_url(pg: Postgres) -> str:
    """A fresh, empty database on the session's server."""
    return pg.new_database()


@pytest.fixture(scope="session")
def cluster(tmp_path_factory: pytest.TempPathFactory) -> Iterator[Dask]:
    log = tmp_path_factory.mktemp("dask") / "dask.log"
    with dask_cluster(log, workers=2) as running:
        yield running
