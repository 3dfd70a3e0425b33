"""Materials and templates endpoints, and the plain-text value endpoint for spreadsheets."""

from __future__ import annotations

import pytest

from coldseam.materials import load_library
from coldseam.templates import build, list_templates

# The real engine: the template endpoints build and evaluate real sections.
ENGINE = "coldseam.thermal.evaluate:evaluate"


@pytest.fixture(scope="module")
def corner_psi() -> float:
    """ψ of the wall_corner template at 160 mm insulation, from the engine called directly."""
    from coldseam.schema.evaluation import parse_request
    from coldseam.thermal.evaluate import evaluate

    request = parse_request(build("wall_corner", {"insulation_thickness": 160}))
    return evaluate(request).result["psi"]["value"]


def test_materials_lists_the_library(client):
    materials = client.get("/api/v1/materials").json()["materials"]
    assert {m["id"] for m in materials} == set(load_library())
    assert all(m["conductivity"] > 0 and m["source"] for m in materials)


def test_templates_lists_each_with_parameters(client):
    templates = client.get("/api/v1/templates").json()["templates"]
    assert [t["id"] for t in templates] == [t.id for t in list_templates()]
    assert all(t["parameters"] for t in templates)


def test_template_section_is_what_the_template_builds(client):
    response = client.post("/api/v1/templates/wall_corner/section",
                           json={"parameters": {"insulation_thickness": 120}})
    assert response.status_code == 200
    assert response.json() == build("wall_corner", {"insulation_thickness": 120})
    defaults = client.post("/api/v1/templates/wall_corner/section")
    assert defaults.json() == build("wall_corner", {})


@pytest.mark.parametrize(("body", "status", "field"), [
    ({"parameters": {"insulation_thickness": -5}}, 422, "/parameters/insulation_thickness"),
    ({"parameters": {"colour": "red"}}, 422, "/parameters/colour"),
    ({"parameters": [1]}, 422, "/parameters"),
])
def test_template_parameter_errors_name_the_parameter(client, body, status, field):
    response = client.post("/api/v1/templates/wall_corner/section", json=body)
    assert response.status_code == status
    assert response.json()["field"] == field


def test_unknown_template_is_404(client):
    response = client.post("/api/v1/templates/no_such_junction/section", json={})
    assert response.status_code == 404
    assert "wall_corner" in response.json()["detail"]


def test_template_evaluation_and_value(client_for, corner_psi):
    with client_for(engine=ENGINE) as client:
        evaluated = client.post("/api/v1/templates/wall_corner/evaluations",
                                json={"parameters": {"insulation_thickness": 160}})
        assert evaluated.status_code == 200, evaluated.text
        assert evaluated.json()["psi"]["value"] == pytest.approx(corner_psi, rel=1e-9)

        value = client.get("/api/v1/templates/wall_corner/value",
                           params={"quantity": "psi", "insulation_thickness": "160"})
        assert value.status_code == 200
        assert value.headers["content-type"].startswith("text/plain")
        assert float(value.text) == pytest.approx(corner_psi, rel=1e-5)
        assert client.app.state.evaluations.pool.completed == 1  # the stored result again

        csv = client.get("/api/v1/templates/wall_corner/value",
                         params={"quantity": "psi", "insulation_thickness": "160",
                                 "format": "csv"})
        header, line = csv.text.splitlines()
        assert header == "insulation_thickness,psi"
        assert line.split(",")[0] == "160"
        assert float(line.split(",")[1]) == pytest.approx(corner_psi, rel=1e-5)


@pytest.mark.parametrize(("params", "status", "words"), [
    ({"quantity": "psy"}, 422, "error: /quantity: quantity must be one of psi"),
    ({"quantity": "psi", "insulation_thickness": "-5"}, 422,
     "error: /parameters/insulation_thickness:"),
    ({"quantity": "psi", "format": "xlsx"}, 422, "error: /query/format"),
])
def test_value_errors_are_plain_text(client, params, status, words):
    response = client.get("/api/v1/templates/wall_corner/value", params=params)
    assert response.status_code == status
    assert response.headers["content-type"].startswith("text/plain")
    assert response.text.startswith(words)


def test_value_of_an_unknown_template_is_plain_404(client):
    response = client.get("/api/v1/templates/no_such_junction/value")
    assert response.status_code == 404
    assert response.text.startswith("error: no template 'no_such_junction'")


def test_value_needs_the_key_in_plain_text_too(client_for):
    with client_for(api_keys="delta-key") as client:
        response = client.get("/api/v1/templates/wall_corner/value")
        assert response.status_code == 401
        assert response.text.startswith("error: this server needs an API key")


def test_value_gives_several_quantities_as_csv_and_the_effective_u(client_for):
    with client_for(engine=ENGINE) as client:
        params = {"quantity": "psi,fRsi,min_temperature,U", "format": "csv",
                  "stud_spacing": "600"}
        csv = client.get("/api/v1/templates/framed_wall/value", params=params)
        assert csv.status_code == 200, csv.text
        header, line = csv.text.splitlines()
        assert header == "stud_spacing,psi,fRsi,min_temperature,U"
        values = [float(v) for v in line.split(",")]
        result = client.post("/api/v1/templates/framed_wall/evaluations",
                             json={"parameters": {"stud_spacing": 600}}).json()
        # the effective U of a periodic framed wall is L2D over one stud spacing
        assert values[4] == pytest.approx(result["L2D"] / 0.6, rel=1e-5)
        assert values[3] == pytest.approx(result["condensation"]["min_temperature"], rel=1e-5)
        several = client.get("/api/v1/templates/framed_wall/value",
                             params={"quantity": "psi,U"})
        assert several.status_code == 422
        assert several.text.startswith("error: /quantity: several quantities need format=csv")


@pytest.mark.parametrize("path", ["/tests/colormap.test.js", "/package.json"])
def test_frontend_developer_files_are_not_served(client_for, path):
    from pathlib import Path

    frontend = Path(__file__).resolve().parents[2] / "frontend"
    with client_for(frontend_dir=frontend) as client:
        assert client.get(path).status_code == 404
        assert client.get("/js/main.js").status_code == 200
