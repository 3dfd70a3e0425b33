"""``/api/v1/batches``: many evaluations as one resource — a junction schedule or a grid of
template parameters — followed item by item, with Σ ψ·l and the results as CSV or XLSX.

The routes are thin: the batch document is read by ``coldseam.batches.spec`` (JSON) or
``coldseam.batches.schedule`` (a CSV schedule, ``Content-Type: text/csv``), the items are fed
to the pool by the ``BatchRunner`` and the answers built by ``batch_view``.
"""

from __future__ import annotations

import asyncio
from typing import Annotated, Any

from fastapi import APIRouter, Depends, HTTPException, Query, Request
from fastapi.concurrency import run_in_threadpool
from fastapi.responses import JSONResponse, Response

from coldseam.api import examples
from coldseam.api.batch_runner import BatchRunner
from coldseam.api.batch_store import BatchRecord
from coldseam.api.batch_view import batch_document
from coldseam.api.deps import EvaluationsDep, OwnerDep, SettingsDep
from coldseam.api.evaluations import read_text
from coldseam.api.models import BatchAccepted, BatchPage, ErrorOut
from coldseam.api.store import storage_key
from coldseam.batches.schedule import parse_schedule
from coldseam.batches.spec import parse_batch
from coldseam.batches.tables import result_rows, to_csv, to_xlsx
from coldseam.errors import InvalidSection
from coldseam.schema.jsonlimits import load_json

router = APIRouter(prefix="/batches", tags=["batches"])
XLSX = "application/vnd.openxmlformats-officedocument.spreadsheetml.sheet"
WAIT_POLL = 0.2  # s between two looks at a batch a client waits for
NOT_FOUND: dict[int | str, dict[str, Any]] = {404: {"model": ErrorOut}}
BATCH_BODY = {
    "required": True,
    "description": "A batch document (items and/or grid), or a CSV schedule "
    "(Content-Type: text/csv; columns id,template,length,<parameter>...).",
    "content": {
        "application/json": {"schema": {"type": "object"},
                             "examples": {"schedule": {"value": examples.BATCH}}},
        "text/csv": {"schema": {"type": "string"}, "example": examples.BATCH_CSV},
    },
}


def get_runner(request: Request) -> BatchRunner:
    return request.app.state.batches


RunnerDep = Annotated[BatchRunner, Depends(get_runner)]


@router.post("", status_code=202, openapi_extra={"requestBody": BATCH_BODY},
             responses={200: {"description": "The finished batch (with wait=true)."},
                        202: {"model": BatchAccepted}, 413: {"model": ErrorOut},
                        422: {"model": ErrorOut}})
async def create_batch(request: Request, runner: RunnerDep, settings: SettingsDep,
                       owner: OwnerDep, evaluations: EvaluationsDep, wait: bool = False,
                       name: Annotated[str | None, Query(max_length=200)] = None) -> Response:
    """Evaluate many junctions: ``items`` (a template with parameters, or a full request,
    each with an optional ``length`` in m) and/or a ``grid`` (the Cartesian product of
    parameter values). Answers 202 with the batch id at once; ``wait=true`` answers 200 with
    the batch when every item has finished."""
    text = await read_text(request)
    csv = request.headers.get("content-type", "").split(";")[0].strip() == "text/csv"
    spec = await run_in_threadpool(_parse, text, csv, name, settings.max_batch_items)
    batch_id = await run_in_threadpool(runner.create, owner, spec)
    location = f"/api/v1/batches/{batch_id}"
    if wait:
        key = storage_key(owner, batch_id)
        document = await _finished_document(evaluations, key)
        return JSONResponse(document, headers={"Location": location})
    return JSONResponse({"id": batch_id, "status": "queued", "location": location,
                         "items": len(spec.items)}, status_code=202,
                        headers={"Location": location})


def _parse(text: str, csv: bool, name: str | None, max_items: int) -> Any:
    if csv:
        return parse_batch(parse_schedule(text, name), max_items)
    try:
        data = load_json(text)
    except InvalidSection as exc:
        if "not valid JSON" not in exc.message:
            raise
        raise InvalidSection(f"{exc.message} (a CSV schedule needs Content-Type: text/csv)",
                             exc.field) from None
    if name is not None and isinstance(data, dict):
        data.setdefault("name", name)
    return parse_batch(data, max_items)


async def _finished_document(evaluations: Any, key: str) -> dict[str, Any]:
    while True:
        record = await run_in_threadpool(evaluations.store.batch, key)
        document = await run_in_threadpool(batch_document, evaluations, key, record)
        if document["status"] in ("done", "failed"):
            return document
        await asyncio.sleep(WAIT_POLL)


@router.get("", response_model=BatchPage)
def list_batches(evaluations: EvaluationsDep, owner: OwnerDep,
                 limit: Annotated[int, Query(ge=1, le=100)] = 20,
                 offset: Annotated[int, Query(ge=0, le=2**62)] = 0) -> BatchPage:
    """The caller's batches, newest first, with their counts (no items)."""
    keys, total = evaluations.store.batch_page(owner, limit, offset)
    summaries = []
    for key in keys:
        document = batch_document(evaluations, key, evaluations.store.batch(key), limit=0)
        document.pop("items")
        summaries.append(document)
    return BatchPage(items=summaries, total=total, limit=limit, offset=offset)


@router.get("/{batch_id}", responses=NOT_FOUND)
def get_batch(batch_id: str, evaluations: EvaluationsDep, owner: OwnerDep,
              limit: Annotated[int, Query(ge=1, le=1000)] = 1000,
              offset: Annotated[int, Query(ge=0, le=2**62)] = 0) -> JSONResponse:
    """The batch: ``status``, ``counts``, ``sum_psi_l`` (W/K, over the done items with a
    length) and ``limit`` items from ``offset`` (``total`` of them in all)."""
    key, record = owned(evaluations, owner, batch_id)
    return JSONResponse(batch_document(evaluations, key, record, limit, offset))


@router.get("/{batch_id}/results.csv", response_class=Response, responses=NOT_FOUND)
def results_csv(batch_id: str, evaluations: EvaluationsDep, owner: OwnerDep) -> Response:
    """One row per item (header with units), then Σ ψ·l and the caution."""
    rows, name = _rows(evaluations, owner, batch_id)
    return Response(to_csv(rows), media_type="text/csv; charset=utf-8",
                    headers=_attachment(name, "csv"))


@router.get("/{batch_id}/results.xlsx", response_class=Response, responses=NOT_FOUND)
def results_xlsx(batch_id: str, evaluations: EvaluationsDep, owner: OwnerDep) -> Response:
    """The same rows as results.csv, as a spreadsheet."""
    rows, name = _rows(evaluations, owner, batch_id)
    return Response(to_xlsx(rows, name or "Schedule"), media_type=XLSX,
                    headers=_attachment(name, "xlsx"))


@router.post("/{batch_id}/cancel", responses=NOT_FOUND)
def cancel_batch(batch_id: str, evaluations: EvaluationsDep, owner: OwnerDep,
                 runner: RunnerDep) -> JSONResponse:
    """Stop a batch: its items not yet started fail as cancelled; those running finish."""
    key, _ = owned(evaluations, owner, batch_id)
    cancelled = runner.cancel(key)
    document = batch_document(evaluations, key, evaluations.store.batch(key), limit=0)
    document.pop("items")
    return JSONResponse({**document, "cancelled_items": cancelled})


def owned(evaluations: Any, owner: str, batch_id: str) -> tuple[str, BatchRecord]:
    """The key and record of the caller's batch; 404 for any other."""
    key = storage_key(owner, batch_id)
    record = evaluations.store.batch(key)
    if record is None:
        raise HTTPException(404, f"no batch {batch_id} (for this key)")
    return key, record


def _rows(evaluations: Any, owner: str, batch_id: str) -> tuple[list, str | None]:
    key, record = owned(evaluations, owner, batch_id)
    return result_rows(batch_document(evaluations, key, record)), record.name


def _attachment(name: str | None, extension: str) -> dict[str, str]:
    stem = "".join(c if c.isalnum() or c in "-_" else "-" for c in (name or "batch"))[:60]
    return {"Content-Disposition": f'attachment; filename="{stem or "batch"}-results.'
                                   f'{extension}"'}
