"""The OpenAPI document: the app's own, plus the model-v1 request schemas that routes
reading their body themselves refer to (``#/components/schemas/EvaluationRequest``)."""

from __future__ import annotations

from typing import Any

from fastapi import FastAPI
from fastapi.openapi.utils import get_openapi

from coldseam.schema.evaluation import EvaluationRequest

REF_TEMPLATE = "#/components/schemas/{model}"


def model_schemas() -> dict[str, Any]:
    """JSON schemas of the request models, keyed by name, refs pointing into components."""
    schema = EvaluationRequest.model_json_schema(ref_template=REF_TEMPLATE)
    definitions = schema.pop("$defs", {})
    return {**definitions, "EvaluationRequest": schema}


def install(app: FastAPI) -> None:
    """Make ``app.openapi()`` include the request schemas."""

    def openapi() -> dict[str, Any]:
        if app.openapi_schema is None:
            document = get_openapi(title=app.title, version=app.version,
                                   description=app.description, routes=app.routes,
                                   tags=app.openapi_tags)
            schemas = document.setdefault("components", {}).setdefault("schemas", {})
            for name, schema in model_schemas().items():
                schemas.setdefault(name, schema)
            app.openapi_schema = document
        return app.openapi_schema

    app.openapi = openapi  # type: ignore[method-assign]
