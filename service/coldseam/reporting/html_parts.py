"""Small HTML building blocks for the report: every value is escaped unless it is ``Html``.

>>> str(table(["Material", "λ"], [["<b>eps</b>", number(0.035, 3)]]))
'<table><thead><tr><th>Material</th><th>λ</th></tr></thead><tbody><tr><td>&lt;b&gt;eps&lt;/b&gt;</td><td class="num">0.035</td></tr></tbody></table>'
"""

from __future__ import annotations

import html
import math
from collections.abc import Iterable, Sequence
from typing import Any

DASH = "–"


class Html(str):
    """Markup built here from escaped parts: inserted as it is."""


class Num(str):
    """A formatted number (plain text, right-aligned in tables)."""


def esc(value: Any) -> Html:
    """Any value as escaped text; Html passes through."""
    if isinstance(value, Html):
        return value
    return Html(html.escape("" if value is None else str(value), quote=True))


def is_number(value: Any) -> bool:
    return isinstance(value, int | float) and not isinstance(value, bool) and math.isfinite(value)


def number(value: Any, digits: int = 3, unit: str = "") -> str:
    """A finite number with fixed decimals (and unit), a dash for a missing one, and any
    other value as text.

    >>> number(0.0612345, 3, "W/(m·K)"), number(None), number("n/a")
    ('0.061 W/(m·K)', '–', 'n/a')
    """
    if value is None:
        return DASH
    if not is_number(value):
        return str(value)
    text = f"{value:.{digits}f}".replace("-", "−")
    return Num(f"{text} {unit}" if unit else text)


def percent(value: Any, digits: int = 3) -> str:
    return number(value * 100, digits, "%") if is_number(value) else number(value)


def tag(name: str, body: Any = "", **attrs: Any) -> Html:
    attributes = "".join(f' {key.rstrip("_").replace("_", "-")}="{esc(v)}"'
                         for key, v in attrs.items() if v is not None)
    return Html(f"<{name}{attributes}>{esc(body)}</{name}>")


def join(parts: Iterable[Any], sep: str = "") -> Html:
    return Html(sep.join(esc(p) for p in parts))


def table(headers: Sequence[Any], rows: Iterable[Sequence[Any]], caption: Any = None) -> Html:
    head = tag("thead", tag("tr", join(tag("th", h) for h in headers)))
    body = tag("tbody", join(tag("tr", join(_cell(c) for c in row)) for row in rows))
    cap = tag("caption", caption) if caption is not None else Html("")
    return Html(f"<table>{cap}{head}{body}</table>")


def _cell(value: Any) -> Html:
    return tag("td", value, class_="num" if isinstance(value, Num) else None)


def definitions(items: Iterable[tuple[Any, Any]]) -> Html:
    """A two-column list of (term, value) with missing values left out."""
    rows = [(term, value) for term, value in items if value not in (None, DASH, "")]
    return tag("dl", join(Html(tag("dt", t) + tag("dd", v)) for t, v in rows)) if rows else Html("")


def section(title: str, *parts: Any, id_: str | None = None) -> Html:
    body = join(p for p in parts if p)
    return tag("section", Html(tag("h2", title) + body), id_=id_) if body else Html("")


def bullet_list(items: Iterable[Any]) -> Html:
    entries = [tag("li", item) for item in items]
    return tag("ul", join(entries)) if entries else Html("")


def point(at: Any, unit: str) -> str:
    """A result location (metres) in the section unit: '(368, 1987) mm'."""
    if not (isinstance(at, list | tuple) and len(at) == 2 and all(is_number(v) for v in at)):
        return DASH
    if unit == "mm":
        return f"({_short(at[0] * 1000, 1)}, {_short(at[1] * 1000, 1)}) mm"
    return f"({_short(at[0], 4)}, {_short(at[1], 4)}) m"


def _short(value: float, digits: int) -> str:
    text = f"{value:.{digits}f}".rstrip("0").rstrip(".")
    return "0" if text in ("", "-0") else text.replace("-", "−")


def as_dict(value: Any) -> dict:
    return value if isinstance(value, dict) else {}


def as_list(value: Any) -> list:
    return value if isinstance(value, list) else []
