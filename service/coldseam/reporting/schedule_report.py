"""A printable, self-contained HTML report of a batch (a junction schedule): the table of
every junction with ψ, length, ψ·l, fRsi and verdict, Σ ψ·l, then each junction's picture
and verdict, and the caution. Pictures are embedded as data URIs (as in the evaluation
report); every user string is escaped."""

from __future__ import annotations

import base64
from typing import Any

from coldseam import CAUTION, ENGINE_VERSION
from coldseam.reporting.html_parts import (
    DASH,
    Html,
    as_dict,
    esc,
    join,
    number,
    section,
    table,
    tag,
)
from coldseam.reporting.report_results import verdict_badge
from coldseam.reporting.report_style import CSS

SCHEDULE_CSS = """
.junction { break-inside: avoid; margin: 4mm 0 6mm; }
.junction figure img { max-height: 110mm; }
tr.total td { font-weight: 700; border-top: 2px solid #1b1b1b; }
.failed { color: #7d1106; }
"""


def render_schedule_report(document: dict[str, Any],
                           pictures: dict[int, str] | None = None) -> str:
    """The report of ``document`` (``GET /api/v1/batches/{id}`` with all items);
    ``pictures``: SVG of the done items by position (items without one get none)."""
    pictures = pictures or {}
    name = str(document.get("name") or "Junction schedule")
    items = [as_dict(i) for i in document.get("items") or []]
    body = join([
        _header(name, document),
        tag("div", Html(tag("strong", "Caution. ") + esc(CAUTION)), class_="caution"),
        section("Schedule", _schedule_table(items, document), id_="schedule"),
        section("Junctions", *[_junction(item, pictures.get(item.get("position")))
                               for item in items], id_="junctions"),
        tag("footer", join([tag("p", f"Engine {ENGINE_VERSION} · batch "
                                     f"{document.get('id') or DASH}"),
                            tag("p", CAUTION, class_="caution-small")])),
    ])
    return ("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
            f"<title>{esc('Coldseam schedule: ' + name)}</title>"
            f"<style>{CSS}{SCHEDULE_CSS}</style></head><body><main>{body}</main></body>"
            "</html>\n")


def _header(name: str, document: dict[str, Any]) -> Html:
    counts = as_dict(document.get("counts"))
    meta = [f"Batch {document.get('id') or DASH}", f"{document.get('total', 0)} items",
            f"{counts.get('done', 0)} done, {counts.get('failed', 0)} failed",
            f"status {document.get('status') or DASH}"]
    return tag("header", join([tag("p", "Coldseam junction schedule", class_="kicker"),
                               tag("h1", name), tag("p", " · ".join(meta), class_="meta")]))


def _schedule_table(items: list[dict], document: dict[str, Any]) -> Html:
    rows = [[item.get("id"), item.get("template") or "request",
             number(item.get("psi"), 4), number(item.get("length"), 2),
             number(item.get("psi_l"), 3), number(item.get("fRsi"), 3),
             _verdict(item)] for item in items]
    headers = ["Junction", "Template", "ψ W/(m·K)", "l m", "ψ·l W/K", "fRsi", "Verdict"]
    total = document.get("sum_psi_l")
    note = ""
    if document.get("sum_psi_l_items", 0) < document.get("items_with_length", 0):
        note = (f" (over {document.get('sum_psi_l_items')} of the "
                f"{document.get('items_with_length')} junctions with a length: the others "
                "have not finished or failed)")
    return join([table(headers, rows),
                 tag("p", Html(tag("strong", f"Σ ψ·l = {number(total, 2, 'W/K')}") +
                               esc(note))),
                 tag("p", "Σ ψ·l is the junctions' part of the transmission heat transfer "
                          "coefficient H_T = Σ U·A + Σ ψ·l + Σ χ (ISO 13789, ISO 14683).",
                     class_="note")])


def _verdict(item: dict) -> Any:
    if item.get("status") == "failed":
        return Html(tag("span", "failed", class_="failed"))
    if item.get("verdict"):
        return verdict_badge({"verdict": item["verdict"]})
    return item.get("status") or DASH


def _junction(item: dict, svg: str | None) -> Html:
    title = f"{item.get('id')} · {item.get('template') or 'request'}"
    figures = [f"ψ {number(item.get('psi'), 4, 'W/(m·K)')}",
               f"fRsi {number(item.get('fRsi'), 3)}",
               f"θsi,min {number(item.get('min_temperature'), 2, '°C')}"]
    parts = [tag("h3", title), tag("p", Html(esc(" · ".join(figures)) + " " +
                                             esc(_verdict(item))))]
    error = as_dict(item.get("error"))
    if error:
        parts.append(tag("p", error.get("detail") or error.get("message"), class_="failed"))
    if svg and "<svg" in svg:
        data = base64.b64encode(svg.encode("utf-8")).decode("ascii")
        parts.append(tag("figure", Html(f'<img src="data:image/svg+xml;base64,{data}" '
                                        f'alt="{esc("Temperature field of " + str(item.get("id")))}">')))
    elif item.get("status") == "done":
        parts.append(tag("p", "Picture left out of this report (see the evaluation's own "
                              f"report, evaluation {item.get('evaluation_id')}).",
                         class_="note"))
    return tag("div", join(parts), class_="junction")
