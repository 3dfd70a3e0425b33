"""Pictures and the report of a done evaluation, drawn by ``coldseam.reporting``."""

from __future__ import annotations

import datetime
import importlib
import json
from typing import Annotated, Any

from fastapi import APIRouter, HTTPException, Query
from fastapi.concurrency import run_in_threadpool
from fastapi.responses import HTMLResponse, Response

from coldseam.api.deps import EvaluationsDep, OwnerDep
from coldseam.api.evaluations import finished
from coldseam.api.jobs import Evaluations
from coldseam.api.models import ErrorOut
from coldseam.schema.evaluation import parse_request

router = APIRouter(prefix="/evaluations", tags=["evaluations"])
NOT_FOUND: dict[int | str, dict[str, Any]] = {404: {"model": ErrorOut},
                                              409: {"model": ErrorOut}}


def reporting(module: str, name: str) -> Any:
    """``coldseam.reporting.<module>.<name>``, imported on first use (it pulls matplotlib)."""
    try:
        return getattr(importlib.import_module(f"coldseam.reporting.{module}"), name)
    except (ImportError, AttributeError):
        raise HTTPException(501, f"this installation cannot draw ({module}.{name} is "
                            "missing)") from None


def _field_and_result(evaluations: Evaluations, owner: str,
                      evaluation_id: str) -> tuple[dict, dict, dict]:
    key, record = finished(evaluations, owner, evaluation_id)
    data = evaluations.store.field(key)
    if data is None:
        raise HTTPException(404, f"evaluation {evaluation_id} has no stored field")
    result = {"id": record.id, **(record.result or {})}
    request = parse_request(json.loads(record.request_text)).model_dump(mode="json")
    return json.loads(data), result, request


@router.get("/{evaluation_id}/picture.svg", response_class=Response, responses=NOT_FOUND)
async def picture_svg(evaluation_id: str, evaluations: EvaluationsDep,
                      owner: OwnerDep) -> Response:
    """The temperature field as SVG."""
    field, result, _ = await run_in_threadpool(_field_and_result, evaluations, owner,
                                               evaluation_id)
    render = reporting("picture", "render_svg")
    svg = await run_in_threadpool(render, field, result)
    return Response(svg, media_type="image/svg+xml")


@router.get("/{evaluation_id}/picture.png", response_class=Response, responses=NOT_FOUND)
async def picture_png(evaluation_id: str, evaluations: EvaluationsDep,
                      owner: OwnerDep) -> Response:
    """The temperature field as PNG."""
    field, result, _ = await run_in_threadpool(_field_and_result, evaluations, owner,
                                               evaluation_id)
    render = reporting("picture", "render_png")
    png = await run_in_threadpool(render, field, result)
    return Response(png, media_type="image/png")


def _transient_result(evaluations: Evaluations, owner: str, evaluation_id: str) -> dict:
    _, record = finished(evaluations, owner, evaluation_id)
    result = {"id": record.id, **(record.result or {})}
    if not (result.get("dynamics") or {}).get("transient"):
        raise HTTPException(404, f"evaluation {evaluation_id} has no transient run (ask for "
                            "one with dynamics.transient in the request)")
    return result


@router.get("/{evaluation_id}/transient.svg", response_class=Response, responses=NOT_FOUND)
async def transient_svg(evaluation_id: str, evaluations: EvaluationsDep,
                        owner: OwnerDep) -> Response:
    """The transient run (surface temperatures, dew point, heat flows over time) as SVG."""
    result = await run_in_threadpool(_transient_result, evaluations, owner, evaluation_id)
    render = reporting("transient_plot", "render_transient_svg")
    return Response(await run_in_threadpool(render, result), media_type="image/svg+xml")


@router.get("/{evaluation_id}/transient.png", response_class=Response, responses=NOT_FOUND)
async def transient_png(evaluation_id: str, evaluations: EvaluationsDep,
                        owner: OwnerDep) -> Response:
    """The transient run as PNG."""
    result = await run_in_threadpool(_transient_result, evaluations, owner, evaluation_id)
    render = reporting("transient_plot", "render_transient_png")
    return Response(await run_in_threadpool(render, result), media_type="image/png")


HeaderText = Annotated[str | None, Query(max_length=200)]


@router.get("/{evaluation_id}/report", response_class=HTMLResponse, responses=NOT_FOUND)
async def report(evaluation_id: str, evaluations: EvaluationsDep, owner: OwnerDep,
                 project: HeaderText = None, author: HeaderText = None,
                 checked_by: HeaderText = None,
                 date: Annotated[datetime.date | None, Query()] = None) -> HTMLResponse:
    """A printable HTML report of the evaluation (inputs, results, picture, caution).

    ``project``, ``author`` (prepared by) and ``checked_by`` fill the report's title block
    (left blank to sign by hand when not given); ``date`` (YYYY-MM-DD) defaults to today."""
    field, result, request = await run_in_threadpool(_field_and_result, evaluations,
                                                     owner, evaluation_id)
    render_svg = reporting("picture", "render_svg")
    render_report = reporting("report", "render_report")
    svg = await run_in_threadpool(render_svg, field, result)
    details = {"project": project, "author": author, "checked_by": checked_by,
               "date": (date or datetime.date.today()).isoformat()}
    extra = ()  # the transient picture of a dynamic evaluation
    if (result.get("dynamics") or {}).get("transient"):
        extra = (await run_in_threadpool(
            reporting("transient_plot", "render_transient_svg"), result),)
    html = await run_in_threadpool(lambda: render_report(result, request, svg, *extra,
                                                         details=details))
    return HTMLResponse(html)
