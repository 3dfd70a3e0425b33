"""The OpenAPI document: the app's own, plus the schemas that routes reading their body
themselves, or answering several shapes, refer to (``#/components/schemas/EvaluationRequest``)."""

from __future__ import annotations

from typing import Any

from fastapi import FastAPI
from fastapi.openapi.utils import get_openapi

from coldseam.api.models import EvaluationStatusOut
from coldseam.schema.evaluation import EvaluationRequest

REF_TEMPLATE = "#/components/schemas/{model}"


def model_schemas() -> dict[str, Any]:
    """JSON schemas of the models routes refer to by name, refs pointing into components."""
    schemas: dict[str, Any] = {}
    for model in (EvaluationRequest, EvaluationStatusOut):
        schema = model.model_json_schema(ref_template=REF_TEMPLATE)
        schemas.update(schema.pop("$defs", {}))
        schemas[model.__name__] = schema
    return schemas


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
