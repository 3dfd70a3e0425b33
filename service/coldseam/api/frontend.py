"""The static page at ``/``, from the frontend folder (paths cannot leave it)."""

from __future__ import annotations

import logging
from pathlib import Path

from fastapi import FastAPI
from fastapi.responses import JSONResponse
from fastapi.staticfiles import StaticFiles

log = logging.getLogger(__name__)


#: Parts of the frontend folder that are for developers, not for the browser.
PRIVATE = ("tests", "node_modules", "package.json", "package-lock.json")
#: Files of these kinds are notes for developers wherever they are (frontend/README.md).
PRIVATE_SUFFIXES = (".md",)


class PageFiles(StaticFiles):
    """StaticFiles that keeps the frontend's test files and package manifest private."""

    def get_path(self, scope) -> str:
        path = super().get_path(scope)
        first = Path(path).parts[0] if Path(path).parts else ""
        private = first in PRIVATE or path.lower().endswith(PRIVATE_SUFFIXES)
        return "\0missing" if private else path


def mount(app: FastAPI, directory: Path | None) -> None:
    """Serve ``directory`` at ``/`` (after every other route), or a pointer to the docs."""
    if directory is not None and directory.is_dir():
        # StaticFiles resolves every path and refuses any outside the directory.
        app.mount("/", PageFiles(directory=directory.resolve(), html=True), name="frontend")
        return
    if directory is not None:
        log.warning("frontend folder %s does not exist; serving the API only", directory)

    def index() -> JSONResponse:
        return JSONResponse({"service": "coldseam", "docs": "/docs", "api": "/api/v1"})

    app.add_api_route("/", index, methods=["GET"], include_in_schema=False)
