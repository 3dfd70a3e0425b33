"""Answers for ``/api`` paths no route takes: 404 for an unknown path, 405 with the right
``Allow`` header for a method the path does not support. (Without this, such requests fall
through to the page's static files, which answer 405 "Allow: GET, HEAD" for any path.)"""

from __future__ import annotations

import re
from functools import cache
from typing import Any

from fastapi import FastAPI, HTTPException, Request

METHODS = ["GET", "HEAD", "POST", "PUT", "PATCH", "DELETE", "OPTIONS", "TRACE"]


def install(app: FastAPI) -> None:
    """Register the fallback after every API route."""
    app.add_api_route("/api/{rest:path}", unmatched, methods=METHODS, include_in_schema=False)


async def unmatched(request: Request, rest: str) -> None:
    path = request.url.path
    allowed = allowed_methods(_patterns(request.app.openapi()), path)
    if not allowed:
        raise HTTPException(404, f"no API path {path} (the API is described at /docs)")
    raise HTTPException(405, f"{request.method} is not allowed on {path}; it takes "
                        f"{', '.join(allowed)}", headers={"Allow": ", ".join(allowed)})


def allowed_methods(patterns: list[tuple[re.Pattern, list[str]]], path: str) -> list[str]:
    """The documented methods of the operation path matching ``path`` (HEAD with GET)."""
    for pattern, methods in patterns:
        if pattern.fullmatch(path):
            return methods
    return []


@cache
def _compiled(template: str) -> re.Pattern:
    return re.compile(re.sub(r"\\\{[^}]+\\\}", "[^/]+", re.escape(template)))


def _patterns(document: dict[str, Any]) -> list[tuple[re.Pattern, list[str]]]:
    out = []
    for template, operations in document.get("paths", {}).items():
        methods = [m.upper() for m in operations if m.upper() in METHODS]
        if "GET" in methods:
            methods.append("HEAD")
        out.append((_compiled(template), methods))
    return out
