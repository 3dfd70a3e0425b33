"""Settings from COLDSEAM_* variables; the lru_cache getter replaced through dependency_overrides;
evaluations a stopped server left unfinished are reported as failed after a restart."""

from __future__ import annotations

from fastapi.testclient import TestClient

from coldseam.api.main import create_app
from coldseam.api.store import Store, storage_key
from coldseam.settings import Settings, get_settings


def test_settings_come_from_the_environment(monkeypatch, tmp_path):
    monkeypatch.setenv("COLDSEAM_WORKERS", "3")
    monkeypatch.setenv("COLDSEAM_DATA_DIR", str(tmp_path / "results"))
    monkeypatch.setenv("COLDSEAM_CORS_ORIGINS", "https://a.example, https://b.example")
    settings = Settings()
    assert settings.workers == 3
    assert settings.database_path == tmp_path / "results" / "coldseam.sqlite3"
    assert settings.cors_origin_list == ["https://a.example", "https://b.example"]


def test_dependency_override_reaches_the_whole_app(make_settings):
    get_settings.cache_clear()
    try:
        app = create_app()
        app.dependency_overrides[get_settings] = lambda: make_settings(workers=2,
                                                                       api_keys="k-1")
        with TestClient(app) as client:
            health = client.get("/healthz").json()
            assert (health["workers"], health["auth"]) == (2, "keys")
            assert client.get("/api/v1/evaluations").status_code == 401
    finally:
        get_settings.cache_clear()


def test_unfinished_evaluations_are_failed_after_a_restart(client_for, make_settings):
    store = Store(make_settings().database_path)
    store.queue(storage_key("", "ab" * 16), "ab" * 16, "", "left running",
                '{"section": {"name": "left running"}}')
    store.mark_running(storage_key("", "ab" * 16))
    store.close()
    with client_for() as client:
        body = client.get(f"/api/v1/evaluations/{'ab' * 16}").json()
    assert body["status"] == "failed"
    assert body["error"]["kind"] == "Interrupted"
    assert "server stopped" in body["error"]["message"]
    assert body["request"] == {"section": {"name": "left running"}}


def test_results_database_is_in_wal_mode(client_for, make_settings):
    import sqlite3

    with client_for() as client:
        assert client.get("/healthz").status_code == 200
        with sqlite3.connect(make_settings().database_path) as db:
            assert db.execute("PRAGMA journal_mode").fetchone()[0] == "wal"
