"""Helpers shared by the batch tests (imported by name: a module called ``conftest`` would
clash with the other test folders' conftest modules in one pytest run)."""

from __future__ import annotations

import time
from pathlib import Path
from typing import Any

from fastapi.testclient import TestClient

FAKE = "batch_engines:evaluate"


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
