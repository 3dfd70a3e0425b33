"""The one JSON reader of every request body: limits on the JSON itself, checked while it is
parsed and before any model sees it, and no duplicate keys.

``load_json(text)`` answers plain Python data or raises a typed error naming the place (a JSON
pointer): ``LimitExceeded`` (HTTP 413) for nesting, strings, keys over the limits;
``InvalidSection`` (HTTP 422) for text that is not JSON, a number literal with too many digits,
a key given twice in one object, or a string that is not valid Unicode. No web framework here:
the API, the command line and the batch endpoint all call it.
"""

from __future__ import annotations

import json
from dataclasses import dataclass
from typing import Any

from coldseam.errors import InvalidSection, LimitExceeded


@dataclass(frozen=True)
class JsonLimits:
    """How much JSON one document may hold."""

    depth: int = 32  #: arrays and objects inside one another (a full request needs 7)
    string_chars: int = 20_000  #: characters of one string or key
    object_keys: int = 2_000  #: keys of one object
    total_keys: int = 200_000  #: keys of the whole document
    number_chars: int = 100  #: characters of one number literal (17 digits suffice)


DEFAULT_LIMITS = JsonLimits()


class _Duplicated(dict):
    """An object in which a key was given twice (found again, with its place, by the walk)."""

    duplicate: str = ""


def pointer(parts: list[Any]) -> str:
    """The JSON pointer (RFC 6901) of a path of keys and indices."""
    return "".join("/" + str(p).replace("~", "~0").replace("/", "~1") for p in parts)


def load_json(text: str | bytes, limits: JsonLimits = DEFAULT_LIMITS, prefix: str = "",
              what: str = "the body") -> Any:
    """Parse ``text`` under ``limits``; ``prefix`` is the pointer of the document itself
    (e.g. ``/layer_map``), ``what`` how messages name it."""
    if isinstance(text, bytes):
        try:
            text = text.decode("utf-8")
        except UnicodeDecodeError as exc:
            raise InvalidSection(f"{what} is not UTF-8 text (byte {exc.start})",
                                 prefix) from None
    number = _number_reader(limits, prefix, what)
    try:
        data = json.loads(text, object_pairs_hook=_object_reader(limits, prefix, what),
                          parse_int=number(int), parse_float=number(float))
    except json.JSONDecodeError as exc:
        raise InvalidSection(f"{what} is not valid JSON: {exc.msg} at line {exc.lineno} "
                             f"column {exc.colno}", prefix) from None
    except RecursionError:
        raise LimitExceeded(f"{what} nests arrays and objects deeper than this server reads "
                            f"(at most {limits.depth} levels)", prefix) from None
    check_tree(data, limits, prefix, what)
    return data


def _object_reader(limits: JsonLimits, prefix: str, what: str) -> Any:
    def read(pairs: list[tuple[str, Any]]) -> dict[str, Any]:
        if len(pairs) > limits.object_keys:
            raise LimitExceeded(f"an object in {what} has {len(pairs)} keys; this server "
                                f"takes at most {limits.object_keys} in one object", prefix)
        out = dict(pairs)
        if len(out) == len(pairs):
            return out
        seen: set[str] = set()
        marked = _Duplicated(out)
        marked.duplicate = next(k for k, _ in pairs if k in seen or seen.add(k))
        return marked

    return read


def _number_reader(limits: JsonLimits, prefix: str, what: str) -> Any:
    def reader(kind: type) -> Any:
        def read(literal: str) -> Any:
            if len(literal) > limits.number_chars:
                raise InvalidSection(
                    f"{what} holds a number written with {len(literal)} characters "
                    f"({literal[:12]}...); this server reads numbers of at most "
                    f"{limits.number_chars} characters (17 significant digits are all a "
                    "float keeps)", prefix)
            return kind(literal)

        return read

    return reader


def check_tree(data: Any, limits: JsonLimits = DEFAULT_LIMITS, prefix: str = "",
               what: str = "the body") -> None:
    """Depth, strings, key count and duplicate keys of parsed JSON, walked without
    recursion; the first problem is raised with its pointer."""
    stack: list[tuple[Any, list[Any]]] = [(data, [])]
    keys = 0
    while stack:
        value, path = stack.pop()
        if isinstance(value, str):
            _check_string(value, path, limits, prefix, what)
            continue
        if not isinstance(value, dict | list):
            continue
        if len(path) >= limits.depth:
            raise LimitExceeded(f"{what} nests arrays and objects more than {limits.depth} "
                                "levels deep", prefix + pointer(path))
        if isinstance(value, list):
            stack.extend((item, [*path, i]) for i, item in enumerate(value))
            continue
        if isinstance(value, _Duplicated):
            raise InvalidSection(f"the key '{value.duplicate[:80]}' is given twice in one "
                                 "object: say it once (which one was meant is not guessed)",
                                 prefix + pointer([*path, value.duplicate]))
        keys += len(value)
        if keys > limits.total_keys:
            raise LimitExceeded(f"{what} holds more than {limits.total_keys} object keys",
                                prefix)
        for key, item in value.items():
            _check_string(key, path, limits, prefix, what)
            stack.append((item, [*path, key]))


def _check_string(text: str, path: list[Any], limits: JsonLimits, prefix: str,
                  what: str) -> None:
    if len(text) > limits.string_chars:
        raise LimitExceeded(f"a string in {what} has {len(text)} characters; this server "
                            f"takes at most {limits.string_chars}", prefix + pointer(path))
    if not text.isascii():
        try:
            text.encode("utf-8")
        except UnicodeEncodeError:
            raise InvalidSection("a string holds an unpaired surrogate escape (\\ud800 to "
                                 "\\udfff alone): it is not Unicode text",
                                 prefix + pointer(path)) from None
