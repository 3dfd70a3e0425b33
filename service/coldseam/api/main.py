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
from coldseam.api.deps import get_owner, single_query_values
from coldseam.api.jobs import Evaluations
from coldseam.api.middleware import ServiceMiddleware
from coldseam.api.models import Health
from coldseam.api.pool import WorkerPool
from coldseam.api.reader import ReaderGate
from coldseam.api.stores import open_store, redact
from coldseam.settings import Settings, get_settings

log = logging.getLogger(__name__)

DESCRIPTION = """Thermal-bridge evaluation of 2D building-envelope sections: heat flows, L2D, ψ,
θsi,min, fRsi and a condensation/mould verdict with a mesh-convergence certificate.

Figures must be checked by a competent person; local codes and licensed practice govern."""


@asynccontextmanager
async def lifespan(app: FastAPI) -> AsyncIterator[None]:
    settings: Settings = app.dependency_overrides.get(get_settings, get_settings)()
    app.state.keys = load_keys(settings)
    app.state.workers = settings.workers
    store = await run_in_threadpool(open_store, settings)
    if count := store.interrupt_unfinished("the server stopped before this evaluation "
                                           "finished; send it again"):
        log.warning("%d unfinished evaluations of an earlier run marked failed", count)
    pool = make_pool(settings)
    await run_in_threadpool(pool.start)
    app.state.evaluations = Evaluations(store, pool, settings.database_wait)
    app.state.batches = BatchRunner(app.state.evaluations, settings)
    if resumed := app.state.batches.start():
        log.warning("%d unfinished batch items of an earlier run sent again", resumed)
    log.info("serving with %s, data in %s, %s",
             f"the cluster at {settings.cluster}" if settings.cluster
             else f"{settings.workers} workers",
             redact(settings.database_url) if settings.database_url else settings.data_dir,
             "open access" if app.state.keys.open else "API keys required")
    try:
        yield
    finally:
        await run_in_threadpool(app.state.batches.stop)
        await run_in_threadpool(pool.shutdown)
        app.state.evaluations.flush_unstored()
        store.close()


def make_pool(settings: Settings) -> WorkerPool:
    """The local worker pool, or the Dask cluster of ``settings.cluster``."""
    memory_limit = settings.worker_memory_mb * 2**20
    if settings.cluster:
        from coldseam.api.cluster import ClusterPool
        from coldseam.api.stores import instance_name

        return ClusterPool(settings.cluster, settings.engine, settings.evaluation_timeout,
                           settings.queue_size, instance_name(settings), memory_limit,
                           settings.worker_start_method, settings.prestart_workers)
    return WorkerPool(settings.workers, settings.queue_size, settings.engine,
                      settings.evaluation_timeout, settings.worker_start_method,
                      settings.prestart_workers, memory_limit)


def create_app(settings: Settings | None = None) -> FastAPI:
    """The application; with ``settings`` given, they replace ``get_settings()`` for it."""
    app = FastAPI(title="Coldseam", version=__version__, description=DESCRIPTION,
                  lifespan=lifespan, docs_url=None, redoc_url=None)
    if settings is not None:
        app.dependency_overrides[get_settings] = lambda: settings
    else:
        settings = get_settings()
    api = APIRouter(prefix="/api/v1", dependencies=[Depends(get_owner),
                                                          Depends(single_query_values)])
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


async def health(request: Request) -> Health:
    """The service is up (no key needed). Answered on the event loop itself, touching neither
    the store nor the thread pool, so that it answers at once however busy the server is."""
    return Health(status="ok", version=__version__, engine_version=ENGINE_VERSION,
                  workers=request.app.state.workers, auth="open" if request.app.state.keys.open
                  else "keys")


def _add_middleware(app: FastAPI, settings: Settings) -> None:
    app.add_middleware(ReaderGate, memory_mb=settings.worker_memory_mb)
    app.add_middleware(GZipMiddleware, minimum_size=4096)
    if settings.cors_origin_list:
        app.add_middleware(CORSMiddleware, allow_origins=settings.cors_origin_list,
                           allow_methods=["GET", "POST"],
                           allow_headers=["Authorization", "Content-Type"],
                           expose_headers=["Location", "Retry-After", "X-Request-ID"])
    app.add_middleware(ServiceMiddleware, max_body_bytes=settings.max_body_bytes,
                       body_timeout=settings.body_timeout)
