"""Plain ASGI middleware: request id, one log line per request, security headers, body size
and body read time limits, HEAD answered as GET without the body, and the last-resort 500
(answered here, inside the middleware, so that it carries the security headers too)."""

from __future__ import annotations

import asyncio
import json
import logging
import re
import time
import uuid
from typing import Any

from starlette.requests import ClientDisconnect

from coldseam.api.errors import BodySlow, BodyTooLarge

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

    def __init__(self, app: Any, max_body_bytes: int, body_timeout: float = 30.0) -> None:
        self.app, self.max_body_bytes, self.body_timeout = app, max_body_bytes, body_timeout

    async def __call__(self, scope: Scope, receive: Any, send: Any) -> None:
        if scope["type"] != "http":
            await self.app(scope, receive, send)
            return
        request_id = _request_id(scope)
        scope.setdefault("state", {})["request_id"] = request_id
        path = scope.get("path", "")
        head = scope.get("method") == "HEAD" and (path.startswith("/api/") or path == "/healthz")
        if head:  # answered as GET, body left out (every API GET also takes HEAD)
            scope = {**scope, "method": "GET"}
        started, status = time.perf_counter(), {"code": 500, "started": False}

        async def send_wrapper(message: dict[str, Any]) -> None:
            if message["type"] == "http.response.start":
                status["code"], status["started"] = message["status"], True
                message["headers"] = _with_headers(message.get("headers", []), scope,
                                                   request_id)
            elif head and message["type"] == "http.response.body":
                message = {**message, "body": b""}
            await send(message)

        try:
            declared = _content_length(scope)
            if declared is not None and declared > self.max_body_bytes:
                await _too_large(send_wrapper, self.max_body_bytes, request_id)
            else:
                await self.app(scope, self._limited(receive), send_wrapper)
        except ClientDisconnect:  # the client left mid-body: no one to answer
            status["code"] = 499
            log.info("client went away before its request body arrived (request %s)",
                     request_id)
        except Exception as exc:  # noqa: BLE001 - the last resort: logged, answered 500
            log.error("unexpected failure (request %s)", request_id, exc_info=exc)
            if status["started"]:
                raise
            await _internal_error(send_wrapper, request_id)
        finally:
            _log_line(scope, status["code"], started, request_id)

    def _limited(self, receive: Any) -> Any:
        seen = {"bytes": 0, "deadline": None, "done": False}

        async def limited_receive() -> dict[str, Any]:
            if seen["done"]:  # the body is in: what follows is the wait for a disconnect
                return await receive()
            loop = asyncio.get_running_loop()
            if seen["deadline"] is None:
                seen["deadline"] = loop.time() + self.body_timeout
            try:
                message = await asyncio.wait_for(receive(), seen["deadline"] - loop.time())
            except TimeoutError:
                raise BodySlow(self.body_timeout) from None
            seen["done"] = not message.get("more_body", False)
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


async def _internal_error(send: Any, request_id: str) -> None:
    body = json.dumps({"detail": f"internal error (request id {request_id}); it has been "
                       "logged", "kind": "InternalError", "request_id": request_id}).encode()
    await send({"type": "http.response.start", "status": 500,
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
