"""With the real engine: a batch equals the same evaluations made one by one, bit for bit."""

from __future__ import annotations

import pytest
from batch_support import finished

from coldseam import DEFAULT_ENGINE

ITEMS = [
    {"id": "slab", "template": "floor_slab", "parameters": {"insulation_thickness": 120},
     "length": 10},
    {"id": "corner", "template": "wall_corner", "length": 5.5},
    {"id": "balcony", "template": "balcony", "parameters": {"connection": "thermal_break"},
     "length": 4},
    {"id": "eaves", "template": "eaves", "parameters": {"roof_pitch": 30}, "length": 8},
]


@pytest.mark.slow
def test_a_batch_equals_the_same_evaluations_one_by_one(client_for, tmp_path):
    with client_for(engine=DEFAULT_ENGINE, workers=2) as client:
        batch = finished(client, client.post("/api/v1/batches", json={"items": ITEMS}
                                             ).json()["id"], timeout=300)
        assert batch["status"] == "done"
        from_batch = {item["id"]: client.get(f"/api/v1/evaluations/{item['evaluation_id']}"
                                             ).json() for item in batch["items"]}
    with client_for(engine=DEFAULT_ENGINE, workers=1, data_dir=tmp_path / "alone") as alone:
        for item, row in zip(ITEMS, batch["items"], strict=True):
            single = alone.post(f"/api/v1/templates/{item['template']}/evaluations",
                                json={"parameters": item.get("parameters", {})}).json()
            stored = from_batch[item["id"]]
            assert single["id"] == row["evaluation_id"]
            single.pop("created_at"), stored.pop("created_at")
            assert single == stored  # every figure, bit for bit (JSON floats are exact)
            assert row["psi"] == single["psi"]["value"]
            assert row["psi_l"] == single["psi"]["value"] * item["length"]
            assert row["fRsi"] == single["condensation"]["fRsi"]
            assert row["min_temperature"] == single["condensation"]["min_temperature"]
            assert row["L2D"] == single["L2D"]
