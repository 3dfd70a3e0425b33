"""API answers that schema-driven fuzzing found wrong, kept as they were found."""

from __future__ import annotations

import pytest
from robust_support import REPO

FRONTEND = REPO / "frontend"


def test_an_enormous_offset_is_a_422_not_a_500(client_for):
    # Found by schemathesis: ?offset=2202241019623821770059923062784 overflowed SQLite's
    # integers ("Python int too large to convert to SQLite INTEGER"), a 500.
    with client_for() as client:
        response = client.get("/api/v1/evaluations",
                              params={"offset": 2202241019623821770059923062784})
        assert response.status_code == 422
        assert response.json()["field"] == "/query/offset"
        assert client.get("/api/v1/evaluations", params={"offset": 2**62}).status_code == 200


@pytest.mark.parametrize(("method", "path", "allowed"), [
    ("OPTIONS", "/api/v1/evaluations", "POST, GET, HEAD"),
    ("PUT", "/api/v1/imports/dxf", "POST"),
    ("GET", "/api/v1/imports/dxf", "POST"),
    ("DELETE", "/api/v1/evaluations/0123abcd", "GET, HEAD"),
])
def test_a_method_a_path_does_not_take_is_405_with_its_methods(client_for, method, path,
                                                                allowed):
    # Found by schemathesis: such requests fell through to the page's static files, which
    # answered 405 "Allow: GET, HEAD" whatever the path took (POST only, or GET and POST).
    with client_for(frontend_dir=FRONTEND) as client:
        response = client.request(method, path)
        assert response.status_code == 405
        assert response.headers["allow"] == allowed
        assert f"it takes {allowed}" in response.json()["detail"]


def test_an_unknown_api_path_is_a_json_404(client_for):
    with client_for(frontend_dir=FRONTEND) as client:
        response = client.get("/api/v2/evaluations")
        assert response.status_code == 404
        assert "no API path /api/v2/evaluations" in response.json()["detail"]
        assert client.get("/").status_code == 200  # the page is still served


def test_a_misspelt_parameters_key_is_refused_not_taken_as_the_defaults(client_for):
    # Found by schemathesis: a body of unknown keys was taken as "no parameters" and the
    # template's defaults were evaluated; {"parameter": {...}} silently meant the defaults.
    with client_for() as client:
        response = client.post("/api/v1/templates/wall_corner/section",
                               json={"parameter": {"insulation_thickness": 160}})
        assert response.status_code == 422
        assert response.json()["field"] == "/parameter"
        assert "misspelt" in response.json()["detail"]
        good = client.post("/api/v1/templates/wall_corner/section",
                           json={"parameters": {"insulation_thickness": 160}})
        assert good.status_code == 200
