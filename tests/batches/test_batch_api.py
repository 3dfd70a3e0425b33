"""``/api/v1/batches`` with the stand-in engine: items and grids, the same ids and rows as
single evaluations, failures that stop nothing, limits, pages, owners, cancel, the queue."""

from __future__ import annotations

import math
import time

from batch_support import finished

from coldseam.api.store import storage_key

SCHEDULE = {
    "name": "Harrowgate test schedule",
    "items": [
        {"id": "J2", "template": "floor_slab", "parameters": {"insulation_thickness": 160},
         "length": 64},
        {"id": "J3", "template": "wall_corner", "length": 28.8},
        {"id": "J7", "template": "eaves"},
    ],
    "grid": {"template": "floor_slab", "parameters": {"insulation_thickness": [100, 200],
                                                      "slab_thickness": [200, 250]},
             "length": 2.5},
}


def _post(client, body, **params):
    response = client.post("/api/v1/batches", json=body, params=params)
    assert response.status_code == 202, response.text
    assert response.headers["Location"] == f"/api/v1/batches/{response.json()['id']}"
    return response.json()["id"]


def test_a_batch_evaluates_its_items_and_grid_and_sums_psi_times_length(client):
    body = finished(client, _post(client, SCHEDULE))
    assert body["status"] == "done" and body["name"] == "Harrowgate test schedule"
    assert body["counts"] == {"queued": 0, "running": 0, "done": 7, "failed": 0}
    ids = [item["id"] for item in body["items"]]
    assert ids[:3] == ["J2", "J3", "J7"]
    assert ids[3:] == ["insulation_thickness=100, slab_thickness=200",
                       "insulation_thickness=100, slab_thickness=250",
                       "insulation_thickness=200, slab_thickness=200",
                       "insulation_thickness=200, slab_thickness=250"]
    for item in body["items"]:
        if item["length"] is None:
            assert item["psi_l"] is None
        else:
            assert item["psi_l"] == item["psi"] * item["length"]
    with_length = [item["psi_l"] for item in body["items"] if item["psi_l"] is not None]
    assert len(with_length) == 6
    assert body["sum_psi_l"] == math.fsum(with_length)
    assert math.isclose(body["sum_psi_l"], sum(with_length), rel_tol=1e-12)
    assert "competent person" in body["caution"]


def test_items_are_ordinary_evaluations_with_the_ids_of_single_calls(client):
    body = finished(client, _post(client, SCHEDULE))
    alone = client.post("/api/v1/templates/floor_slab/evaluations",
                        json={"parameters": {"insulation_thickness": 160}})
    assert alone.status_code == 200
    first = body["items"][0]
    assert first["evaluation_id"] == alone.json()["id"]
    stored = client.get(f"/api/v1/evaluations/{first['evaluation_id']}").json()
    assert stored == alone.json()
    assert stored["psi"]["value"] == first["psi"]
    assert stored["condensation"]["fRsi"] == first["fRsi"]


def test_an_item_already_evaluated_is_not_evaluated_again(client):
    finished(client, _post(client, SCHEDULE))
    pool = client.app.state.evaluations.pool
    before = pool.completed
    again = finished(client, _post(client, SCHEDULE))
    assert again["status"] == "done" and pool.completed == before


def test_a_failed_item_carries_its_error_and_stops_nothing(client):
    broken_request = {"section": {"unit": "mm", "materials": [], "regions": [],
                                  "environments": [], "boundaries": []}}
    body = {"items": [
        {"id": "fine", "template": "wall_corner", "length": 1},
        {"id": "no template", "template": "wall_cornr", "length": 1},
        {"id": "too thin", "template": "floor_slab", "parameters": {"insulation_thickness": 1}},
        {"id": "empty", "request": broken_request},
        {"id": "also fine", "template": "eaves", "length": 2},
    ]}
    result = finished(client, _post(client, body))
    states = {item["id"]: item for item in result["items"]}
    assert result["status"] == "failed"
    assert result["counts"]["done"] == 2 and result["counts"]["failed"] == 3
    assert states["fine"]["status"] == states["also fine"]["status"] == "done"
    missing = states["no template"]["error"]
    assert missing["status"] == 422 and missing["field"] == "/items/1/template"
    assert "did you mean wall_corner" in missing["message"]
    thin = states["too thin"]["error"]
    assert thin["field"] == "/items/2/parameters/insulation_thickness"
    assert states["empty"]["error"]["field"].startswith("/items/3/request/section")
    assert result["sum_psi_l"] == states["fine"]["psi_l"] + states["also fine"]["psi_l"]
    assert result["sum_psi_l_items"] == 2 and result["items_with_length"] == 3


def test_an_engine_failure_fails_its_item_only(client):
    from batch_support import wall

    request = wall(description="fake: meshing-failed")
    body = finished(client, _post(client, {"items": [{"id": "bad", "request": request},
                                                     {"id": "good", "template": "eaves"}]}))
    bad, good = body["items"]
    assert bad["status"] == "failed" and bad["error"]["kind"] == "MeshingFailed"
    assert bad["error"]["status"] == 422 and good["status"] == "done"
    evaluation = client.get(f"/api/v1/evaluations/{bad['evaluation_id']}").json()
    assert evaluation["status"] == "failed"


def test_a_csv_schedule_is_a_batch(client):
    schedule = ("id,template,length,insulation_thickness,connection\n"
                "J2 slab edge,floor_slab,64,160,\n"
                "J4 balcony,balcony,12,,thermal_break\n")
    response = client.post("/api/v1/batches", content=schedule.encode(),
                           headers={"Content-Type": "text/csv"}, params={"name": "csv"})
    assert response.status_code == 202, response.text
    body = finished(client, response.json()["id"])
    assert body["name"] == "csv" and body["status"] == "done"
    assert [i["parameters"] for i in body["items"]] == [{"insulation_thickness": 160},
                                                       {"connection": "thermal_break"}]
    assert [i["length"] for i in body["items"]] == [64.0, 12.0]


def test_bad_batch_documents_are_answered_422_naming_the_field(client):
    cases = [
        ({}, "/items"),
        ({"items": "J2"}, "/items"),
        ({"items": [{"id": "a"}]}, "/items/0"),
        ({"items": [{"template": "eaves", "request": {}}]}, "/items/0"),
        ({"items": [{"template": "eaves", "length": -1}]}, "/items/0/length"),
        ({"items": [{"template": "eaves", "colour": 1}]}, "/items/0/colour"),
        ({"items": [{"id": "a", "template": "eaves"}, {"id": "a", "template": "eaves"}]},
         "/items/1/id"),
        ({"grid": {"template": "eaves", "parameters": {"roof_pitch": []}}},
         "/grid/parameters/roof_pitch"),
        ({"grid": {"template": "eaves"}}, "/grid/parameters"),
        ({"itemz": []}, "/itemz"),
    ]
    for body, field in cases:
        response = client.post("/api/v1/batches", json=body)
        assert response.status_code == 422, (body, response.text)
        assert response.json()["field"] == field, (body, response.json())
    text = client.post("/api/v1/batches", content=b"id,template\n",
                       headers={"Content-Type": "text/csv"})
    assert text.status_code == 422 and text.json()["field"] == "/schedule"
    header = client.post("/api/v1/batches", content=b"name,length\nJ1,2\n",
                         headers={"Content-Type": "text/csv"})
    assert header.status_code == 422 and header.json()["field"] == "/schedule/columns/id"


def test_too_many_items_are_refused_413_before_a_grid_is_expanded(client_for):
    with client_for(max_batch_items=50) as client:
        huge = {"grid": {"template": "eaves", "parameters": {
            "roof_pitch": list(range(1000)), "wall_thickness": list(range(1000)),
            "roof_insulation_thickness": list(range(1000))}}}  # 10⁹ items
        started = time.monotonic()
        response = client.post("/api/v1/batches", json=huge)
        assert response.status_code == 413
        assert time.monotonic() - started < 5
        assert response.json()["field"] == "/grid/parameters"
        assert "at most 50" in response.json()["message"]
        items = {"items": [{"template": "eaves", "id": str(n)} for n in range(51)]}
        over = client.post("/api/v1/batches", json=items)
        assert over.status_code == 413 and over.json()["field"] == "/items"
        assert client.post("/api/v1/batches", json={"items": items["items"][:50]}
                           ).status_code == 202


def test_a_thousand_item_grid_is_accepted_paged_and_cancelled(client):
    grid = {"grid": {"template": "eaves", "parameters": {
        "roof_pitch": list(range(0, 50)), "roof_insulation_thickness": list(range(100, 120))}}}
    batch_id = _post(client, grid)
    page = client.get(f"/api/v1/batches/{batch_id}", params={"limit": 100, "offset": 900})
    body = page.json()
    assert body["total"] == 1000 and len(body["items"]) == 100
    assert body["items"][0]["position"] == 900
    assert body["items"][0]["id"] == "roof_pitch=45, roof_insulation_thickness=100"
    assert body["items"][-1]["id"] == "roof_pitch=49, roof_insulation_thickness=119"
    everything = client.get(f"/api/v1/batches/{batch_id}").json()
    assert len(everything["items"]) == 1000
    assert client.get(f"/api/v1/batches/{batch_id}", params={"limit": 1001}).status_code == 422
    cancel = client.post(f"/api/v1/batches/{batch_id}/cancel")
    assert cancel.status_code == 200 and cancel.json()["cancelled_items"] > 900
    body = finished(client, batch_id)
    assert body["cancelled"] and body["status"] == "failed"
    assert body["counts"]["done"] + body["counts"]["failed"] == 1000
    cancelled = [i for i in body["items"] if i["status"] == "failed"]
    assert all(i["error"]["kind"] == "Cancelled" and i["error"]["status"] == 409
               for i in cancelled)


def test_batches_belong_to_the_key_that_made_them(client_for):
    with client_for(api_keys="key-a,key-b") as client:
        a, b = {"Authorization": "Bearer key-a"}, {"Authorization": "Bearer key-b"}
        response = client.post("/api/v1/batches", json=SCHEDULE, headers=a)
        batch_id = response.json()["id"]
        body = finished(client, batch_id, **a)
        for path in ("", "/results.csv", "/results.xlsx", "/report"):
            assert client.get(f"/api/v1/batches/{batch_id}{path}", headers=b
                              ).status_code == 404
        assert client.post(f"/api/v1/batches/{batch_id}/cancel", headers=b).status_code == 404
        evaluation = body["items"][0]["evaluation_id"]
        assert client.get(f"/api/v1/evaluations/{evaluation}", headers=a).status_code == 200
        assert client.get(f"/api/v1/evaluations/{evaluation}", headers=b).status_code == 404
        assert client.get("/api/v1/batches", headers=b).json()["total"] == 0
        assert client.get("/api/v1/batches", headers=a).json()["total"] == 1
        assert client.get(f"/api/v1/batches/{batch_id}").status_code == 401


def test_a_batch_never_floods_the_queue_and_single_evaluations_get_through(client_for):
    from batch_support import wall

    slow = [{"id": str(n), "request": wall(name=f"slow {n}", description="fake: sleep=0.2")}
            for n in range(12)]
    with client_for(queue_size=2) as client:
        batch_id = _post(client, {"items": slow})
        time.sleep(0.3)
        single = client.post("/api/v1/evaluations", json=wall(name="single"))
        assert single.status_code == 200, single.text
        body = finished(client, batch_id)
        assert body["status"] == "done" and body["counts"]["done"] == 12


def test_wait_true_answers_the_finished_batch(client):
    response = client.post("/api/v1/batches", json=SCHEDULE, params={"wait": "true"})
    assert response.status_code == 200
    assert response.json()["status"] == "done" and len(response.json()["items"]) == 7


def test_the_item_keys_are_the_evaluation_keys_of_the_owner(client):
    body = finished(client, _post(client, SCHEDULE))
    store = client.app.state.evaluations.store
    for item in body["items"]:
        assert store.get(storage_key("", item["evaluation_id"])).status == "done"


def test_items_resumed_under_a_lower_node_cap_are_filed_under_their_new_id(client_for):
    body = {"items": [{"id": "J6", "template": "eaves"}]}
    with client_for(prestart_workers=False) as client:
        runner = client.app.state.batches
        runner.stop()  # nothing runs: the item stays queued, as when a server is killed
        batch_id = client.post("/api/v1/batches", json=body).json()["id"]
        made = client.get(f"/api/v1/batches/{batch_id}").json()["items"][0]["evaluation_id"]
    with client_for(max_nodes=5000) as client:  # restarted with a lower cap: another request
        item = finished(client, batch_id)["items"][0]
        assert item["status"] == "done" and item["evaluation_id"] != made
        evaluation = client.get(f"/api/v1/evaluations/{item['evaluation_id']}").json()
        assert evaluation["status"] == "done" and evaluation["psi"]["value"] == item["psi"]
        assert client.get(f"/api/v1/evaluations/{made}").status_code == 404


def test_a_server_stopped_mid_batch_finishes_it_after_restart(client_for):
    from batch_support import wall

    slow = [{"id": str(n), "request": wall(name=f"slow {n}", description="fake: sleep=0.3")}
            for n in range(6)]
    with client_for() as client:
        batch_id = _post(client, {"items": slow})
        deadline = time.monotonic() + 30
        while client.get(f"/api/v1/batches/{batch_id}").json()["counts"]["done"] < 1:
            assert time.monotonic() < deadline
            time.sleep(0.05)
    with client_for() as client:  # a graceful stop: items cut off are sent again
        body = finished(client, batch_id)
        assert body["status"] == "done" and body["counts"]["done"] == 6
