"""A junction schedule as CSV: one line per junction, columns ``id,template,length`` and one
column per template parameter (blank: the template's default).

```
id,template,length,insulation_thickness,connection
J2 slab edge,floor_slab,64,160,
J4 balcony,balcony,12,,thermal_break
```

It reads into the batch document of ``coldseam.batches.spec`` (item n is line n + 2).
"""

from __future__ import annotations

import csv
import io
from typing import Any

from coldseam.errors import InvalidSection

REQUIRED = ("id", "template")
MAX_LINE = 100_000  # characters in one cell: a schedule, not a data dump


def parse_schedule(text: str, name: str | None = None) -> dict[str, Any]:
    """The batch document of a CSV schedule."""
    text = text.lstrip("\ufeff")  # spreadsheet programs write a byte-order mark
    try:
        rows = list(csv.reader(io.StringIO(text)))
    except csv.Error as exc:
        raise InvalidSection(f"the schedule is not valid CSV: {exc}", "/schedule") from None
    rows = [row for row in rows if any(cell.strip() for cell in row)]
    if not rows:
        raise InvalidSection("the schedule is empty: it needs a header line "
                             "'id,template,length,<parameter>...' and one line per junction",
                             "/schedule")
    header = [cell.strip() for cell in rows[0]]
    _check_header(header)
    items = [_item(header, row, line) for line, row in enumerate(rows[1:], start=2)]
    if not items:
        raise InvalidSection("the schedule has a header but no junctions", "/schedule")
    document: dict[str, Any] = {"items": items}
    if name:
        document["name"] = name
    return document


def _check_header(header: list[str]) -> None:
    for column in REQUIRED:
        if column not in header:
            raise InvalidSection(f"the schedule's header line has no '{column}' column (it "
                                 "starts id,template,length,<parameter>...)",
                                 f"/schedule/columns/{column}")
    seen = set()
    for column in header:
        if not column:
            raise InvalidSection("the schedule's header line has an empty column name",
                                 "/schedule/columns")
        if column in seen:
            raise InvalidSection(f"the column '{column}' appears twice in the header line",
                                 f"/schedule/columns/{column}")
        seen.add(column)


def _item(header: list[str], row: list[str], line: int) -> dict[str, Any]:
    if len(row) > len(header):
        raise InvalidSection(f"line {line} has {len(row)} cells, the header {len(header)}",
                             f"/schedule/lines/{line}")
    cells = {column: cell.strip() for column, cell in zip(header, row, strict=False)}
    for column in REQUIRED:
        if not cells.get(column):
            raise InvalidSection(f"line {line} has no {column}", f"/schedule/lines/{line}/"
                                 f"{column}")
    item: dict[str, Any] = {"id": cells["id"], "template": cells["template"]}
    if cells.get("length"):
        item["length"] = _length(cells["length"], line)
    item["parameters"] = {column: value_of(cell) for column, cell in cells.items()
                          if column not in ("id", "template", "length") and cell}
    return item


def _length(text: str, line: int) -> float:
    try:
        return float(text)
    except ValueError:
        raise InvalidSection(f"line {line}: the length '{text}' is not a number (metres)",
                             f"/schedule/lines/{line}/length") from None


def value_of(text: str) -> int | float | str:
    """A cell as a number when it reads as one (integers kept as such), text otherwise."""
    try:
        return int(text)
    except ValueError:
        pass
    try:
        return float(text)
    except ValueError:
        return text
