"""``/api/v1/materials`` and ``/api/v1/templates``: the materials library and the parametric
junction templates (``coldseam.materials``, ``coldseam.templates``).

``GET /templates/{id}/value`` is made for spreadsheets: it answers one plain-text number (or
``format=csv``: a header line and a value line), and its errors are plain ``error: ...`` text.
"""

from __future__ import annotations

import asyncio
import dataclasses
import json
from typing import Annotated, Any, Literal

from fastapi import APIRouter, HTTPException, Path, Query, Request
from fastapi.concurrency import run_in_threadpool
from fastapi.responses import JSONResponse, PlainTextResponse, Response

from coldseam.api.deps import EvaluationsDep, OwnerDep, SettingsDep
from coldseam.api.errors import raise_failure, request_id_of
from coldseam.api.evaluations import (
    ERRORS,
    RESULT,
    create_from_request,
    read_text,
    stored_response,
)
from coldseam.api.jobs import Evaluations
from coldseam.api.limits import check_limits
from coldseam.api.models import EvaluationAccepted
from coldseam.errors import InvalidSection
from coldseam.schema.evaluation import EvaluationRequest, parse_request
from coldseam.schema.jsonlimits import load_json

router = APIRouter(tags=["templates and materials"])
TemplateId = Annotated[str, Path(description="A template id (GET /api/v1/templates).",
                                 examples=["wall_corner"])]

#: Where each quantity of the value endpoint is in a result document.
QUANTITIES = {
    "psi": ("psi", "value"),
    "L2D": ("L2D",),
    "fRsi": ("condensation", "fRsi"),
    "fRsi_critical": ("condensation", "fRsi_critical"),
    "theta_si_min": ("condensation", "min_temperature"),
    "min_temperature": ("condensation", "min_temperature"),
    "U": ("U",),
}
RESERVED = {"quantity", "format", "key", "errors"}
ERRORS_PARAMETER = ("'status' (default): errors answer 4xx/5xx with an 'error: ...' line. "
                    "'inline': errors answer 200 with the same line (the real status in the "
                    "X-Coldseam-Status header), for spreadsheet functions that show only a "
                    "generic cell error for any other status. A missing or refused API key "
                    "keeps its 401.")
KEY_PARAMETER = ("An API key, for callers that cannot send an Authorization header (spreadsheet "
                 "web-service functions); accepted on this endpoint only. URLs end up in proxy "
                 "and server logs, browser histories and the spreadsheet file: prefer the "
                 "header wherever the client can send one, and give spreadsheets a key of "
                 "their own.")
PARAMETERS_BODY = {
    "required": False,
    "content": {"application/json": {
        "schema": {"type": "object", "properties": {"parameters": {"type": "object"}},
                   "additionalProperties": False},
        "examples": {"defaults": {"summary": "The template's defaults", "value": {}},
                     "thicker": {"summary": "Some parameters set",
                                 "value": {"parameters": {"insulation_thickness": 160}}}},
    }},
}


@router.get("/materials")
def list_materials() -> JSONResponse:
    """The materials library: design λ in W/(m·K) with the source of each value."""
    from coldseam.materials import load_library

    return JSONResponse({"materials": [plain(m) for m in load_library().values()]})


@router.get("/templates")
def list_templates() -> JSONResponse:
    """The junction templates and their parameters (lengths in mm)."""
    return JSONResponse({"templates": [plain(t) for t in templates().list_templates()]})


@router.post("/templates/{template_id}/section", responses=ERRORS,
             openapi_extra={"requestBody": PARAMETERS_BODY})
async def template_section(template_id: TemplateId, request: Request) -> JSONResponse:
    """The evaluation request (section, ψ and condensation blocks) a template builds."""
    parameters = await read_parameters(request)
    built = await run_in_threadpool(build, template_id, parameters)
    return JSONResponse(built)


@router.post("/templates/{template_id}/evaluations",
             responses={200: RESULT, 202: {"model": EvaluationAccepted}, **ERRORS},
             openapi_extra={"requestBody": PARAMETERS_BODY})
async def template_evaluation(template_id: TemplateId, request: Request,
                              evaluations: EvaluationsDep, settings: SettingsDep,
                              owner: OwnerDep, wait: bool = True) -> Response:
    """Build a template's section and evaluate it, as ``POST /api/v1/evaluations``."""
    parameters = await read_parameters(request)
    built = await run_in_threadpool(build, template_id, parameters)
    parsed = await run_in_threadpool(checked_request, built, settings)
    return await create_from_request(request, evaluations, owner, parsed, json.dumps(built),
                                     wait)


@router.get("/templates/{template_id}/value", response_class=PlainTextResponse,
            responses={200: {"content": {"text/plain": {"example": "0.0613"},
                                         "text/csv": {"example": "insulation_thickness,psi\n"
                                                                 "160,0.0795454\n"}}}})
async def template_value(template_id: TemplateId, request: Request,
                         evaluations: EvaluationsDep, settings: SettingsDep, owner: OwnerDep,
                         quantity: Annotated[str, Query(examples=["psi"])] = "psi",
                         format: Annotated[Literal["text", "csv"], Query()] = "text",
                         key: Annotated[str | None, Query(description=KEY_PARAMETER)] = None,
                         errors: Annotated[Literal["status", "inline"],
                                           Query(description=ERRORS_PARAMETER)] = "status",
                         ) -> PlainTextResponse:
    """One figure of a template evaluation as plain text; other query parameters are the
    template's (e.g. ``?quantity=psi&insulation_thickness=160``; a decimal comma is read as
    a decimal point: ``160,5``). On a server with API keys, ``key`` may stand in for the
    Authorization header (see its caveat); ``errors=inline`` answers errors 200."""
    wanted = [q.strip() for q in quantity.split(",") if q.strip()]
    unknown = [q for q in wanted if q not in QUANTITIES]
    if not wanted or unknown:
        raise InvalidSection(f"quantity must be one of {', '.join(QUANTITIES)} (several, "
                             "comma-separated, with format=csv)", "/quantity")
    if len(wanted) > 1 and format != "csv":
        raise InvalidSection("several quantities need format=csv", "/quantity")
    given = {k: v for k, v in request.query_params.items() if k not in RESERVED}
    parameters = {k: query_value(v) for k, v in given.items()}
    built = await run_in_threadpool(build, template_id, parameters)
    parsed = await run_in_threadpool(checked_request, built, settings)
    result = await evaluated(evaluations, owner, parsed, json.dumps(built), request)
    values = [pick(result, q) for q in wanted]
    if format == "csv":
        header = ",".join([*given, *wanted])
        echoed = [number(v) if isinstance(v, float) else v for v in parameters.values()]
        line = ",".join([*echoed, *map(number, values)])
        return PlainTextResponse(f"{header}\n{line}\n", media_type="text/csv")
    # no line break after the number: LibreOffice's VALUE() refuses "0.0795\n" (Err:502)
    return PlainTextResponse(number(values[0]))


template_value.query_key = True  # type: ignore[attr-defined]  # see deps.takes_query_key


def templates() -> Any:
    import coldseam.templates as module

    if not hasattr(module, "list_templates") or not hasattr(module, "build"):
        raise HTTPException(501, "this installation has no junction templates")
    return module


def build(template_id: str, parameters: dict[str, Any]) -> dict[str, Any]:
    """The request dict a template builds; 404 for an unknown template."""
    module = templates()
    known = [plain(t)["id"] for t in module.list_templates()]
    if template_id not in known:
        raise HTTPException(404, f"no template '{template_id}' (templates: "
                            f"{', '.join(known)})")
    built = plain(module.build(template_id, parameters))
    return built if "section" in built else {"section": built}


def checked_request(built: dict[str, Any], settings: Any) -> EvaluationRequest:
    parsed = parse_request(built)
    check_limits(parsed, settings)
    return parsed


async def read_parameters(request: Request) -> dict[str, Any]:
    """The ``parameters`` object of a JSON body; an empty or missing body means defaults."""
    text = await read_text(request)
    if not text.strip():
        return {}
    body = load_json(text)
    if not isinstance(body, dict) or not isinstance(body.get("parameters", {}), dict):
        raise InvalidSection("the body must be {\"parameters\": {name: value, ...}}",
                             "/parameters")
    for key in body:
        if key != "parameters":  # a misspelt "parameters" would silently mean the defaults
            raise InvalidSection(f"'{key}' is not a field Coldseam knows here (misspelt? the "
                                 "body is {\"parameters\": {name: value, ...}})",
                                 "/" + key.replace("~", "~0").replace("/", "~1"))
    return body.get("parameters", {})


async def evaluated(evaluations: Evaluations, owner: str, parsed: EvaluationRequest,
                    text: str, request: Request) -> dict[str, Any]:
    """The stored or newly computed result of ``parsed`` (typed errors raised as such)."""
    submitted = await run_in_threadpool(evaluations.submit, owner, parsed, text,
                                        request_id_of(request))
    if submitted.done is not None:
        outcome = await asyncio.wrap_future(submitted.done)
        if not outcome.ok:
            raise_failure(outcome.error)
    response = await stored_response(evaluations, owner, submitted.id, request)
    return json.loads(response.body)


def pick(result: dict[str, Any], quantity: str) -> float:
    if quantity == "U":
        return effective_u(result)
    value: Any = result
    for part in QUANTITIES[quantity]:
        value = value.get(part) if isinstance(value, dict) else None
    if not isinstance(value, int | float):
        raise InvalidSection(f"this evaluation has no {quantity} (is the block for it "
                             "missing from the template's request?)", "/quantity")
    return float(value)


def effective_u(result: dict[str, Any]) -> float:
    """U of the whole modelled section: L2D over the length of its interior surfaces, in
    W/(m²·K); for a periodic framed wall this is the wall's effective U."""
    interior = [s.get("length", 0.0) for s in result.get("surfaces", {}).values()
                if s.get("side") == "interior"]
    if result.get("L2D") is None or not sum(interior):
        raise InvalidSection("this evaluation has no U: it needs two environments and an "
                             "interior surface", "/quantity")
    return float(result["L2D"]) / sum(interior)


def number(value: float) -> str:
    return f"{value:.6g}"


def query_value(text: str) -> float | str:
    """A query parameter as a number where it reads as one (a decimal comma, as spreadsheets
    in many locales write it, counts as a decimal point: ``160,5`` is 160.5), else the text."""
    candidate = text.strip()
    if candidate.count(",") == 1 and "." not in candidate:
        candidate = candidate.replace(",", ".")
    try:
        return float(candidate)
    except ValueError:
        return text


def plain(item: Any) -> Any:
    """A library or template object as JSON-able data."""
    if hasattr(item, "as_dict"):
        return item.as_dict()
    if hasattr(item, "model_dump"):
        return item.model_dump(mode="json")
    if dataclasses.is_dataclass(item) and not isinstance(item, type):
        return dataclasses.asdict(item)
    return item
