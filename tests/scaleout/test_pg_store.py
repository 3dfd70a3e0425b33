"""The PostgreSQL store on a real PostgreSQL server: the same behaviour as the SQLite store,
migrations safe when several servers start at once, and only a server's own unfinished work
interrupted at its start."""

from __future__ import annotations

import json
import threading

import psycopg
import pytest
from scaleout_support import free_port

from coldseam.api.batch_store import Figures, NewItem
from coldseam.api.store import Store, StoreUnavailable, storage_key
from coldseam.api.store_pg import PostgresStore, head_revision

RESULT = {"L2D": 0.25, "psi": {"value": 0.05}, "condensation": {"fRsi": 0.81, "verdict": "ok"},
          "heat_flows": {"in": 5.0}}
FIELD = {"unit": "m", "points": [[0.0, 0.0], [1.0, 0.0]], "temperature": [20.0, -5.0]}


def _play(store) -> list:
    """One sequence of changes; what the store answers along the way."""
    seen = []
    for number in range(3):
        evaluation_id = f"{number:032x}"
        key = storage_key("owner-a", evaluation_id)
        store.queue(key, evaluation_id, "owner-a", f"section {number}", json.dumps({"n": number}))
        seen.append(store.get(key).status)
    first = storage_key("owner-a", f"{0:032x}")
    store.mark_running(first)
    seen.append(store.get(first).status)
    store.finish(first, RESULT, FIELD, None)
    failed = storage_key("owner-a", f"{1:032x}")
    store.finish(failed, None, None, {"kind": "MeshingFailed", "message": "crossed", "field": ""})
    record = store.get(first)
    seen += [record.status, record.result, record.summary, record.request_text,
             json.loads(store.field(first)), store.get(failed).error,
             store.get(storage_key("owner-b", f"{0:032x}"))]
    records, total = store.page("owner-a", 2, 0)
    seen += [total, [(r.id, r.status, r.summary) for r in records]]
    store.delete(storage_key("owner-a", f"{2:032x}"))
    seen.append(store.page("owner-a", 10, 0)[1])
    return seen


def test_postgres_store_answers_as_the_sqlite_store(database_url, tmp_path):
    sqlite = Store(tmp_path / "same.sqlite3")
    postgres = PostgresStore(database_url, "server-a")
    try:
        assert _play(postgres) == _play(sqlite)
    finally:
        sqlite.close()
        postgres.close()


def test_progress_of_a_running_evaluation_is_kept_for_other_servers(database_url):
    writer, reader = PostgresStore(database_url, "a"), PostgresStore(database_url, "b")
    key = storage_key("", "f" * 32)
    writer.queue(key, "f" * 32, "", "wall", "{}")
    writer.mark_running(key)
    writer.progress(key, "solving", 0.4)
    record = reader.get(key)
    assert (record.status, record.stage, record.progress) == ("running", "solving", 0.4)
    writer.finish(key, RESULT, None, None)
    record = reader.get(key)
    assert (record.status, record.stage, record.progress) == ("done", None, 0.0)
    writer.close()
    reader.close()


def test_servers_starting_together_migrate_the_schema_once(database_url):
    stores, errors = [], []

    def start(name: str) -> None:
        try:
            stores.append(PostgresStore(database_url, name))
        except Exception as exc:  # noqa: BLE001 - collected and asserted below
            errors.append(exc)

    threads = [threading.Thread(target=start, args=(f"s{i}",)) for i in range(4)]
    for thread in threads:
        thread.start()
    for thread in threads:
        thread.join(60)
    assert errors == [] and len(stores) == 4
    with psycopg.connect(database_url) as conn:
        versions = conn.execute("SELECT version_num FROM alembic_version").fetchall()
        tables = {row[0] for row in conn.execute(
            "SELECT tablename FROM pg_tables WHERE schemaname='public'")}
    assert versions == [(head_revision(),)] and head_revision() == "0002"
    assert tables == {"alembic_version", "evaluations", "batches", "batch_items"}
    for store in stores:
        store.close()


def test_a_starting_server_interrupts_only_its_own_unfinished_work(database_url):
    mine, theirs = PostgresStore(database_url, "here:8000"), PostgresStore(database_url,
                                                                           "there:8000")
    my_key, their_key = storage_key("", "1" * 32), storage_key("", "2" * 32)
    mine.queue(my_key, "1" * 32, "", "mine", "{}")
    theirs.queue(their_key, "2" * 32, "", "theirs", "{}")
    theirs.mark_running(their_key)
    restarted = PostgresStore(database_url, "here:8000")
    assert restarted.interrupt_unfinished("stopped") == 1
    assert restarted.get(my_key).error["kind"] == "Interrupted"
    assert restarted.get(their_key).status == "running"
    for store in (mine, theirs, restarted):
        store.close()


def test_an_unreachable_database_is_store_unavailable():
    url = f"postgresql://postgres@127.0.0.1:{free_port()}/none"
    with pytest.raises(StoreUnavailable, match="cannot be reached"):
        PostgresStore(url, "lonely", wait=0)


def _play_batches(store) -> list:
    """One sequence of batch changes (as the SQLite store's own tests make); the answers."""
    items = [NewItem(item_id=f"J{n}", template="floor_slab",
                     parameters={"insulation_thickness": 100 + n}, length=2.0 + n,
                     request='{"section": {}}', evaluation_id=f"e{n}") for n in range(4)]
    failed = NewItem("bad", "nope", {}, None, None, None, {"kind": "InvalidSection",
                                                           "message": "no template"})
    store.create_batch("k", "b1", "owner", "schedule", {"name": "schedule"}, [*items, failed])
    store.create_batch("k2", "b2", "owner", None, {}, items[:1])
    seen = [store.batch("k").name, store.batch("k").spec, store.batch("nope"),
            store.batch_items("k"), store.batch_items("k", limit=2, offset=1),
            store.batch_counts("k"), store.item_request("k", 1)]
    store.mark_item_running("k", 0)
    store.finish_item("k", 0, Figures(0.043, 0.95, 18.8, 0.47, "pass"), None)
    store.mark_item_running("k", 1)
    store.finish_item("k", 1, None, {"kind": "Timeout", "message": "slow", "field": ""})
    store.mark_item_running("k", 2)
    store.requeue_item("k", 2)
    store.mark_item_running("k", 3)
    seen.append(store.item_evaluation_id("k", 3))
    store.set_item_evaluation("k", 3, "e3-capped")
    seen += [store.item_evaluation_id("k", 3), store.item_evaluation_id("k", 99)]
    seen += [store.batch_items("k"), store.batch_counts("k"), store.batch_psi_l("k"),
             store.item_request("k", 0), store.unfinished_items(),
             store.cancel_batch("k2", {"kind": "Cancelled", "message": "c", "field": ""}),
             store.batch("k2").cancelled, store.batch_page("owner", 10, 0)[1],
             store.batch_page("nobody", 10, 0)]
    return seen


def test_postgres_batch_tables_answer_as_the_sqlite_ones(database_url, tmp_path):
    sqlite = Store(tmp_path / "batches.sqlite3")
    postgres = PostgresStore(database_url, "server-a")
    try:
        assert _play_batches(postgres) == _play_batches(sqlite)
    finally:
        sqlite.close()
        postgres.close()


def test_a_starting_server_resumes_only_its_own_batches(database_url):
    mine, theirs = PostgresStore(database_url, "here"), PostgresStore(database_url, "there")
    item = NewItem("J1", "floor_slab", {}, 1.0, '{"section": {}}', "e1")
    mine.create_batch("mine", "b1", "o", None, {}, [item])
    theirs.create_batch("theirs", "b2", "o", None, {}, [item])
    theirs.mark_item_running("theirs", 0)
    assert PostgresStore(database_url, "here").unfinished_items() == [("mine", 0)]
    assert mine.batch_counts("theirs")["running"] == 1
    mine.close()
    theirs.close()


def test_every_method_of_the_sqlite_store_has_a_postgresql_twin():
    public = {name for name in dir(Store) if not name.startswith("_")}
    assert sorted(public - set(dir(PostgresStore))) == []
