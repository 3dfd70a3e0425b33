"""``coldseam batch --url``: send a batch to a Coldseam server, follow it, fetch its results
(standard library only: the command needs no HTTP client package)."""

from __future__ import annotations

import json
import os
import time
import urllib.error
import urllib.request
from typing import Any

POLL = 0.5  # s between two looks at the batch
PAGE = 1000  # items per GET


def run_remote(url: str, document: dict[str, Any], extension: str,
               key: str | None) -> tuple[dict[str, Any], bytes]:
    """The finished batch and its results file (``extension`` .csv or .xlsx)."""
    from coldseam.batch_cli import Progress

    base = url.rstrip("/")
    headers = {"Content-Type": "application/json"}
    key = key or os.environ.get("COLDSEAM_API_KEY")
    if key:
        headers["Authorization"] = f"Bearer {key}"
    accepted = json.loads(_call(f"{base}/api/v1/batches", headers,
                                json.dumps(document).encode()))
    batch = f"{base}/api/v1/batches/{accepted['id']}"
    progress = Progress(accepted["items"])
    while True:
        current = _all_items(batch, headers)
        progress.show(current)
        if current["status"] in ("done", "failed"):
            break
        time.sleep(POLL)
    return current, _call(f"{batch}/results{extension}", headers)


def _all_items(batch: str, headers: dict[str, str]) -> dict[str, Any]:
    current = json.loads(_call(f"{batch}?limit={PAGE}&offset=0", headers))
    while len(current["items"]) < current["total"]:
        more = json.loads(_call(f"{batch}?limit={PAGE}&offset={len(current['items'])}",
                                headers))
        if not more["items"]:
            break
        current["items"] += more["items"]
    return current


def _call(url: str, headers: dict[str, str], body: bytes | None = None) -> bytes:
    request = urllib.request.Request(url, data=body, headers=headers,
                                     method="POST" if body is not None else "GET")
    try:
        with urllib.request.urlopen(request, timeout=120) as answer:
            return answer.read()
    except urllib.error.HTTPError as exc:
        raise ValueError(f"{url}: {exc.code}: {_detail(exc)}") from None
    except urllib.error.URLError as exc:
        raise ValueError(f"{url}: {exc.reason}") from None


def _detail(exc: urllib.error.HTTPError) -> str:
    try:
        return json.loads(exc.read()).get("detail") or exc.reason
    except (ValueError, AttributeError):
        return str(exc.reason)
