"""The OpenAPI document: /docs, /openapi.json, a worked example for every request body."""

from __future__ import annotations

from api_support import WALL_1D

from coldseam.api.examples import WALL_1D as DOCUMENTED
from coldseam.schema.evaluation import parse_request


def test_docs_page_and_document(client):
    assert "swagger" in client.get("/docs").text.lower()
    document = client.get("/openapi.json").json()
    assert "/api/v1/evaluations" in document["paths"]
    assert "EvaluationRequest" in document["components"]["schemas"]


def test_every_request_body_has_a_worked_example(client):
    document = client.get("/openapi.json").json()
    bodies = 0
    for path, operations in document["paths"].items():
        for method, operation in operations.items():
            body = operation.get("requestBody")
            if body is None:
                continue
            bodies += 1
            for media, content in body["content"].items():
                assert content.get("examples") or content.get("example") or _form_examples(
                    document, content), f"{method} {path} {media}"
    assert bodies >= 4


def _form_examples(document: dict, content: dict) -> bool:
    ref = content["schema"].get("$ref", "")
    schema = document["components"]["schemas"][ref.rsplit("/", 1)[-1]] if ref else {}
    optional = [p for n, p in schema.get("properties", {}).items()
                if n not in schema.get("required", [])]
    return bool(schema) and all("examples" in p for p in optional)


def test_documented_example_is_the_example_file_and_valid():
    assert DOCUMENTED == WALL_1D
    parse_request(DOCUMENTED)


def test_every_schema_reference_resolves(client):
    document = client.get("/openapi.json").json()
    schemas = document["components"]["schemas"]
    refs = set()

    def walk(node):
        if isinstance(node, dict):
            if "$ref" in node:
                refs.add(node["$ref"].rsplit("/", 1)[-1])
            for value in node.values():
                walk(value)
        elif isinstance(node, list):
            for value in node:
                walk(value)

    walk(document)
    assert refs and refs <= set(schemas)
