"""The OpenAPI document: /docs, /openapi.json, a worked example for every request body."""

from __future__ import annotations

import re

from api_support import WALL_1D

from coldseam.api.examples import WALL_1D as DOCUMENTED
from coldseam.schema.evaluation import parse_request


def test_docs_page_and_document(client):
    assert "swagger" in client.get("/docs").text.lower()
    document = client.get("/openapi.json").json()
    assert "/api/v1/evaluations" in document["paths"]
    assert "EvaluationRequest" in document["components"]["schemas"]


def test_docs_page_loads_only_this_servers_files_and_no_inline_script(client):
    page = client.get("/docs")
    assert page.status_code == 200 and page.headers["content-type"].startswith("text/html")
    assert "script-src 'self'" in page.headers["content-security-policy"]
    references = re.findall(r'(?:src|href)="([^"]*)"', page.text)
    assert len(references) >= 3
    assert all(ref.startswith("/") and not ref.startswith("//") for ref in references), references
    assert "http" not in page.text and "cdn" not in page.text.lower()
    scripts = re.findall(r"<script([^>]*)>(.*?)</script>", page.text, re.S)
    assert scripts and all('src="' in attrs and not body.strip() for attrs, body in scripts)
    assert 'data-openapi-url="/openapi.json"' in page.text


def test_docs_assets_answer_with_their_content_types(client):
    page = client.get("/docs").text
    expected = {".js": "text/javascript", ".css": "text/css", ".png": "image/png"}
    for ref in re.findall(r'(?:src|href)="(/docs/[^"]*)"', page):
        answer = client.get(ref)
        assert answer.status_code == 200, ref
        media = answer.headers["content-type"].split(";")[0]
        assert media == expected[ref[ref.rindex("."):]], ref
        assert len(answer.content) > 50, ref
    bundle = client.get("/docs/assets/swagger-ui-bundle.js").text
    assert re.search(r'PACKAGE_VERSION:"5\.', bundle), "Swagger UI 5 reads OpenAPI 3.1"


def test_docs_serve_no_other_file(client):
    for name in ("core.py", "..%2F..%2Fpyproject.toml", "redoc.standalone.js"):
        assert client.get(f"/docs/assets/{name}").status_code == 404
    assert client.get("/redoc").status_code != 200  # it would need a CDN


def test_openapi_document_is_3_1_without_a_page_policy(client):
    answer = client.get("/openapi.json")
    assert answer.json()["openapi"].startswith("3.1")
    assert "content-security-policy" not in answer.headers


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
