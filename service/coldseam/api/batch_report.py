"""``GET /api/v1/batches/{id}/report``: the printable schedule report (``coldseam.reporting``),
with the pictures of the first ``MAX_PICTURES`` done junctions embedded."""

from __future__ import annotations

import json
from typing import Any

from fastapi import APIRouter
from fastapi.concurrency import run_in_threadpool
from fastapi.responses import HTMLResponse

from coldseam.api.batch_view import batch_document
from coldseam.api.batches import NOT_FOUND, owned
from coldseam.api.deps import EvaluationsDep, OwnerDep
from coldseam.api.jobs import Evaluations
from coldseam.api.pictures import reporting
from coldseam.api.store import storage_key

router = APIRouter(prefix="/batches", tags=["batches"])
MAX_PICTURES = 60  # a schedule report, not a picture book: later junctions get a note


@router.get("/{batch_id}/report", response_class=HTMLResponse, responses=NOT_FOUND)
async def batch_report(batch_id: str, evaluations: EvaluationsDep,
                       owner: OwnerDep) -> HTMLResponse:
    """A printable HTML schedule: the table, Σ ψ·l, each junction's picture and verdict, and
    the caution."""
    key, record = await run_in_threadpool(owned, evaluations, owner, batch_id)
    document = await run_in_threadpool(batch_document, evaluations, key, record)
    render = reporting("schedule_report", "render_schedule_report")
    pictures = await run_in_threadpool(_pictures, evaluations, owner, document)
    return HTMLResponse(await run_in_threadpool(render, document, pictures))


def _pictures(evaluations: Evaluations, owner: str, document: dict[str, Any]) -> dict[int, str]:
    render_svg = reporting("picture", "render_svg")
    pictures: dict[int, str] = {}
    drawn: dict[str, str] = {}
    for item in document["items"]:
        if len(pictures) >= MAX_PICTURES:
            break
        evaluation_id = item.get("evaluation_id")
        if item.get("status") != "done" or not evaluation_id:
            continue
        if evaluation_id not in drawn:
            svg = _picture(evaluations, storage_key(owner, evaluation_id), render_svg)
            if svg is None:
                continue
            drawn[evaluation_id] = svg
        pictures[item["position"]] = drawn[evaluation_id]
    return pictures


def _picture(evaluations: Evaluations, key: str, render_svg: Any) -> str | None:
    field, record = evaluations.store.field(key), evaluations.store.get(key)
    if field is None or record is None or record.result is None:
        return None
    return render_svg(json.loads(field), {"id": record.id, **record.result})
