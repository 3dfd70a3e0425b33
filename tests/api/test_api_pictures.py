"""Pictures and report of a done evaluation, drawn by coldseam.reporting."""

from __future__ import annotations

import datetime
import sys
import types

import pytest
from api_support import WALL_1D, fake

ENGINE = "coldseam.thermal.evaluate:evaluate"


@pytest.fixture(scope="module")
def real_client(tmp_path_factory):
    from fastapi.testclient import TestClient

    from coldseam.api.main import create_app
    from coldseam.settings import Settings

    settings = Settings(data_dir=tmp_path_factory.mktemp("pictures"), engine=ENGINE,
                        workers=1, frontend_dir=None)
    with TestClient(create_app(settings)) as client:
        evaluation_id = client.post("/api/v1/evaluations", json=WALL_1D).json()["id"]
        yield client, evaluation_id


def test_svg_picture(real_client):
    client, evaluation_id = real_client
    response = client.get(f"/api/v1/evaluations/{evaluation_id}/picture.svg")
    assert response.status_code == 200
    assert response.headers["content-type"].startswith("image/svg+xml")
    assert "<svg" in response.text
    assert "sandbox" in response.headers["content-security-policy"]


def test_png_picture(real_client):
    client, evaluation_id = real_client
    response = client.get(f"/api/v1/evaluations/{evaluation_id}/picture.png")
    assert response.status_code == 200
    assert response.headers["content-type"] == "image/png"
    assert response.content.startswith(b"\x89PNG\r\n\x1a\n")


def test_report_gets_the_result_the_request_and_the_svg(client, monkeypatch):
    calls = {}

    def render_report(result, request, svg, details):
        calls.update(result=result, request=request, svg=svg, details=details)
        return "<!doctype html><title>report</title>"

    def render_svg(field, result):
        return f"<svg data-points='{len(field['points'])}'/>"

    monkeypatch.setitem(sys.modules, "coldseam.reporting.report",
                        types.SimpleNamespace(render_report=render_report))
    monkeypatch.setitem(sys.modules, "coldseam.reporting.picture",
                        types.SimpleNamespace(render_svg=render_svg))
    body = client.post("/api/v1/evaluations", json=fake()).json()
    response = client.get(f"/api/v1/evaluations/{body['id']}/report")
    assert response.status_code == 200
    assert response.headers["content-type"].startswith("text/html")
    assert calls["svg"] == "<svg data-points='3'/>"
    assert calls["result"]["id"] == body["id"]
    assert calls["request"]["section"]["name"] == fake()["section"]["name"]
    assert calls["request"]["options"]["element"] == "P2"  # normalised, defaults filled
    assert calls["details"] == {"project": None, "author": None, "checked_by": None,
                                "date": datetime.date.today().isoformat()}
    response = client.get(f"/api/v1/evaluations/{body['id']}/report",
                          params={"project": "Harrowgate Lane library", "author": "A. Teller",
                                  "checked_by": "B. Reeve", "date": "2026-11-30"})
    assert response.status_code == 200
    assert calls["details"] == {"project": "Harrowgate Lane library", "author": "A. Teller",
                                "checked_by": "B. Reeve", "date": "2026-11-30"}


def test_a_report_date_that_is_no_date_is_422_naming_the_parameter(client):
    body = client.post("/api/v1/evaluations", json=fake()).json()
    response = client.get(f"/api/v1/evaluations/{body['id']}/report",
                          params={"date": "30/11/2026"})
    assert response.status_code == 422
    assert "date" in response.text


def test_missing_renderer_is_501(client, monkeypatch):
    monkeypatch.setitem(sys.modules, "coldseam.reporting.report", None)
    evaluation_id = client.post("/api/v1/evaluations", json=fake()).json()["id"]
    response = client.get(f"/api/v1/evaluations/{evaluation_id}/report")
    assert response.status_code == 501
    assert "render_report" in response.json()["detail"]


def test_real_report(real_client):
    pytest.importorskip("coldseam.reporting.report")
    client, evaluation_id = real_client
    response = client.get(f"/api/v1/evaluations/{evaluation_id}/report")
    assert response.status_code == 200
    assert "competent person" in response.text
