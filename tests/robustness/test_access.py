"""Access with API keys: 401 without an accepted key on every API path, each key sees only its
own evaluations, keys kept hashed and compared without early exit, the spreadsheet endpoint's
``?key=``, static paths kept in the frontend folder, security headers."""

from __future__ import annotations

import hmac
import logging
import re
import sqlite3

import pytest
from robust_support import wall_request

ALPHA, BETA = "alpha-key-5d1", "beta-key-8e4"
KEYS = f"{ALPHA},{BETA}"


def bearer(key: str) -> dict[str, str]:
    return {"Authorization": f"Bearer {key}"}


@pytest.fixture
def keyed(client_for):
    with client_for(api_keys=KEYS) as client:
        yield client


def _api_operations(client) -> list[tuple[str, str]]:
    paths = client.get("/openapi.json").json()["paths"]
    out = []
    for path, operations in paths.items():
        if path.startswith("/api/"):
            concrete = re.sub(r"\{[^}]+\}", "0123456789abcdef0123456789abcdef", path)
            out += [(method, concrete) for method in operations]
    return out


@pytest.mark.parametrize("headers", [{}, bearer("wrong"), bearer(""), {"Authorization": ALPHA},
                                     {"Authorization": f"Basic {ALPHA}"}])
def test_every_api_operation_needs_an_accepted_key(keyed, headers):
    operations = _api_operations(keyed)
    assert len(operations) >= 12
    for method, path in operations:
        response = keyed.request(method, path, headers=headers, params={"key": "wrong"})
        assert response.status_code == 401, (method, path, response.status_code)
        assert "key" in response.text


def test_a_key_cannot_read_or_list_another_keys_evaluations(keyed, make_settings):
    mine = keyed.post("/api/v1/evaluations", json=wall_request(), headers=bearer(ALPHA))
    assert mine.status_code == 200, mine.text
    evaluation_id = mine.json()["id"]
    for suffix in ("", "/field", "/picture.svg", "/picture.png", "/report"):
        theirs = keyed.get(f"/api/v1/evaluations/{evaluation_id}{suffix}", headers=bearer(BETA))
        assert theirs.status_code == 404, suffix  # not 409 or 403: nothing is given away
        assert keyed.get(f"/api/v1/evaluations/{evaluation_id}{suffix}",
                         headers=bearer(ALPHA)).status_code == 200, suffix
    listed = keyed.get("/api/v1/evaluations", headers=bearer(BETA)).json()
    assert listed["total"] == 0 and listed["items"] == []
    assert keyed.get("/api/v1/evaluations", headers=bearer(ALPHA)).json()["total"] == 1
    with sqlite3.connect(make_settings().database_path) as db:
        stored = " ".join(str(v) for row in db.execute("SELECT * FROM evaluations") for v in row)
    assert ALPHA not in stored and BETA not in stored
    assert ALPHA not in repr(keyed.app.state.keys)  # the server holds digests only


def test_keys_are_compared_against_every_digest_without_early_exit(keyed, monkeypatch):
    calls: list[tuple[str, str]] = []
    real = hmac.compare_digest

    def counting(a, b):
        calls.append((a, b))
        return real(a, b)

    monkeypatch.setattr(hmac, "compare_digest", counting)
    ring = keyed.app.state.keys
    for key in (ALPHA, BETA, "wrong"):
        calls.clear()
        ring.owner_of(key)
        assert len(calls) == len(ring.digests) == 2, key  # the first match does not stop it
        assert all(len(a) == 64 and len(b) == 64 for a, b in calls)  # digests, not keys


def test_the_value_endpoint_takes_the_key_as_a_query_parameter(keyed, caplog):
    path = "/api/v1/templates/wall_corner/value"
    with caplog.at_level(logging.INFO, logger="coldseam.access"):
        value = keyed.get(path, params={"quantity": "psi", "key": ALPHA, "format": "csv"})
    assert value.status_code == 200, value.text
    header, line = value.text.splitlines()
    assert header == "psi" and float(line) > 0  # the key is neither a parameter nor echoed
    assert ALPHA not in caplog.text  # the access log has the path, not the query
    assert keyed.get("/api/v1/evaluations", headers=bearer(ALPHA)).json()["total"] == 1
    assert keyed.get("/api/v1/evaluations", headers=bearer(BETA)).json()["total"] == 0

    wrong = keyed.get(path, params={"quantity": "psi", "key": "wrong"})
    assert wrong.status_code == 401
    assert wrong.text.startswith("error: ") and "not accepted" in wrong.text
    # The header wins over the query: a bad header is not rescued by a good ?key=.
    assert keyed.get(path, params={"key": ALPHA}, headers=bearer("wrong")).status_code == 401


@pytest.mark.parametrize(("method", "path"), [
    ("get", "/api/v1/evaluations"), ("get", "/api/v1/materials"),
    ("post", "/api/v1/templates/wall_corner/evaluations"),
    ("post", "/api/v1/templates/wall_corner/section"),
    ("post", "/api/v1/evaluations")])
def test_no_other_endpoint_takes_the_key_in_the_query(keyed, method, path):
    assert keyed.request(method, path, params={"key": ALPHA}).status_code == 401


def test_only_the_value_endpoint_documents_a_key_parameter(keyed):
    paths = keyed.get("/openapi.json").json()["paths"]
    with_key = [(path, method) for path, operations in paths.items()
                for method, operation in operations.items()
                if any(p["name"] == "key" for p in operation.get("parameters", []))]
    assert with_key == [("/api/v1/templates/{template_id}/value", "get")]
    described = [p for p in paths[with_key[0][0]]["get"]["parameters"] if p["name"] == "key"]
    assert "logs" in described[0]["description"]


@pytest.fixture
def site(tmp_path):
    folder = tmp_path / "site"
    (folder / "js").mkdir(parents=True)
    (folder / "index.html").write_text("<!doctype html><title>Coldseam</title>")
    (folder / "js" / "app.js").write_text("export const ready = true;")
    (tmp_path / "secret.txt").write_text("not for the web")
    return folder


ESCAPES = ["/../secret.txt", "/%2e%2e/secret.txt", "/%2E%2E%2Fsecret.txt", "/js/%2e%2e/%2e%2e/"
           "secret.txt", "/..%5csecret.txt", "/js/..%2f..%2fsecret.txt", "//etc/passwd",
           "/%2fetc%2fpasswd", "/etc/passwd", "/index.html%00.js", "/....//secret.txt",
           "/js/../../../../../../etc/passwd", "/%252e%252e/secret.txt"]


@pytest.mark.parametrize("path", ESCAPES)
def test_static_paths_cannot_escape_the_frontend_folder(client_for, site, path):
    with client_for(frontend_dir=site) as client:
        response = client.get(path)
        assert response.status_code in (400, 404), (path, response.status_code)
        assert "not for the web" not in response.text and "root:" not in response.text


def test_page_api_and_error_answers_carry_the_security_headers(client_for, site):
    with client_for(frontend_dir=site, api_keys=KEYS) as client:
        page = client.get("/")
        policy = page.headers["content-security-policy"]
        for directive in ("default-src 'self'", "script-src 'self'", "object-src 'none'",
                          "base-uri 'none'", "frame-ancestors 'none'"):
            assert directive in policy
        assert "unsafe-inline" not in policy and "unsafe-eval" not in policy
        assert page.headers["x-frame-options"] == "DENY"
        for response in (page, client.get("/api/v1/evaluations"), client.get("/missing.js"),
                         client.get("/api/v1/evaluations", headers=bearer(ALPHA))):
            assert response.headers["x-content-type-options"] == "nosniff"
            assert response.headers["referrer-policy"] == "no-referrer"
            assert "content-security-policy" in response.headers
        api = client.get("/api/v1/evaluations", headers=bearer(ALPHA))
        assert "sandbox" in api.headers["content-security-policy"]
