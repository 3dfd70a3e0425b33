"""The batch tables of the store: items in order, counts, figures, cancel and restart."""

from __future__ import annotations

import pytest

from coldseam.api.batch_store import Figures, NewItem
from coldseam.api.store import Store


@pytest.fixture
def store(tmp_path):
    opened = Store(tmp_path / "store.sqlite3")
    yield opened
    opened.close()


def _items(count: int) -> list[NewItem]:
    return [NewItem(item_id=f"J{n}", template="floor_slab",
                    parameters={"insulation_thickness": 100 + n}, length=2.0 + n,
                    request='{"section": {}}', evaluation_id=f"e{n}") for n in range(count)]


def test_a_batch_reads_back_in_order_with_counts(store):
    failed = NewItem("bad", "nope", {}, None, None, None, {"kind": "InvalidSection",
                                                           "message": "no template"})
    store.create_batch("k", "b1", "owner", "schedule", {"name": "schedule"},
                       [*_items(3), failed])
    assert store.batch("k").name == "schedule"
    items = store.batch_items("k")
    assert [i.item_id for i in items] == ["J0", "J1", "J2", "bad"]
    assert items[3].error["kind"] == "InvalidSection"
    assert store.batch_counts("k") == {"queued": 3, "running": 0, "done": 0, "failed": 1}
    assert [i.item_id for i in store.batch_items("k", limit=2, offset=1)] == ["J1", "J2"]


def test_finished_items_keep_their_figures_and_psi_times_length(store):
    store.create_batch("k", "b1", "owner", None, {}, _items(2))
    store.mark_item_running("k", 0)
    store.finish_item("k", 0, Figures(0.043, 0.95, 18.8, 0.47, "pass"), None)
    store.finish_item("k", 1, None, {"kind": "Timeout", "message": "too long"})
    done, failed = store.batch_items("k")
    assert (done.status, done.psi, done.psi_l, done.verdict) == ("done", 0.043, 0.043 * 2.0,
                                                                "pass")
    assert failed.status == "failed" and failed.error["kind"] == "Timeout"
    assert store.batch_psi_l("k") == ([0.043 * 2.0], 2)


def test_cancel_fails_only_the_waiting_items(store):
    store.create_batch("k", "b1", "owner", None, {}, _items(3))
    store.mark_item_running("k", 0)
    assert store.cancel_batch("k", {"kind": "Cancelled", "message": "cancelled"}) == 2
    assert store.batch("k").cancelled
    assert [i.status for i in store.batch_items("k")] == ["running", "failed", "failed"]


def test_unfinished_items_survive_reopening_and_running_ones_go_back_in_line(tmp_path):
    first = Store(tmp_path / "store.sqlite3")
    first.create_batch("k", "b1", "owner", None, {}, _items(3))
    first.mark_item_running("k", 0)
    first.finish_item("k", 1, Figures(0.1, None, None, None, None), None)
    first.close()
    again = Store(tmp_path / "store.sqlite3")
    try:
        assert again.unfinished_items() == [("k", 0), ("k", 2)]
        assert again.batch_counts("k")["queued"] == 2
        assert again.item_request("k", 0) == ("owner", '{"section": {}}')
        assert again.batch_items("k")[1].psi_l == pytest.approx(0.3)
    finally:
        again.close()


def test_an_item_can_be_filed_under_a_new_evaluation_id(store):
    store.create_batch("k", "b1", "owner", None, {}, _items(1))
    assert store.item_evaluation_id("k", 0) == "e0"
    store.set_item_evaluation("k", 0, "e0-again")
    assert store.batch_items("k")[0].evaluation_id == "e0-again"
