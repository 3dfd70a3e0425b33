"""Generated strange sections and bodies through the API (real engine, real worker): 200 with
a sound result, or a 4xx whose detail names the field; never a 500."""

from __future__ import annotations

import json

import pytest
from hypothesis import HealthCheck, Phase, given, note, settings
from hypothesis import strategies as st
from robust_support import check_result, request_of
from section_strategies import BUILDING_CONDUCTIVITY, bad_numbers, boards, random_polygons

API = settings(max_examples=20, deadline=None, database=None, derandomize=True,
               phases=[Phase.explicit, Phase.generate],
               suppress_health_check=list(HealthCheck))


@pytest.fixture(scope="module")
def client(tmp_path_factory):
    from fastapi.testclient import TestClient

    from coldseam.api.main import create_app
    from coldseam.settings import Settings

    settings = Settings(data_dir=tmp_path_factory.mktemp("api"), frontend_dir=None, workers=1,
                        evaluation_timeout=60)
    with TestClient(create_app(settings), raise_server_exceptions=False) as test_client:
        yield test_client


def _answered(response) -> str:
    """Check one answer; 'solved' or 'refused'."""
    assert response.status_code in (200, 413, 422), (response.status_code, response.text[:400])
    body = response.json()
    if response.status_code == 200:
        check_result(body)
        return "solved"
    assert body["detail"] and body["kind"] in ("InvalidSection", "MeshingFailed",
                                               "LimitExceeded", "InvalidRequest"), body
    if body["field"]:
        assert body["detail"].startswith(f"{body['field']}: "), body
    return "refused"


@API
@given(st.one_of(boards(conductivity=BUILDING_CONDUCTIVITY), random_polygons()))
def test_generated_sections_are_answered_200_or_a_4xx_naming_the_field(client, section):
    note(json.dumps(section))
    _answered(client.post("/api/v1/evaluations", json=request_of(section, max_levels=5)))


@API
@given(bad_numbers())
def test_bad_numbers_are_answered_naming_their_field(client, case):
    request, pointer = case
    request["options"] = {"max_levels": 3, "max_nodes": 20_000, "sensitivities": False}
    text = json.dumps(request)  # NaN and Infinity go out as the bare words JSON lacks
    response = client.post("/api/v1/evaluations", content=text,
                           headers={"content-type": "application/json"})
    if _answered(response) == "refused" and ("NaN" in text or "Infinity" in text):
        assert response.json()["field"] in (pointer, ""), (pointer, response.json())


JSON = st.recursive(st.none() | st.booleans() | st.floats(allow_nan=False) | st.text(max_size=8),
                    lambda inner: st.lists(inner, max_size=4) |
                    st.dictionaries(st.text(max_size=8), inner, max_size=4), max_leaves=12)


@API
@given(st.one_of(JSON.map(json.dumps), st.text(max_size=200)))
def test_any_body_is_answered_never_a_500(client, text):
    response = client.post("/api/v1/evaluations", content=text.encode(),
                           headers={"content-type": "application/json"})
    assert response.status_code in (200, 413, 422), (response.status_code, response.text[:300])
    assert response.json()["detail"]
