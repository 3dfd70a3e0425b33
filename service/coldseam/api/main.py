"""The FastAPI application: ``create_app(settings)``; ``coldseam serve`` runs it."""

from __future__ import annotations

import logging
from collections.abc import AsyncIterator
from contextlib import asynccontextmanager

from fastapi import APIRouter, Depends, FastAPI, Request
from fastapi.concurrency import run_in_threadpool
from fastapi.middleware.cors import CORSMiddleware
from fastapi.middleware.gzip import GZipMiddleware

from coldseam import ENGINE_VERSION, __version__
from coldseam.api import (
    batch_report,
    batches,
    catalogue,
    docs,
    errors,
    evaluations,
    fallback,
    frontend,
    imports,
    openapi,
    pictures,
)
from coldseam.api.auth import load_keys
from coldseam.api.batch_runner import BatchRunner
from coldseam.api.deps import SettingsDep, get_owner
from coldseam.api.jobs import Evaluations
from coldseam.api.middleware import ServiceMiddleware
from coldseam.api.models import Health
from coldseam.api.pool import WorkerPool
from coldseam.api.store import Store
from coldseam.settings import Settings, get_settings

log = logging.getLogger(__name__)

DESCRIPTION = """Thermal-bridge evaluation of 2D building-envelope sections: heat flows, L2D, ψ,
θsi,min, fRsi and a condensation/mould verdict with a mesh-convergence certificate.

Figures must be checked by a competent person; local codes and licensed practice govern."""


@asynccontextmanager
async def lifespan(app: FastAPI) -> AsyncIterator[None]:
    settings: Settings = app.dependency_overrides.get(get_settings, get_settings)()
    app.state.keys = load_keys(settings)
    store = Store(settings.database_path)
    if count := store.interrupt_unfinished("the server stopped before this evaluation "
                                           "finished; send it again"):
        log.warning("%d unfinished evaluations of an earlier run marked failed", count)
    pool = WorkerPool(settings.workers, settings.queue_size, settings.engine,
                      settings.evaluation_timeout, settings.worker_start_method,
                      settings.prestart_workers, settings.worker_memory_mb * 2**20)
    pool.start()
    app.state.evaluations = Evaluations(store, pool)
    app.state.batches = BatchRunner(app.state.evaluations, settings)
    if resumed := app.state.batches.start():
        log.warning("%d unfinished batch items of an earlier run sent again", resumed)
    log.info("serving with %d workers, data in %s, %s", settings.workers, settings.data_dir,
             "open access" if app.state.keys.open else "API keys required")
    try:
        yield
    finally:
        await run_in_threadpool(app.state.batches.stop)
        await run_in_threadpool(pool.shutdown)
        store.close()


def create_app(settings: Settings | None = None) -> FastAPI:
    """The application; with ``settings`` given, they replace ``get_settings()`` for it."""
    app = FastAPI(title="Coldseam", version=__version__, description=DESCRIPTION,
                  lifespan=lifespan, docs_url=None, redoc_url=None)
    if settings is not None:
        app.dependency_overrides[get_settings] = lambda: settings
    else:
        settings = get_settings()
    api = APIRouter(prefix="/api/v1", dependencies=[Depends(get_owner)])
    for module in (evaluations, pictures, imports, catalogue, batches, batch_report):
        api.include_router(module.router)
    app.include_router(api)
    fallback.install(app)
    app.add_api_route("/healthz", health, methods=["GET"], tags=["service"])
    errors.install(app)
    openapi.install(app)
    docs.install(app)
    _add_middleware(app, settings)
    frontend.mount(app, settings.frontend_dir)
    return app


def health(request: Request, settings: SettingsDep) -> Health:
    """The service is up (no key needed)."""
    return Health(status="ok", version=__version__, engine_version=ENGINE_VERSION,
                  workers=settings.workers, auth="open" if request.app.state.keys.open
                  else "keys")


def _add_middleware(app: FastAPI, settings: Settings) -> None:
    app.add_middleware(GZipMiddleware, minimum_size=4096)
    if settings.cors_origin_list:
        app.add_middleware(CORSMiddleware, allow_origins=settings.cors_origin_list,
                           allow_methods=["GET", "POST"],
                           allow_headers=["Authorization", "Content-Type"],
                           expose_headers=["Location", "Retry-After", "X-Request-ID"])
    app.add_middleware(ServiceMiddleware, max_body_bytes=settings.max_body_bytes)
