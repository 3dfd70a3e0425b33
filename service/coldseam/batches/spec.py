"""The batch document (model-v1 additions §3) read into a flat list of items.

```json
{"name": "...", "items": [{"id": "J2", "template": "floor_slab",
                           "parameters": {"insulation_thickness": 160}, "length": 64},
                          {"id": "J9", "request": {...}, "length": 12.5}],
 "grid": {"template": "floor_slab", "parameters": {"insulation_thickness": [100, 160]}}}
```

A grid is the Cartesian product of its listed values (a single value is held fixed); its
items are named by the values that vary. Every problem is an ``InvalidSection`` (422) naming
its field, and too many items a ``LimitExceeded`` (413) counted before any grid is expanded.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass
from typing import Any

from coldseam.errors import InvalidSection, LimitExceeded

ITEM_FIELDS = {"id", "template", "parameters", "request", "length"}
GRID_FIELDS = {"template", "parameters", "length", "id"}
BATCH_FIELDS = {"name", "items", "grid"}


@dataclass(frozen=True)
class ItemSpec:
    """One item of a batch: a template with parameters, or a full request; ``pointer`` is
    where it came from in the document (for error messages)."""

    item_id: str
    pointer: str
    template: str | None = None
    parameters: dict[str, Any] | None = None
    request: Any = None
    length: float | None = None


@dataclass(frozen=True)
class BatchSpec:
    name: str | None
    items: list[ItemSpec]
    grid: dict[str, Any] | None

    def summary(self) -> dict[str, Any]:
        """What is kept of the document beside its items: its name and grid."""
        return {"name": self.name, "grid": self.grid}


def parse_batch(data: Any, max_items: int) -> BatchSpec:
    """The items of a batch document; at most ``max_items`` of them (413 over it)."""
    if not isinstance(data, dict):
        raise InvalidSection("a batch must be a JSON object with 'items' and/or 'grid'", "")
    _known(data, BATCH_FIELDS, "")
    name = data.get("name")
    if name is not None and not isinstance(name, str):
        raise InvalidSection("the name must be text", "/name")
    raw_items = data.get("items", [])
    if not isinstance(raw_items, list):
        raise InvalidSection("items must be a list of items", "/items")
    grid = data.get("grid")
    if grid is None and not raw_items:
        raise InvalidSection("a batch needs at least one item in 'items' or a 'grid'", "/items")
    total = len(raw_items) + (grid_size(grid) if grid is not None else 0)
    if total > max_items:
        where = "/grid/parameters" if grid is not None else "/items"
        raise LimitExceeded(f"the batch has {total} items; this server takes at most "
                            f"{max_items} in one batch", where)
    items = [_item(raw, f"/items/{n}", n) for n, raw in enumerate(raw_items)]
    if grid is not None:
        items += expand_grid(grid)
    _unique_ids(items)
    return BatchSpec(name=name, items=items, grid=grid)


def _item(raw: Any, pointer: str, position: int) -> ItemSpec:
    if not isinstance(raw, dict):
        raise InvalidSection("an item must be an object with 'template' (and 'parameters') "
                             "or 'request'", pointer)
    _known(raw, ITEM_FIELDS, pointer)
    if ("template" in raw) == ("request" in raw):
        raise InvalidSection("an item needs exactly one of 'template' or 'request'", pointer)
    item_id = _item_id(raw.get("id", str(position + 1)), pointer + "/id")
    length = _length(raw.get("length"), pointer + "/length")
    if "request" in raw:
        if "parameters" in raw:
            raise InvalidSection("'parameters' belong to a template item, not to a full "
                                 "request", pointer + "/parameters")
        return ItemSpec(item_id, pointer, request=raw["request"], length=length)
    template = _template(raw["template"], pointer + "/template")
    parameters = raw.get("parameters", {})
    if not isinstance(parameters, dict):
        raise InvalidSection("parameters must be an object {name: value}",
                             pointer + "/parameters")
    return ItemSpec(item_id, pointer, template=template, parameters=parameters, length=length)


def grid_size(grid: Any) -> int:
    """How many items ``grid`` makes, counted without expanding it."""
    values = _grid_values(grid)
    return math.prod(len(v) for v in values.values())


def expand_grid(grid: dict[str, Any]) -> list[ItemSpec]:
    """The items of a grid, in the order of its values (last parameter fastest)."""
    values = _grid_values(grid)
    template = _template(grid.get("template"), "/grid/template")
    length = _length(grid.get("length"), "/grid/length")
    prefix = grid.get("id")
    if prefix is not None and not isinstance(prefix, str):
        raise InvalidSection("the grid's id (a prefix of its item names) must be text",
                             "/grid/id")
    varied = [name for name, choices in values.items() if len(choices) > 1]
    items = []
    for combination in itertools.product(*values.values()):
        parameters = dict(zip(values, combination, strict=True))
        label = ", ".join(f"{name}={_text(parameters[name])}" for name in varied) or "defaults"
        item_id = f"{prefix} {label}" if prefix else label
        items.append(ItemSpec(item_id, "/grid", template=template,
                              parameters=parameters, length=length))
    return items


def _grid_values(grid: Any) -> dict[str, list[Any]]:
    if not isinstance(grid, dict):
        raise InvalidSection("the grid must be an object with 'template' and 'parameters'",
                             "/grid")
    _known(grid, GRID_FIELDS, "/grid")
    parameters = grid.get("parameters")
    if not isinstance(parameters, dict) or not parameters:
        raise InvalidSection("the grid needs 'parameters': {name: [values ...]}",
                             "/grid/parameters")
    values = {}
    for name, given in parameters.items():
        listed = given if isinstance(given, list) else [given]
        if not listed:
            raise InvalidSection("a grid parameter needs at least one value",
                                 f"/grid/parameters/{_escape(name)}")
        values[name] = listed
    return values


def _known(data: dict[str, Any], fields: set[str], pointer: str) -> None:
    for key in data:
        if key not in fields:
            raise InvalidSection(f"'{key}' is not a field Coldseam knows here (fields: "
                                 f"{', '.join(sorted(fields))})", f"{pointer}/{_escape(key)}")


def _item_id(value: Any, pointer: str) -> str:
    if isinstance(value, bool) or not isinstance(value, str | int):
        raise InvalidSection("an item's id must be text", pointer)
    text = str(value).strip()
    if not text or len(text) > 200:
        raise InvalidSection("an item's id must be 1 to 200 characters", pointer)
    return text


def _template(value: Any, pointer: str) -> str:
    if not isinstance(value, str) or not value:
        raise InvalidSection("the template must be a template id (GET /api/v1/templates)",
                             pointer)
    return value


def _length(value: Any, pointer: str) -> float | None:
    """A junction length in metres, or None."""
    if value is None:
        return None
    if isinstance(value, bool) or not isinstance(value, int | float) or \
            not math.isfinite(value) or value < 0:
        raise InvalidSection("the length is the junction's length in the building in m: a "
                             "number ≥ 0", pointer)
    return float(value)


def _unique_ids(items: list[ItemSpec]) -> None:
    seen: dict[str, str] = {}
    for item in items:
        if item.item_id in seen:
            raise InvalidSection(f"the id '{item.item_id}' is already used by "
                                 f"{seen[item.item_id]}; every item needs its own id",
                                 item.pointer + "/id")
        seen[item.item_id] = item.pointer


def _text(value: Any) -> str:
    if isinstance(value, float) and value.is_integer():
        return str(int(value))
    return str(value)


def _escape(name: Any) -> str:
    return str(name).replace("~", "~0").replace("/", "~1")
