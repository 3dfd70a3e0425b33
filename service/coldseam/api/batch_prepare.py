"""From a batch's items to stored item rows: each template is built and each request parsed
and size-checked exactly as the single-evaluation endpoints do, so an item's evaluation id is
the id that the same evaluation sent alone gets. An item that cannot be built or parsed fails
on its own, with its error; it never stops the others."""

from __future__ import annotations

import json
from typing import Any

from coldseam.api.batch_store import NewItem
from coldseam.api.limits import check_limits
from coldseam.batches.spec import ItemSpec
from coldseam.errors import ColdseamError
from coldseam.schema.evaluation import EvaluationRequest, parse_request, request_digest
from coldseam.settings import Settings


def prepare(item: ItemSpec, settings: Settings) -> tuple[NewItem, EvaluationRequest | None]:
    """The stored row of ``item`` (its request text and evaluation id, or its error) and its
    parsed request (None when it failed)."""
    try:
        text = request_text(item)
        parsed = checked(text, settings)
    except ColdseamError as exc:
        error = {"kind": type(exc).__name__, "message": exc.message,
                 "field": _within(item, exc.field)}
        return NewItem(item.item_id, item.template, item.parameters, item.length, None, None,
                       error), None
    return NewItem(item.item_id, item.template, item.parameters, item.length, text,
                   request_digest(parsed)), parsed


def request_text(item: ItemSpec) -> str:
    """The request an item evaluates, as the single endpoints keep it."""
    if item.request is not None:
        return json.dumps(item.request)
    from coldseam.templates import build

    built = _plain(build(item.template, item.parameters))
    return json.dumps(built if "section" in built else {"section": built})


def checked(text: str, settings: Settings) -> EvaluationRequest:
    """Parse and size-check a stored request text (again after a restart: same id)."""
    parsed = parse_request(json.loads(text))
    check_limits(parsed, settings)
    return parsed


def _within(item: ItemSpec, field: str) -> str:
    """A field of a template's parameters or of a request, as a pointer into the batch."""
    if item.request is not None:
        return f"{item.pointer}/request{field}"
    return f"{item.pointer}{field}"


def _plain(built: Any) -> Any:
    if hasattr(built, "model_dump"):
        return built.model_dump(mode="json")
    return built
