"""The OpenAPI document: the app's own, plus the schemas that routes reading their body
themselves, or answering several shapes, refer to (``#/components/schemas/EvaluationRequest``),
and every error answer documented as the service really gives it (``ErrorOut``; plain text on
the spreadsheet endpoint), so that clients and schema-driven tests can rely on it."""

from __future__ import annotations

from typing import Any

from fastapi import FastAPI
from fastapi.openapi.utils import get_openapi

from coldseam.api.models import ErrorOut, EvaluationStatusOut
from coldseam.schema.evaluation import EvaluationRequest

REF_TEMPLATE = "#/components/schemas/{model}"
ERROR_JSON = {"application/json": {"schema": {"$ref": "#/components/schemas/ErrorOut"}}}
ERROR_TEXT = {"text/plain": {"schema": {"type": "string"},
                             "example": "error: /parameters/insulation_thickness: "
                                        "insulation_thickness must be between 10 and 400 mm"}}
#: Answers every API operation may give, beside its own.
COMMON = {"401": "An API key is needed or not accepted (on a server with keys)."}
#: Answers of the operations that run an evaluation.
EVALUATING = {
    "413": "The section, its mesh or its memory need is over the limits.",
    "429": "Every worker busy and the queue full; Retry-After says when to try again.",
    "500": "An engine fault or a worker that died; the message quotes the request id.",
    "503": "The server stopped during the evaluation: send it again.",
    "504": "The evaluation ran past the wall-time limit and was stopped.",
}
BODIES = {"image/svg+xml": {"schema": {"type": "string"}},
          "image/png": {"schema": {"type": "string", "format": "binary"}}}


def model_schemas() -> dict[str, Any]:
    """JSON schemas of the models routes refer to by name, refs pointing into components."""
    schemas: dict[str, Any] = {}
    for model in (EvaluationRequest, EvaluationStatusOut, ErrorOut):
        schema = model.model_json_schema(ref_template=REF_TEMPLATE)
        schemas.update(schema.pop("$defs", {}))
        schemas[model.__name__] = schema
    return schemas


def document_errors(document: dict[str, Any]) -> None:
    """Document each API operation's error answers with the body the service sends."""
    for path, operations in document.get("paths", {}).items():
        if not path.startswith("/api/"):
            continue
        for method, operation in operations.items():
            responses = operation.setdefault("responses", {})
            extra = {**COMMON, **(EVALUATING if _evaluates(path, method) else {})}
            if "{" in path:
                extra["404"] = "No such evaluation (for this key), or no such template."
            if path.endswith("/field"):
                extra["409"] = "The evaluation is not done."
            for status, description in extra.items():
                responses.setdefault(status, {"description": description})
            _error_bodies(responses, ERROR_TEXT if path.endswith("/value") else ERROR_JSON)
            _success_body(path, responses)
    schemas = document.get("components", {}).get("schemas", {})
    for unused in ("HTTPValidationError", "ValidationError"):
        schemas.pop(unused, None)


def _evaluates(path: str, method: str) -> bool:
    return (method == "post" and path.endswith("/evaluations")) or path.endswith("/value")


def _error_bodies(responses: dict[str, Any], body: dict[str, Any]) -> None:
    for status, response in responses.items():
        if status[0] in "45":
            examples = {k: v for k, v in response.get("content", {}).get(
                "application/json", {}).items() if k in ("example", "examples")}
            media, content = next(iter(body.items()))
            response["content"] = {media: {**content, **(examples if body is ERROR_JSON
                                                          else {})}}


def _success_body(path: str, responses: dict[str, Any]) -> None:
    for suffix, media in ((".svg", "image/svg+xml"), (".png", "image/png")):
        if path.endswith(suffix) and "200" in responses:
            responses["200"]["content"] = {media: BODIES[media]}


def install(app: FastAPI) -> None:
    """Make ``app.openapi()`` include the request schemas and the error answers."""

    def openapi() -> dict[str, Any]:
        if app.openapi_schema is None:
            document = get_openapi(title=app.title, version=app.version,
                                   description=app.description, routes=app.routes,
                                   tags=app.openapi_tags)
            schemas = document.setdefault("components", {}).setdefault("schemas", {})
            for name, schema in model_schemas().items():
                schemas.setdefault(name, schema)
            document_errors(document)
            app.openapi_schema = document
        return app.openapi_schema

    app.openapi = openapi  # type: ignore[method-assign]
