"""``/api/v1/evaluations``: submit a section, follow it, read its result and field."""

from __future__ import annotations

import asyncio
import json
from datetime import UTC, datetime
from typing import Annotated, Any

from fastapi import APIRouter, HTTPException, Query, Request
from fastapi.concurrency import run_in_threadpool
from fastapi.responses import JSONResponse, Response

from coldseam import CAUTION
from coldseam.api import examples
from coldseam.api.deps import EvaluationsDep, OwnerDep, SettingsDep
from coldseam.api.errors import error_body, failure_response, request_id_of, status_of
from coldseam.api.jobs import Evaluations
from coldseam.api.limits import check_limits
from coldseam.api.models import (
    ErrorOut,
    EvaluationAccepted,
    EvaluationPage,
    EvaluationSummary,
)
from coldseam.api.store import Record
from coldseam.errors import InvalidSection
from coldseam.schema.evaluation import EvaluationRequest, parse_request
from coldseam.schema.jsonlimits import load_json
from coldseam.settings import Settings

router = APIRouter(prefix="/evaluations", tags=["evaluations"])

ERRORS: dict[int | str, dict[str, Any]] = {
    413: {"model": ErrorOut, "description": "Body, vertices, regions or mesh over the limits."},
    422: {"model": ErrorOut, "description": "The request names the offending field.",
          "content": {"application/json": {"example": examples.INVALID}}},
    408: {"model": ErrorOut, "description": "The body did not arrive within the time limit."},
    429: {"model": ErrorOut, "description": "Queue full; see Retry-After."},
    503: {"model": ErrorOut, "description": "The result store cannot be written."},
    507: {"model": ErrorOut, "description": "The disk holding results is full."},
}
REQUEST_BODY = {
    "required": True,
    "description": "An evaluation request (model-v1), or a bare section.",
    "content": {"application/json": {
        "schema": {"$ref": "#/components/schemas/EvaluationRequest"},
        "examples": {"wall-1d": {"summary": "A plain two-layer wall, 300 mm",
                                 "value": examples.WALL_1D}},
    }},
}
RESULT = {"description": "The result (model-v1) with its id, status and the request as sent.",
          "content": {"application/json": {"example": examples.WALL_1D_RESULT}}}
RESULT_OR_STATE = {
    "description": "The result when done (as POST answers it); before that, or when it failed, "
    "an EvaluationStatusOut.",
    "content": {"application/json": {
        "schema": {"anyOf": [{"type": "object"},
                             {"$ref": "#/components/schemas/EvaluationStatusOut"}]},
        "examples": {"done": {"value": examples.WALL_1D_RESULT},
                     "running": {"value": examples.RUNNING}}}},
}


@router.post("", openapi_extra={"requestBody": REQUEST_BODY}, status_code=200,
             responses={200: RESULT, 202: {"model": EvaluationAccepted}, **ERRORS})
async def create_evaluation(request: Request, evaluations: EvaluationsDep,
                            settings: SettingsDep, owner: OwnerDep,
                            wait: bool = True) -> Response:
    """Evaluate a section. The id is a hash of the request: the same request again answers
    with the stored result at once. With ``wait=false`` the answer is 202 at once; follow
    ``GET /api/v1/evaluations/{id}``."""
    text = await read_text(request)
    parsed = await run_in_threadpool(parse_checked, text, settings)
    return await create_from_request(request, evaluations, owner, parsed, text, wait)


async def create_from_request(request: Request, evaluations: Evaluations, owner: str,
                              parsed: EvaluationRequest, text: str, wait: bool) -> Response:
    """Submit ``parsed`` (sent as ``text``); the result, or 202 when not ``wait``."""
    submitted = await run_in_threadpool(evaluations.submit, owner, parsed, text,
                                        request_id_of(request))
    if not wait:
        location = f"/api/v1/evaluations/{submitted.id}"
        status = "done" if submitted.done is None else "queued"
        return JSONResponse({"id": submitted.id, "status": status, "location": location},
                            status_code=202, headers={"Location": location})
    if submitted.done is not None:
        outcome = await asyncio.wrap_future(submitted.done)
        if not outcome.ok:
            return failure_response(outcome.error, request)
    return await stored_response(evaluations, owner, submitted.id, request)


@router.get("", response_model=EvaluationPage)
def list_evaluations(evaluations: EvaluationsDep, owner: OwnerDep,
                     limit: Annotated[int, Query(ge=1, le=100)] = 20,
                     offset: Annotated[int, Query(ge=0, le=2**62)] = 0) -> EvaluationPage:
    """The caller's evaluations, newest first. (``offset`` stays within SQLite's integers.)"""
    records, total = evaluations.store.page(owner, limit, offset)
    items = [EvaluationSummary(id=r.id, name=r.name, status=r.status,
                               created_at=iso(r.created_at), **(r.summary or {}))
             for r in records]
    return EvaluationPage(items=items, total=total, limit=limit, offset=offset)


@router.get("/{evaluation_id}", responses={200: RESULT_OR_STATE, 404: {"model": ErrorOut}})
async def get_evaluation(evaluation_id: str, request: Request, evaluations: EvaluationsDep,
                         owner: OwnerDep) -> Response:
    """The result when done; otherwise ``status`` (queued, running, failed), ``stage`` and
    ``progress`` (0..1)."""
    return await stored_response(evaluations, owner, evaluation_id, request)


@router.get("/{evaluation_id}/field", responses={404: {"model": ErrorOut}})
def get_field(evaluation_id: str, evaluations: EvaluationsDep, owner: OwnerDep) -> Response:
    """The temperature field of the final mesh as compact JSON (points in metres)."""
    key, _ = finished(evaluations, owner, evaluation_id)
    data = evaluations.store.field(key)
    if data is None:
        raise HTTPException(404, f"evaluation {evaluation_id} has no stored field")
    return Response(data, media_type="application/json")


def finished(evaluations: Evaluations, owner: str, evaluation_id: str) -> tuple[str, Record]:
    """The key and record of a done evaluation; 404 when unknown, 409 when not done."""
    key, record, live = evaluations.record(owner, evaluation_id)
    if record is None:
        raise HTTPException(404, f"no evaluation {evaluation_id} (for this key)")
    if live is not None or record.status != "done":
        status = live.status if live is not None else record.status
        raise HTTPException(409, f"evaluation {evaluation_id} is {status}, not done")
    return key, record


async def read_text(request: Request) -> str:
    body = await request.body()
    try:
        return body.decode("utf-8")
    except UnicodeDecodeError as exc:
        raise InvalidSection(f"the body is not UTF-8 text (byte {exc.start})") from None


def parse_checked(text: str, settings: Settings) -> EvaluationRequest:
    """Decode, validate and size-check a request body."""
    parsed = parse_request(load_json(text))
    check_limits(parsed, settings)
    return parsed


async def stored_response(evaluations: Evaluations, owner: str, evaluation_id: str,
                          request: Request) -> Response:
    key, record, live = await run_in_threadpool(evaluations.record, owner, evaluation_id)
    if record is None:
        raise HTTPException(404, f"no evaluation {evaluation_id} (for this key)")
    return JSONResponse(record_body(record, live, request_id_of(request)))


def record_body(record: Record, live: Any, request_id: str) -> dict[str, Any]:
    """The JSON of a record: the full result when done, the state otherwise."""
    base = {"id": record.id, "created_at": iso(record.created_at)}
    if live is not None:
        return {**base, "status": live.status, "stage": live.stage, "progress": live.progress}
    if record.status == "done":
        result = dict(record.result or {})
        result.setdefault("caution", CAUTION)
        return {"id": record.id, **result, "status": "done", **base,
                "request": json.loads(record.request_text)}
    body: dict[str, Any] = {**base, "status": record.status, "stage": record.stage,
                            "progress": record.progress}
    if record.error is not None:
        error = record.error
        origin = error.get("request_id") or request_id
        body["error"] = {**error_body(error["kind"], error["message"], error.get("field", ""),
                                      origin), "status": status_of(error["kind"])}
    body["request"] = json.loads(record.request_text)
    return body


def iso(timestamp: float) -> str:
    return datetime.fromtimestamp(timestamp, UTC).strftime("%Y-%m-%dT%H:%M:%SZ")
