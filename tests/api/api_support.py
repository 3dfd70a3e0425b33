"""Requests and constants shared by the service tests."""

from __future__ import annotations

import copy
import json
from pathlib import Path
from typing import Any

REPO = Path(__file__).resolve().parents[2]
WALL_1D: dict[str, Any] = json.loads((REPO / "examples" / "wall-1d.json").read_text())
FAKE = "fake_engines:evaluate"
REAL_WITH_HOOK = "fake_engines:real_with_exit_hook"


def wall(**section_changes: Any) -> dict[str, Any]:
    """A copy of the example request with some section fields changed."""
    request = copy.deepcopy(WALL_1D)
    request["section"].update(section_changes)
    return request


def fake(command: str = "", name: str = "fake section") -> dict[str, Any]:
    """A request for the fake engine; ``command`` is its behaviour (see fake_engines)."""
    return wall(name=name, description=f"fake: {command}")
