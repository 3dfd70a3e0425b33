"""The interactive API reference at ``/docs``, served entirely by this server.

Swagger UI's script and style come from the ``fastapi-offline`` package (which ships Swagger UI
5, able to read the OpenAPI 3.1 document FastAPI writes); the script that starts it is our own
file (``static/swagger-init.js``), so the page needs no outside host and no inline script."""

from __future__ import annotations

import html
from importlib import resources
from pathlib import Path

from fastapi import FastAPI, HTTPException, Request
from fastapi.responses import FileResponse, HTMLResponse

DOCS_URL = "/docs"
ASSETS_URL = "/docs/assets"
_SWAGGER = Path(str(resources.files("fastapi_offline"))) / "static"
_OURS = Path(__file__).parent / "static"
#: The only files served under ASSETS_URL: name → (file, media type).
ASSETS: dict[str, tuple[Path, str]] = {
    "swagger-ui-bundle.js": (_SWAGGER / "swagger-ui-bundle.js", "text/javascript"),
    "swagger-ui.css": (_SWAGGER / "swagger-ui.css", "text/css"),
    "favicon.png": (_SWAGGER / "favicon.png", "image/png"),
    "swagger-init.js": (_OURS / "swagger-init.js", "text/javascript"),
}
PAGE = """<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1.0">
<title>{title} – API reference</title>
<link rel="stylesheet" href="{assets}/swagger-ui.css">
<link rel="icon" href="{assets}/favicon.png">
</head>
<body>
<div id="swagger-ui" data-openapi-url="{openapi}"></div>
<script src="{assets}/swagger-ui-bundle.js"></script>
<script src="{assets}/swagger-init.js"></script>
</body>
</html>
"""


def install(app: FastAPI) -> None:
    """Add ``/docs`` and its assets to ``app`` (made with ``docs_url=None``)."""

    def docs_page(request: Request) -> HTMLResponse:
        root = request.scope.get("root_path", "")
        return HTMLResponse(PAGE.format(title=html.escape(app.title),
                                        assets=html.escape(root + ASSETS_URL),
                                        openapi=html.escape(root + (app.openapi_url or ""))))

    def docs_asset(name: str) -> FileResponse:
        if name not in ASSETS:
            raise HTTPException(404, f"no file {name} of the API reference")
        path, media_type = ASSETS[name]
        return FileResponse(path, media_type=media_type,
                            headers={"Cache-Control": "public, max-age=3600"})

    app.add_api_route(DOCS_URL, docs_page, methods=["GET"], include_in_schema=False)
    app.add_api_route(ASSETS_URL + "/{name}", docs_asset, methods=["GET"],
                      include_in_schema=False)
