"""Schema-driven fuzzing of the whole API (schemathesis over the OpenAPI document) against a
real server on 127.0.0.1 with API keys: no server errors, every answer matches its documented
status, content type, headers and schema, and invalid keys are refused. Bounded for CI."""

from __future__ import annotations

import httpx
import pytest
import schemathesis
from hypothesis import HealthCheck, Phase, settings
from robust_server import serve
from robust_support import wall_request
from schemathesis import checks

KEY = "fuzz-key-41c"
AUTH = {"Authorization": f"Bearer {KEY}"}
#: A schema-valid request may still be refused: a polygon that crosses itself, a material
#: nobody defined, bytes that are not DXF. The schema cannot say that, so a 422 for
#: schema-valid data is right here (positive_data_acceptance would call it a failure).
#: And pydantic's lax mode takes unambiguous spellings the schema does not list (0 for false,
#: "20" for 20): negative_data_rejection would call that a failure; it is leniency by design.
EXCLUDED = [checks.positive_data_acceptance, checks.negative_data_rejection]


@pytest.fixture(scope="module")
def live(tmp_path_factory):
    folder = tmp_path_factory.mktemp("fuzz")
    with serve(folder / "data", folder / "server.log", workers=2, api_keys=KEY,
               max_nodes="20000", evaluation_timeout="30") as server:
        yield server


@pytest.fixture(scope="module")
def api_schema(live):
    return schemathesis.openapi.from_url(f"{live.base}/openapi.json")


schema = schemathesis.pytest.from_fixture("api_schema")


@schema.parametrize()
@settings(max_examples=20, deadline=None, database=None, derandomize=True,
          phases=[Phase.explicit, Phase.generate],
          suppress_health_check=list(HealthCheck))
def test_every_operation_answers_as_documented(case, live):
    response = case.call(base_url=live.base, headers=AUTH, timeout=60)
    case.validate_response(response, excluded_checks=EXCLUDED, headers=AUTH)


def test_a_done_evaluation_answers_every_read_as_documented(live, api_schema):
    posted = httpx.post(f"{live.base}/api/v1/evaluations", json=wall_request(), headers=AUTH,
                        timeout=60)
    assert posted.status_code == 200, posted.text
    evaluation_id = posted.json()["id"]
    for suffix in ("", "/field", "/picture.svg", "/picture.png", "/report"):
        operation = api_schema[f"/api/v1/evaluations/{{evaluation_id}}{suffix}"]["GET"]
        case = operation.Case(path_parameters={"evaluation_id": evaluation_id})
        response = case.call(base_url=live.base, headers=AUTH, timeout=60)
        assert response.status_code == 200, (suffix, response.text[:200])
        case.validate_response(response, excluded_checks=EXCLUDED, headers=AUTH)
    listing = api_schema["/api/v1/evaluations"]["GET"].Case(query={"limit": 5})
    response = listing.call(base_url=live.base, headers=AUTH)
    assert response.json()["total"] >= 1
    listing.validate_response(response, excluded_checks=EXCLUDED, headers=AUTH)
