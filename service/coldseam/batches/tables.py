"""The results of a batch as one table: a header row with units, one row per item, the sum of
ψ·l and the caution; written as CSV or as an XLSX spreadsheet (openpyxl). Both files hold the
same rows, cell for cell."""

from __future__ import annotations

import csv
import io
from typing import Any

from coldseam import CAUTION

#: (header with its unit, item field) of the fixed columns, in order.
COLUMNS = (
    ("id", "id"),
    ("template", "template"),
    ("status", "status"),
    ("length m", "length"),
    ("ψ W/(m·K)", "psi"),
    ("ψ·l W/K", "psi_l"),
    ("fRsi", "fRsi"),
    ("θsi,min °C", "min_temperature"),
    ("L2D W/(m·K)", "L2D"),
    ("verdict", "verdict"),
    ("evaluation_id", "evaluation_id"),
    ("error", "error"),
)
SUM_LABEL = "Σ ψ·l W/K"

Cell = str | float | int | None


def parameter_units() -> dict[str, str]:
    """The unit of each template parameter name (the first template that has it)."""
    from coldseam.templates import list_templates

    units: dict[str, str] = {}
    for template in list_templates():
        for parameter in template.parameters:
            units.setdefault(parameter.name, parameter.unit)
    return units


def result_rows(document: dict[str, Any]) -> list[list[Cell]]:
    """The rows of a batch document (``GET /api/v1/batches/{id}`` with all its items): header,
    items, the Σ ψ·l line and the caution line."""
    items = document["items"]
    names = list(dict.fromkeys(name for item in items for name in item.get("parameters") or {}))
    units = parameter_units()
    header: list[Cell] = [title for title, _ in COLUMNS]
    header += [f"{name} {units[name]}".strip() if units.get(name) and " or " not in
               units[name] else name for name in names]
    rows = [header]
    for item in items:
        row: list[Cell] = [_cell(item, key) for _, key in COLUMNS]
        parameters = item.get("parameters") or {}
        row += [parameters.get(name) for name in names]
        rows.append(row)
    total: list[Cell] = [None] * len(header)
    total[0], total[5] = SUM_LABEL, document.get("sum_psi_l")
    rows.append(total)
    rows.append([CAUTION] + [None] * (len(header) - 1))
    return rows


def _cell(item: dict[str, Any], key: str) -> Cell:
    value = item.get(key)
    if key == "error" and isinstance(value, dict):
        return value.get("detail") or value.get("message")
    return value


#: Numbers in both files: 16 significant digits, what the XLSX writer keeps (a spreadsheet
#: cell holds a double, but the file stores it as text of 16 digits).
NUMBER_FORMAT = "%.16g"


def to_csv(rows: list[list[Cell]]) -> str:
    """CSV text; numbers as the XLSX file holds them (NUMBER_FORMAT)."""
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\n")
    for row in rows:
        writer.writerow(["" if cell is None else NUMBER_FORMAT % cell
                         if isinstance(cell, float) else cell for cell in row])
    return out.getvalue()


def to_xlsx(rows: list[list[Cell]], title: str = "Schedule") -> bytes:
    """An XLSX workbook of one sheet: bold header with units, frozen header row."""
    from openpyxl import Workbook
    from openpyxl.styles import Font

    workbook = Workbook()
    sheet = workbook.active
    sheet.title = _sheet_title(title)
    for row in rows:
        sheet.append(row)
    for cell in sheet[1]:
        cell.font = Font(bold=True)
    sheet.cell(row=len(rows) - 1, column=1).font = Font(bold=True)
    sheet.cell(row=len(rows), column=1).font = Font(italic=True)
    sheet.freeze_panes = "A2"
    for column, width in zip("ABCDEFGHIJ", (28, 14, 8, 9, 12, 10, 8, 11, 12, 9), strict=True):
        sheet.column_dimensions[column].width = width
    out = io.BytesIO()
    workbook.save(out)
    return out.getvalue()


def _sheet_title(title: str) -> str:
    cleaned = "".join(c for c in title if c not in "[]:*?/\\").strip()
    return (cleaned or "Schedule")[:31]
