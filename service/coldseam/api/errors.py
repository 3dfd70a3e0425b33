"""The one place where failures become HTTP answers.

Every error body is ``{"detail": "<field>: <what is wrong>", "field": <JSON pointer>,
"message": <what is wrong>, "request_id": ...}``; ``detail`` alone is enough to show a user.
"""

from __future__ import annotations

import logging
from typing import Any

from fastapi import FastAPI, HTTPException, Request
from fastapi.exceptions import RequestValidationError
from fastapi.responses import JSONResponse, PlainTextResponse, Response
from starlette.exceptions import HTTPException as StarletteHTTPException

from coldseam.api.pool import ClusterUnavailable, QueueFull
from coldseam.errors import ColdseamError, StoreUnavailable

log = logging.getLogger(__name__)

#: HTTP status of each kind of failure (typed engine errors and the pool's own).
STATUS_BY_KIND = {
    "InvalidSection": 422,
    "MeshingFailed": 422,
    "LimitExceeded": 413,
    "SolveFailed": 500,
    "WorkerCrashed": 500,
    "StoreFailed": 500,
    "StoreFull": 507,
    "StoreUnavailable": 503,
    "Timeout": 504,
    "Interrupted": 503,
    "ClusterUnavailable": 503,
    "Cancelled": 409,
}
#: Seconds a client is asked to wait when the database or the cluster is away.
UNAVAILABLE_RETRY = 5
SERVER_FAULTS = {"SolveFailed", "WorkerCrashed", "StoreFailed"}


class BodyTooLarge(HTTPException):
    """The request body is over ``max_body_bytes`` (an HTTPException, so that FastAPI's own
    body parsing passes it on instead of answering 400)."""

    def __init__(self, limit: int) -> None:
        super().__init__(413, f"the request body is larger than the {limit} byte limit")
        self.limit = limit

    def __str__(self) -> str:
        return str(self.detail)


class BodySlow(HTTPException):
    """The request body did not arrive within ``body_timeout`` seconds (HTTP 408)."""

    def __init__(self, limit: float) -> None:
        super().__init__(408, f"the request body did not arrive within {limit:g} s; send it "
                         "at once (this server does not wait on slow uploads)")
        self.limit = limit

    def __str__(self) -> str:
        return str(self.detail)


class EvaluationFailed(Exception):
    """An evaluation ended with ``Outcome.error``; raised where a handler must answer."""

    def __init__(self, error: dict[str, str]) -> None:
        super().__init__(error["message"])
        self.error = error


def raise_failure(error: dict[str, str]) -> None:
    raise EvaluationFailed(error)


def request_id_of(request: Request) -> str:
    return getattr(request.state, "request_id", "") or "-"


def status_of(kind: str) -> int:
    return STATUS_BY_KIND.get(kind, 500)


def error_body(kind: str, message: str, field: str, request_id: str) -> dict[str, Any]:
    """The JSON answer for a failure of ``kind``; server faults carry the request id."""
    if kind in SERVER_FAULTS:
        message = f"{message} (request id {request_id})"
    detail = f"{field}: {message}" if field else message
    return {"detail": detail, "field": field, "message": message, "kind": kind,
            "request_id": request_id}


def plain_text_wanted(request: Request) -> bool:
    """Spreadsheet endpoints answer errors as ``error: ...`` text."""
    path = request.url.path
    return path.startswith("/api/v1/templates/") and path.endswith("/value")


#: Statuses ``errors=inline`` keeps: a request without an accepted key is never answered 200.
NOT_INLINED = {401, 403}


def errors_inline(request: Request, status: int) -> bool:
    """``?errors=inline`` on the value endpoint: errors answer 200 with the ``error:`` line
    (and the real status in ``X-Coldseam-Status``), for spreadsheet functions that show only
    a generic cell error for any status but 200; access refusals keep their 401."""
    return (plain_text_wanted(request) and request.query_params.get("errors") == "inline"
            and status not in NOT_INLINED)


def respond(request: Request, body: dict[str, Any], status: int,
            headers: dict[str, str] | None = None) -> Response:
    if plain_text_wanted(request):
        if errors_inline(request, status):
            headers = {**(headers or {}), "X-Coldseam-Status": str(status)}
            status = 200
        return PlainTextResponse(f"error: {body['detail']}", status_code=status,
                                 headers=headers)
    return JSONResponse(body, status_code=status, headers=headers)


def failure_response(error: dict[str, str], request: Request) -> Response:
    """The answer for a failed evaluation (``Outcome.error``)."""
    kind = error["kind"]
    body = error_body(kind, error["message"], error.get("field", ""), request_id_of(request))
    return respond(request, body, status_of(kind))


async def _evaluation_failed(request: Request, exc: EvaluationFailed) -> Response:
    return failure_response(exc.error, request)


async def _coldseam_error(request: Request, exc: ColdseamError) -> Response:
    kind = type(exc).__name__
    if kind in SERVER_FAULTS:
        log.error("%s (request %s): %s", kind, request_id_of(request), exc.message)
    body = error_body(kind, exc.message, exc.field, request_id_of(request))
    errors = getattr(exc, "errors", None)
    if errors:
        body["errors"] = errors
    return respond(request, body, status_of(kind))


async def _validation_error(request: Request, exc: RequestValidationError) -> Response:
    errors = [{"field": _pointer(e["loc"]), "message": e["msg"]} for e in exc.errors()]
    first = errors[0] if errors else {"field": "", "message": "the request is not valid"}
    body = error_body("InvalidRequest", first["message"], first["field"],
                      request_id_of(request))
    body["errors"] = errors
    return respond(request, body, 422)


def _pointer(loc: Any) -> str:
    return "/" + "/".join(str(part) for part in loc)


async def _http_error(request: Request, exc: StarletteHTTPException) -> Response:
    if exc.status_code == 400 and "multipart" in str(exc.detail).lower():
        # the form parser's own refusal: bad input like any other, so a 422 naming the body
        body = error_body("InvalidSection", "the upload is not valid multipart form data: send "
                          "the drawing as the form field 'file'", "/file",
                          request_id_of(request))
        return respond(request, body, 422)
    body = {"detail": exc.detail, "request_id": request_id_of(request)}
    return respond(request, body, exc.status_code, exc.headers)


async def _queue_full(request: Request, exc: QueueFull) -> Response:
    body = error_body("QueueFull", "every evaluation worker is busy and the queue is full; "
                      f"try again in {exc.retry_after} s", "", request_id_of(request))
    return respond(request, body, 429, {"Retry-After": str(exc.retry_after)})


async def _store_unavailable(request: Request, exc: StoreUnavailable) -> Response:
    log.warning("request %s answered 503: %s", request_id_of(request), exc)
    body = error_body("StoreUnavailable", f"{exc.message}; the service resumes by itself "
                      f"when the store is back: try again in {UNAVAILABLE_RETRY} s", "",
                      request_id_of(request))
    return respond(request, body, 503, {"Retry-After": str(UNAVAILABLE_RETRY)})


async def _cluster_unavailable(request: Request, exc: ClusterUnavailable) -> Response:
    log.warning("request %s answered 503: %s", request_id_of(request), exc)
    body = error_body("ClusterUnavailable", f"{exc}; try again in {UNAVAILABLE_RETRY} s", "",
                      request_id_of(request))
    return respond(request, body, 503, {"Retry-After": str(UNAVAILABLE_RETRY)})


async def _body_too_large(request: Request, exc: BodyTooLarge) -> Response:
    body = error_body("LimitExceeded", str(exc), "", request_id_of(request))
    return respond(request, body, 413)


async def _unexpected(request: Request, exc: Exception) -> Response:
    request_id = request_id_of(request)
    log.error("unexpected failure (request %s)", request_id, exc_info=exc)
    body = {"detail": f"internal error (request id {request_id}); it has been logged",
            "request_id": request_id}
    return respond(request, body, 500, {"X-Request-ID": request_id})


def install(app: FastAPI) -> None:
    """Register every handler on ``app``."""
    app.add_exception_handler(ColdseamError, _coldseam_error)
    app.add_exception_handler(RequestValidationError, _validation_error)
    app.add_exception_handler(StarletteHTTPException, _http_error)
    app.add_exception_handler(QueueFull, _queue_full)
    app.add_exception_handler(BodyTooLarge, _body_too_large)
    app.add_exception_handler(StoreUnavailable, _store_unavailable)
    app.add_exception_handler(ClusterUnavailable, _cluster_unavailable)
    app.add_exception_handler(EvaluationFailed, _evaluation_failed)
    app.add_exception_handler(Exception, _unexpected)
