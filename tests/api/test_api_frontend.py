"""The static page at /: served from the frontend folder only, with strict security headers."""

from __future__ import annotations

import os

import pytest

from coldseam.settings import Settings


@pytest.fixture
def site(tmp_path):
    folder = tmp_path / "site"
    (folder / "js").mkdir(parents=True)
    (folder / "index.html").write_text("<!doctype html><title>Coldseam</title>")
    (folder / "js" / "app.js").write_text("export const ready = true;")
    (tmp_path / "secret.txt").write_text("not for the web")
    os.symlink(tmp_path / "secret.txt", folder / "link.txt")
    return folder


def test_page_is_served_with_a_strict_policy(client_for, site):
    with client_for(frontend_dir=site) as client:
        page = client.get("/")
        assert page.status_code == 200
        assert "<title>Coldseam</title>" in page.text
        policy = page.headers["content-security-policy"]
        assert "default-src 'self'" in policy
        assert "script-src 'self'" in policy and "unsafe-inline" not in policy
        assert "frame-ancestors 'none'" in policy
        assert page.headers["x-content-type-options"] == "nosniff"
        assert page.headers["x-frame-options"] == "DENY"
        assert page.headers["referrer-policy"] == "no-referrer"
        script = client.get("/js/app.js")
        assert script.status_code == 200 and "ready" in script.text


@pytest.mark.parametrize("path", ["/../secret.txt", "/%2e%2e/secret.txt", "/js/../../secret.txt",
                                  "/link.txt", "/..%2fsecret.txt"])
def test_paths_cannot_leave_the_folder(client_for, site, path):
    with client_for(frontend_dir=site) as client:
        response = client.get(path)
        assert response.status_code == 404, path
        assert "not for the web" not in response.text


def test_api_answers_run_nothing(client):
    response = client.get("/api/v1/evaluations")
    policy = response.headers["content-security-policy"]
    assert policy.startswith("default-src 'none'") and "sandbox" in policy
    assert response.headers["x-request-id"]


def test_without_a_frontend_the_root_points_to_the_docs(client):
    assert client.get("/").json()["docs"] == "/docs"


def test_default_frontend_is_the_folder_beside_the_package():
    from api_support import REPO

    assert Settings().frontend_dir == REPO / "frontend"
