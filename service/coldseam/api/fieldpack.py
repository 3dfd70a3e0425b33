"""The stored form of a temperature field: binary arrays, turned into JSON when asked for.

An evaluation's field (coldseam.thermal.field) is drawn only when someone opens it; most
evaluations (a spreadsheet's one number, a script's ψ) never are. Writing it as JSON for
every evaluation cost more than the engine on small sections (Case 2, 8.8k dofs: 39 ms of
JSON and 46 ms of zlib for 0.7 MB, against ~1 ms for the arrays as they are). So the store
keeps ``pack(field)``: a magic tag, the length of a JSON header (the small members and, for
each array, its name, dtype and shape), the header, then the arrays' bytes. ``to_json``
makes the compact JSON ``/field`` answers — the same text the field's lists give — and also
reads a field stored before this format (zlib-compressed JSON).
"""

from __future__ import annotations

import json
import struct
import zlib
from typing import Any

import numpy as np

MAGIC = b"CSF1"
#: Array dtypes kept as they are; anything else is stored as float64 or int64.
KEPT = {"float64", "float32", "int64", "int32", "int16", "uint8"}


def pack(field: dict[str, Any]) -> bytes:
    """The stored bytes of ``field`` (array members numpy arrays or lists)."""
    header: dict[str, Any] = {"order": list(field), "plain": {}, "arrays": []}
    blobs = []
    for name, value in field.items():
        if isinstance(value, np.ndarray):
            array = value if value.dtype.name in KEPT else value.astype(
                np.float64 if value.dtype.kind == "f" else np.int64)
            array = np.ascontiguousarray(array)
            header["arrays"].append([name, array.dtype.name, list(array.shape)])
            blobs.append(array.tobytes())
        else:
            header["plain"][name] = value
    text = json.dumps(header, separators=(",", ":"), allow_nan=False,
                      default=_plain).encode()
    return b"".join([MAGIC, struct.pack("<I", len(text)), text, *blobs])


def unpack(data: bytes) -> dict[str, Any]:
    """The field stored as ``data``, array members as numpy arrays (read-only views)."""
    if not data.startswith(MAGIC):
        return json.loads(zlib.decompress(data))
    (length,) = struct.unpack_from("<I", data, len(MAGIC))
    start = len(MAGIC) + 4
    header = json.loads(data[start:start + length])
    offset = start + length
    arrays = {}
    for name, dtype, shape in header["arrays"]:
        count = int(np.prod(shape)) if shape else 1
        arrays[name] = np.frombuffer(data, dtype=dtype, count=count,
                                     offset=offset).reshape(shape)
        offset += arrays[name].nbytes
    return {name: arrays[name] if name in arrays else header["plain"][name]
            for name in header["order"]}


def to_json(data: bytes) -> bytes:
    """The compact JSON of the field stored as ``data``."""
    if not data.startswith(MAGIC):
        return zlib.decompress(data)
    return json.dumps(unpack(data), separators=(",", ":"), allow_nan=False,
                      default=_plain).encode()


def _plain(value: Any) -> Any:
    for method in ("tolist", "item"):
        if hasattr(value, method):
            return getattr(value, method)()
    raise TypeError(f"{type(value).__name__} is not JSON-able")
