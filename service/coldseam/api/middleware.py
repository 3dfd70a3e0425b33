"""Plain ASGI middleware: request id, one log line per request, security headers, body limit."""

from __future__ import annotations

import json
import logging
import re
import time
import uuid
from typing import Any

from coldseam.api.errors import BodyTooLarge

log = logging.getLogger("coldseam.access")

#: The page may load only what comes from this server.
PAGE_POLICY = ("default-src 'self'; script-src 'self'; style-src 'self'; "
               "img-src 'self' data: blob:; connect-src 'self'; font-src 'self'; "
               "object-src 'none'; base-uri 'none'; form-action 'self'; "
               "frame-ancestors 'none'")
#: API answers (JSON, SVG, reports) may run nothing.
API_POLICY = ("default-src 'none'; style-src 'unsafe-inline'; img-src 'self' data:; "
              "frame-ancestors 'self'; sandbox")
COMMON_HEADERS = [
    (b"x-content-type-options", b"nosniff"),
    (b"referrer-policy", b"no-referrer"),
    (b"cross-origin-opener-policy", b"same-origin"),
    (b"cross-origin-resource-policy", b"same-origin"),
]
#: Answered without a policy of ours (a JSON document that clients and tools read).
NO_POLICY = ("/openapi.json",)
_GOOD_ID = re.compile(r"^[A-Za-z0-9._-]{1,64}$")

Scope = dict[str, Any]


class ServiceMiddleware:
    """Wraps every HTTP request of the app."""

    def __init__(self, app: Any, max_body_bytes: int) -> None:
        self.app, self.max_body_bytes = app, max_body_bytes

    async def __call__(self, scope: Scope, receive: Any, send: Any) -> None:
        if scope["type"] != "http":
            await self.app(scope, receive, send)
            return
        request_id = _request_id(scope)
        scope.setdefault("state", {})["request_id"] = request_id
        started, status = time.perf_counter(), {"code": 500}

        async def send_wrapper(message: dict[str, Any]) -> None:
            if message["type"] == "http.response.start":
                status["code"] = message["status"]
                message["headers"] = _with_headers(message.get("headers", []), scope,
                                                   request_id)
            await send(message)

        try:
            declared = _content_length(scope)
            if declared is not None and declared > self.max_body_bytes:
                await _too_large(send_wrapper, self.max_body_bytes, request_id)
            else:
                await self.app(scope, self._limited(receive), send_wrapper)
        finally:
            _log_line(scope, status["code"], started, request_id)

    def _limited(self, receive: Any) -> Any:
        seen = {"bytes": 0}

        async def limited_receive() -> dict[str, Any]:
            message = await receive()
            seen["bytes"] += len(message.get("body", b""))
            if seen["bytes"] > self.max_body_bytes:
                raise BodyTooLarge(self.max_body_bytes)
            return message

        return limited_receive


async def _too_large(send: Any, limit: int, request_id: str) -> None:
    message = str(BodyTooLarge(limit))
    body = json.dumps({"detail": message, "field": "", "message": message,
                       "kind": "LimitExceeded", "request_id": request_id}).encode()
    await send({"type": "http.response.start", "status": 413,
                "headers": [(b"content-type", b"application/json"),
                            (b"content-length", str(len(body)).encode())]})
    await send({"type": "http.response.body", "body": body})


def _request_id(scope: Scope) -> str:
    for name, value in scope.get("headers", []):
        if name == b"x-request-id":
            text = value.decode("latin-1")
            if _GOOD_ID.match(text):
                return text
    return uuid.uuid4().hex[:16]


def _content_length(scope: Scope) -> int | None:
    for name, value in scope.get("headers", []):
        if name == b"content-length":
            try:
                return int(value)
            except ValueError:
                return None
    return None


def _with_headers(headers: list, scope: Scope, request_id: str) -> list:
    path = scope.get("path", "")
    names = {name.lower() for name, _ in headers}
    extra = [(b"x-request-id", request_id.encode())]
    extra += [h for h in COMMON_HEADERS if h[0] not in names]
    if b"content-security-policy" not in names and path not in NO_POLICY:
        # The page and the API reference at /docs: everything from this server.
        policy = API_POLICY if path.startswith("/api/") else PAGE_POLICY
        extra.append((b"content-security-policy", policy.encode()))
        extra.append((b"x-frame-options", b"SAMEORIGIN" if path.startswith("/api/")
                      else b"DENY"))
    return list(headers) + extra


def _log_line(scope: Scope, status: int, started: float, request_id: str) -> None:
    client = scope.get("client") or ("-", 0)
    log.info(json.dumps({
        "request_id": request_id, "method": scope.get("method"), "path": scope.get("path"),
        "status": status, "ms": round((time.perf_counter() - started) * 1000, 1),
        "client": client[0],
    }, separators=(",", ":")))
