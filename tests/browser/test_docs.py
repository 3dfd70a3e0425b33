"""The API reference at /docs in Debian chromium with every host but the server blocked: it
must render the operations from this server's own files, under the page's strict policy."""

from __future__ import annotations

from urllib.parse import urlsplit

import pytest
from browser_support import shot

pytestmark = pytest.mark.browser


def test_docs_render_offline(server, page_factory):
    page = page_factory(1280)
    own = urlsplit(server).netloc
    blocked: list[str] = []

    def only_this_server(route) -> None:
        if urlsplit(route.request.url).netloc == own:
            route.continue_()
        else:
            blocked.append(route.request.url)
            route.abort()

    page.route("**/*", only_this_server)
    page.goto(f"{server}/docs")
    operations = page.locator(".opblock-summary-path")
    operations.first.wait_for(timeout=30_000)
    paths = {operations.nth(i).inner_text().replace("\u200b", "")
             for i in range(operations.count())}
    assert "/api/v1/evaluations" in paths and "/api/v1/templates/{template_id}/value" in paths
    page.locator(".opblock-summary").first.click()
    page.locator(".opblock-body").first.wait_for()
    shot(page, "docs-offline-1280")
    assert blocked == []
    assert page.problems == []  # no script error and no content-security-policy violation
