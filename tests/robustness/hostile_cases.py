"""Hostile requests, generated: every mutation kind applied to every body kind at places a
seeded random choice picks. Each case is (name, method, path, headers, content or form).

Bodies: a full evaluation request, one with a cavity material and one with a dynamics block
(model-v1 additions), template parameters, a DXF layer map, and a batch (``POST
/api/v1/batches``). Endpoints or fields a build does not have yet answer 404/422; the bar is
the same for all: never a 5xx.
"""

from __future__ import annotations

import copy
import gzip
import json
import random
import zlib
from collections.abc import Iterator
from dataclasses import dataclass, field
from typing import Any
from urllib.parse import quote

from robust_support import wall_request

SEED = 20261204
NESTING = (33, 1_000, 100_000)
EDGE_NUMBERS = ("1e308", "-1e308", "1.7976931348623157e308", "1e400", "-0", "-0.0", "5e-324",
                "2.2250738585072014e-308", "1" * 5000, "-" + "9" * 400, "0." + "0" * 300 + "1",
                "NaN", "Infinity", "-Infinity", "1e-400")
STRINGS = ("\\u0000", "\\ud800", "\\udfff\\ud800", "\u202eevil", "\ufeffbom", "\U0001F9F1",
           "x" * 25_000, "", " ", "../../etc/passwd", "%00", "<script>", "é" * 300)
SWAPS = ("null", "true", "\"text\"", "[]", "{}", "[[]]", "0", "-1")


@dataclass
class Case:
    name: str
    path: str
    content: bytes | None = None
    headers: dict[str, str] = field(default_factory=lambda: {"content-type": "application/json"})
    form: dict[str, str] | None = None  # the layer map form (the body then goes as `layer_map`)
    method: str = "POST"


def _cavity_request() -> dict[str, Any]:
    request = wall_request()
    request["section"]["materials"].append({"id": "air", "cavity": {
        "ventilation": "unventilated", "emissivity": [0.9, 0.05]}})
    request["section"]["regions"].append({"material": "air", "polygon": [
        [20, 100], [60, 100], [60, 900], [20, 900]]})
    return request


def _dynamics_request() -> dict[str, Any]:
    request = wall_request()
    request["dynamics"] = {"periodic": {"period_hours": 24}, "time_constants": {"count": 3},
                           "transient": {"time_step_hours": 1, "initial": "steady",
                                         "temperatures": {"outside": [-5, -6, -7, -4, 0]}}}
    return request


LAYER_MAP = {"PART": {"material": "part", "conductivity": 1.0},
             "IN": {"environment": "in", "temperature": 20, "side": "interior",
                    "surface_resistance": 0.13}}
BODIES: dict[str, tuple[str, Any]] = {
    "evaluation": ("/api/v1/evaluations", wall_request()),
    "cavity": ("/api/v1/evaluations", _cavity_request()),
    "dynamics": ("/api/v1/evaluations?wait=false", _dynamics_request()),
    "template": ("/api/v1/templates/wall_corner/section",
                 {"parameters": {"insulation_thickness": 120}}),
    "template-evaluation": ("/api/v1/templates/wall_corner/evaluations?wait=false",
                            {"parameters": {"insulation_thickness": 140}}),
    "layer-map": ("/api/v1/imports/dxf", LAYER_MAP),
    "batch": ("/api/v1/batches", {"name": "Eastmere schedule", "items": [
        {"id": "J1", "template": "wall_corner", "parameters": {"insulation_thickness": 100},
         "length": 12.5},
        {"id": "J2", "request": wall_request(), "length": 3}]}),
}
DXF = b"0\nSECTION\n2\nENTITIES\n0\nENDSEC\n0\nEOF\n"


def _places(value: Any, path: tuple = ()) -> Iterator[tuple[tuple, Any]]:
    """Every (path, value) of a JSON tree."""
    yield path, value
    children = value.items() if isinstance(value, dict) else enumerate(value) \
        if isinstance(value, list) else ()
    for key, item in children:
        yield from _places(item, (*path, key))


MARK = "\u2603MARK\u2603"


def _with_raw(body: Any, place: tuple, raw: str) -> str:
    """``body`` as JSON text with the value at ``place`` replaced by the literal ``raw``."""
    marked = copy.deepcopy(body)
    if not place:
        return raw
    target = marked
    for key in place[:-1]:
        target = target[key]
    target[place[-1]] = MARK
    return json.dumps(marked).replace(json.dumps(MARK), raw, 1)


def _pick(rng: random.Random, body: Any, want) -> tuple:
    places = [p for p, v in _places(body) if want(v)]
    return rng.choice(places) if places else ()


def _text_mutations(rng: random.Random, body: Any) -> Iterator[tuple[str, str]]:
    number = lambda v: isinstance(v, int | float) and not isinstance(v, bool)  # noqa: E731
    for depth in NESTING:
        opener = rng.choice(["[", '{"a":'])
        closer = "]" if opener == "[" else "}"
        yield f"nested {depth} {opener}", _with_raw(body, _pick(rng, body, lambda v: True),
                                                    opener * depth + "1" + closer * depth)
    for literal in EDGE_NUMBERS:
        yield f"number {literal[:14]}", _with_raw(body, _pick(rng, body, number), literal)
    for text in STRINGS:
        raw = '"' + text + '"' if "\\u" in text else json.dumps(text, ensure_ascii=False)
        where = _pick(rng, body, lambda v: isinstance(v, str))
        yield f"string {text[:10]!r}", _with_raw(body, where, raw)
    for swap in SWAPS:
        yield f"swap {swap}", _with_raw(body, _pick(rng, body, lambda v: True), swap)
    where = _pick(rng, body, lambda v: isinstance(v, dict) and v)
    obj = body
    for key in where:
        obj = obj[key]
    inner = json.dumps(obj)
    yield "duplicate key", _with_raw(body, where, inner[:-1] + ", " + inner[1:])
    serial = json.dumps(body)
    for cut in sorted(rng.sample(range(1, len(serial)), 3)):
        yield f"truncated at {cut}", serial[:cut]
    yield "many keys", json.dumps({f"k{i}": i for i in range(5000)})
    yield "empty", ""
    yield "whitespace", " \n\t "


def _sections(rng: random.Random) -> Iterator[tuple[str, Any]]:
    """Evaluation requests with odd geometry or counts."""
    def varied(change) -> dict:
        request = wall_request()
        change(request["section"])
        return request

    def regions(polygon):
        return lambda s: s["regions"].append({"material": "masonry", "polygon": polygon})

    yield "sliver", varied(regions([[300, 0], [300 + 1e-7, 0], [300 + 1e-7, 1000], [300, 1000]]))
    yield "collinear", varied(regions([[0, 0], [150, 0], [300, 0]]))
    yield "bow tie", varied(regions([[0, 0], [300, 1000], [300, 0], [0, 1000]]))
    yield "near degenerate", varied(regions([[0, 0], [300, 1e-9], [150, 2e-9]]))
    yield "zigzag path", varied(lambda s: s["boundaries"][0].update(
        path=[[0, y] for y in [0, 1000] * 300]))
    yield "far away", varied(lambda s: s["regions"].append(
        {"material": "masonry", "polygon": [[1e9, 1e9], [1e9 - 1, 1e9], [1e9, 1e9 - 1]]}))
    yield "many probes", varied(lambda s: s.update(probes=[
        {"id": f"p{k}", "point": [rng.uniform(0, 300), rng.uniform(0, 1000)]}
        for k in range(2000)]))
    yield "many environments", varied(lambda s: s["environments"].extend(
        {"id": f"e{k}", "temperature": 0, "side": "exterior"} for k in range(2000)))
    yield "many symmetry lines", varied(lambda s: s.update(
        symmetry_lines=[[[0, 0], [300, 0]]] * 1000))
    yield "unicode ids", varied(lambda s: [m.update(id="\u0645\u0627\u062f\u0629" + m["id"])
                                           for m in s["materials"]] and
                               [r.update(material="\u0645\u0627\u062f\u0629" + r["material"])
                                for r in s["regions"]])


def cases() -> list[Case]:
    """The whole sweep, the same on every run (seeded)."""
    rng = random.Random(SEED)
    out: list[Case] = []
    for kind, (path, body) in BODIES.items():
        for name, text in _text_mutations(rng, body):
            out.append(_case(kind, name, path, text.encode("utf-8", "surrogatepass")))
        serial = json.dumps(body)
        out += [
            _case(kind, "utf-16", path, serial.encode("utf-16")),
            _case(kind, "latin-1", path, serial.replace("mm", "m\xb5").encode("latin-1")),
            _case(kind, "bom", path, b"\xef\xbb\xbf" + serial.encode()),
            _case(kind, "gzip", path, gzip.compress(serial.encode()), encoding="gzip"),
            _case(kind, "deflate", path, zlib.compress(serial.encode()), encoding="deflate"),
            _case(kind, "text/plain", path, serial.encode(), content_type="text/plain"),
            _case(kind, "form", path, b"a=1&b=2",
                  content_type="application/x-www-form-urlencoded"),
        ]
    for name, request in _sections(rng):
        out.append(_case("section", name, "/api/v1/evaluations", json.dumps(request).encode()))
    value = "/api/v1/templates/wall_corner/value"
    for literal in (*EDGE_NUMBERS, *STRINGS[:6], "%ff%fe", "1,2"):
        out.append(Case(f"value query: {literal[:14]!r}",
                        f"{value}?insulation_thickness={quote(literal)}", method="GET"))
    out.append(Case("value query: repeated", f"{value}?quantity=psi&quantity=fRsi", method="GET"))
    out.append(Case("value query: many", value + "?" + "&".join(f"p{k}=1" for k in range(500)),
                    method="GET"))
    return out


def _case(kind: str, name: str, path: str, content: bytes, encoding: str | None = None,
          content_type: str = "application/json") -> Case:
    headers = {"content-type": content_type}
    if encoding:
        headers["content-encoding"] = encoding
    if path.endswith("/imports/dxf"):
        return Case(f"{kind}: {name}", path, None, {}, {
            "layer_map": content.decode("utf-8", "replace"), "unit": "mm"})
    return Case(f"{kind}: {name}", path, content, headers)


def send(client: Any, case: Case) -> int:
    """Send one case with an httpx-like client; the status."""
    if case.method == "GET":
        response = client.get(case.path)
    elif case.form is not None:
        response = client.post(case.path, files={"file": ("x.dxf", DXF)}, data=case.form)
    else:
        response = client.post(case.path, content=case.content, headers=case.headers)
    return response.status_code
