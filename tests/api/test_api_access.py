"""API keys, per-key isolation of stored evaluations, CORS."""

from __future__ import annotations

import hashlib
import sqlite3

import pytest
from api_support import fake

from coldseam.api.auth import read_digest_file
from coldseam.api.store import storage_key

ALPHA = {"Authorization": "Bearer alpha-key-7f3"}
BETA = {"Authorization": "Bearer beta-key-0c9"}


@pytest.fixture
def keyed(client_for):
    with client_for(api_keys="alpha-key-7f3, beta-key-0c9") as client:
        yield client


@pytest.mark.parametrize("headers", [{}, {"Authorization": "Bearer wrong"},
                                     {"Authorization": "Basic YWxwaGE6a2V5"}])
def test_api_needs_an_accepted_key(keyed, headers):
    for method, path in (("get", "/api/v1/evaluations"), ("post", "/api/v1/evaluations"),
                         ("get", "/api/v1/materials")):
        response = getattr(keyed, method)(path, headers=headers)
        assert response.status_code == 401, (method, path)
        assert response.headers["www-authenticate"] == "Bearer"
        assert "key" in response.json()["detail"]


def test_health_and_docs_need_no_key(keyed):
    assert keyed.get("/healthz").json()["auth"] == "keys"
    assert keyed.get("/openapi.json").status_code == 200


def test_each_key_sees_only_its_own_evaluations(keyed, make_settings):
    mine = keyed.post("/api/v1/evaluations", json=fake(), headers=ALPHA)
    assert mine.status_code == 200
    evaluation_id = mine.json()["id"]
    assert keyed.get(f"/api/v1/evaluations/{evaluation_id}", headers=BETA).status_code == 404
    assert keyed.get(f"/api/v1/evaluations/{evaluation_id}/field",
                     headers=BETA).status_code == 404
    assert keyed.get("/api/v1/evaluations", headers=BETA).json()["total"] == 0

    theirs = keyed.post("/api/v1/evaluations", json=fake(), headers=BETA)
    assert theirs.json()["id"] == evaluation_id  # the same content hash ...
    assert keyed.app.state.evaluations.pool.completed == 2  # ... but evaluated apart
    assert keyed.get("/api/v1/evaluations", headers=ALPHA).json()["total"] == 1

    with sqlite3.connect(make_settings().database_path) as db:
        keys = {row[0] for row in db.execute("SELECT key FROM evaluations")}
        text = " ".join(str(v) for row in db.execute("SELECT * FROM evaluations")
                        for v in row)
    assert len(keys) == 2
    assert storage_key("", evaluation_id) not in keys  # not reachable from the id alone
    assert "alpha-key-7f3" not in text and "beta-key-0c9" not in text


def test_keys_from_a_file_of_digests(client_for, tmp_path):
    digests = tmp_path / "keys.sha256"
    digests.write_text("# site office\n" + hashlib.sha256(b"gamma-key").hexdigest() + "\n")
    with client_for(api_key_hashes_file=digests) as client:
        good = client.get("/api/v1/evaluations", headers={"Authorization": "Bearer gamma-key"})
        assert good.status_code == 200
        bad = client.get("/api/v1/evaluations", headers={"Authorization": "Bearer gamma"})
        assert bad.status_code == 401


def test_a_malformed_digest_file_names_the_line(tmp_path):
    digests = tmp_path / "keys.sha256"
    digests.write_text(hashlib.sha256(b"k").hexdigest() + "\nnot-a-digest\n")
    with pytest.raises(ValueError, match=r"keys.sha256:2: not a sha256"):
        read_digest_file(digests)


def _preflight(client, origin: str):
    return client.options("/api/v1/evaluations", headers={
        "Origin": origin, "Access-Control-Request-Method": "POST",
        "Access-Control-Request-Headers": "authorization,content-type"})


def test_cors_is_closed_by_default(client):
    response = _preflight(client, "https://drawing-office.example")
    assert "access-control-allow-origin" not in response.headers


def test_cors_opens_to_the_configured_origins(client_for):
    with client_for(cors_origins="https://drawing-office.example") as client:
        allowed = _preflight(client, "https://drawing-office.example")
        assert allowed.headers["access-control-allow-origin"] == "https://drawing-office.example"
        other = _preflight(client, "https://elsewhere.example")
        assert "access-control-allow-origin" not in other.headers
