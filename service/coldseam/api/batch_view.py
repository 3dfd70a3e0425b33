"""The JSON document of a batch (``GET /api/v1/batches/{id}``), built from the store and the
live state of the items in flight; the results table and the page read the same document."""

from __future__ import annotations

import math
from datetime import UTC, datetime
from typing import Any

from coldseam import CAUTION
from coldseam.api.batch_store import BatchRecord, ItemRecord
from coldseam.api.errors import error_body, status_of
from coldseam.api.jobs import Evaluations
from coldseam.api.store import storage_key


def batch_status(counts: dict[str, int], total: int) -> str:
    """queued (nothing started), running, done (every item done) or failed (every item
    finished, at least one failed: ``counts`` says how many)."""
    if counts["queued"] == total and total:
        return "queued"
    if counts["queued"] or counts["running"]:
        return "running"
    return "failed" if counts["failed"] else "done"


def batch_document(evaluations: Evaluations, key: str, record: BatchRecord,
                   limit: int = -1, offset: int = 0) -> dict[str, Any]:
    """The batch with ``limit`` of its items (-1: all) from ``offset``."""
    store = evaluations.store
    counts = store.batch_counts(key)
    total = sum(counts.values())
    items = store.batch_items(key, limit, offset)
    live = _live_counts(evaluations, record.owner, items)
    values, with_length = store.batch_psi_l(key)
    return {
        "id": record.id, "name": record.name, "status": batch_status(counts, total),
        "cancelled": record.cancelled, "created_at": _iso(record.created_at),
        "counts": counts, "total": total, "limit": limit if limit >= 0 else total,
        "offset": offset, "grid": record.spec.get("grid"),
        "items": [item_document(item, live.get(item.position)) for item in items],
        "sum_psi_l": math.fsum(values) if values else (0.0 if with_length else None),
        "sum_psi_l_items": len(values), "items_with_length": with_length,
        "caution": CAUTION,
    }


def item_document(item: ItemRecord, live: Any = None) -> dict[str, Any]:
    body: dict[str, Any] = {
        "id": item.item_id, "position": item.position, "status": item.status,
        "template": item.template, "parameters": item.parameters,
        "evaluation_id": item.evaluation_id, "length": item.length, "psi": item.psi,
        "psi_l": item.psi_l, "fRsi": item.fRsi, "min_temperature": item.min_temperature,
        "L2D": item.L2D, "verdict": item.verdict, "error": None, "progress": None,
        "stage": None,
    }
    if live is not None:  # handed to the pool: waiting there or running
        body.update(status=live.status, stage=live.stage, progress=live.progress)
    if item.status == "done":
        body["progress"] = 1.0
    if item.error is not None:
        error = item.error
        body["error"] = {**error_body(error["kind"], error["message"], error.get("field", ""),
                                      error.get("request_id", "-")),
                         "status": status_of(error["kind"])}
    return body


def _live_counts(evaluations: Evaluations, owner: str, items: list[ItemRecord]) -> dict:
    """The live state of the page's items that are in the pool, by position."""
    found = {}
    for item in items:
        if item.status == "running" and item.evaluation_id:
            live = evaluations.live(storage_key(owner, item.evaluation_id))
            if live is not None:
                found[item.position] = live
    return found


def _iso(timestamp: float) -> str:
    return datetime.fromtimestamp(timestamp, UTC).strftime("%Y-%m-%dT%H:%M:%SZ")
