"""``/api/v1/imports/dxf``: a DXF drawing to a section (by ``coldseam.imports.dxf``).

Drawings are read in a separate process under the worker memory limit and a time limit, so a
hostile or simply enormous drawing costs the server neither memory nor a stuck thread.
"""

from __future__ import annotations

import importlib
import json
import logging
import multiprocessing
import resource
import threading
from concurrent.futures import ProcessPoolExecutor
from concurrent.futures import TimeoutError as FutureTimeout
from concurrent.futures.process import BrokenProcessPool
from typing import Annotated, Any

from fastapi import APIRouter, File, Form, HTTPException, UploadFile
from fastapi.concurrency import run_in_threadpool
from fastapi.responses import JSONResponse

from coldseam.api.deps import SettingsDep
from coldseam.api.evaluations import ERRORS
from coldseam.api.worker import ADDRESS_HEADROOM
from coldseam.errors import InvalidSection, LimitExceeded

log = logging.getLogger(__name__)
#: Longest a drawing may take to read, seconds.
READ_TIMEOUT = 60.0

router = APIRouter(prefix="/imports", tags=["imports"])

LAYER_MAP_EXAMPLE = (
    '{"MASONRY": {"material": "masonry", "conductivity": 1.0}, '
    '"INSULATION": {"material": "mineral_wool", "conductivity": 0.035}, '
    '"INSIDE": {"environment": "inside", "temperature": 20, "side": "interior", '
    '"surface_resistance": 0.13}, '
    '"OUTSIDE": {"environment": "outside", "temperature": -5, "side": "exterior", '
    '"surface_resistance": 0.04}}'
)


@router.post("/dxf", responses={200: {"description": "The layers of the drawing, or with a "
                                      "layer map the section (model-v1) drawn in it."},
                                **ERRORS})
async def import_dxf(
    settings: SettingsDep,
    file: Annotated[UploadFile, File(description="A DXF drawing of the cross-section.")],
    layer_map: Annotated[str | None, Form(
        description="JSON object: DXF layer name -> what it is (a material, an environment "
        "or ignored). Without it the answer lists the drawing's layers.",
        examples=[LAYER_MAP_EXAMPLE])] = None,
    unit: Annotated[str | None, Form(
        description="'mm', 'm', 'cm' or 'in': overrides the drawing's $INSUNITS.",
        examples=["mm"])] = None,
) -> JSONResponse:
    """Without ``layer_map``: the drawing's layers, to be mapped. With it: the section
    (``{"section", "warnings", "layers"}``), ready to be completed and evaluated."""
    mapping = parse_layer_map(layer_map)
    data = await file.read()
    dxf_importer()  # 501 before anything is started when the importer is missing
    reader = drawing_reader(settings.worker_memory_mb)
    section = await run_in_threadpool(reader.read, data, mapping, unit)
    return JSONResponse(section)


def parse_layer_map(text: str | None) -> dict[str, Any] | None:
    """The ``layer_map`` form field as a dict, or an InvalidSection naming the problem."""
    if text is None or not text.strip():
        return None
    try:
        mapping: Any = json.loads(text)
    except json.JSONDecodeError as exc:
        raise InvalidSection(f"layer_map is not valid JSON: {exc.msg} at column {exc.colno}",
                             "/layer_map") from None
    if not isinstance(mapping, dict):
        raise InvalidSection("layer_map must be a JSON object: layer name -> what it is",
                             "/layer_map")
    return mapping


def dxf_importer() -> Any:
    try:
        return importlib.import_module("coldseam.imports.dxf").import_dxf
    except (ImportError, AttributeError):
        raise HTTPException(501, "this installation cannot read DXF (coldseam.imports.dxf "
                            "is missing)") from None


def _limit_memory(memory_mb: int) -> None:
    if memory_mb:
        cap = memory_mb * 2**20 + ADDRESS_HEADROOM
        resource.setrlimit(resource.RLIMIT_AS, (cap, cap))


def _read(data: bytes, mapping: dict[str, Any] | None, unit: str | None) -> dict:
    return dxf_importer()(data, mapping, unit)


class DrawingReader:
    """One reader process (spawned on first use, replaced when it dies or overruns)."""

    def __init__(self, memory_mb: int, timeout: float = READ_TIMEOUT,
                 function: Any = None) -> None:
        self.memory_mb, self.timeout = memory_mb, timeout
        self.function = function or _read  # module-level, so the reader process can load it
        self._lock = threading.Lock()
        self._executor: ProcessPoolExecutor | None = None

    def _pool(self) -> ProcessPoolExecutor:
        if self._executor is None:
            self._executor = ProcessPoolExecutor(
                max_workers=1, mp_context=multiprocessing.get_context("spawn"),
                initializer=_limit_memory, initargs=(self.memory_mb,))
        return self._executor

    def _discard(self) -> None:
        executor, self._executor = self._executor, None
        if executor is None:
            return
        for process in list(getattr(executor, "_processes", {}).values()):
            process.kill()  # a drawing that overran its time: no graceful stop to wait for
        executor.shutdown(wait=False, cancel_futures=True)

    def read(self, data: bytes, mapping: dict[str, Any] | None, unit: str | None) -> dict:
        """The importer's answer; its typed errors pass through, and running out of memory
        or time becomes a 413 naming the file."""
        with self._lock:  # one drawing at a time; others wait their turn
            try:
                return self._pool().submit(self.function, data, mapping,
                                           unit).result(self.timeout)
            except FutureTimeout:
                self._discard()
                raise LimitExceeded(
                    f"reading the drawing took longer than {self.timeout:.0f} s and was "
                    "stopped: send a drawing of the cross-section only (purge blocks, hatches "
                    "and other views)", "/file") from None
            except (MemoryError, BrokenProcessPool):
                self._discard()
                limit = (f"the {self.memory_mb} MiB memory limit" if self.memory_mb
                         else "the memory of this machine")
                raise LimitExceeded(
                    f"reading the drawing needed more than {limit} and was stopped: send a "
                    "drawing of the cross-section only", "/file") from None

    def close(self) -> None:
        with self._lock:
            if self._executor is not None:
                self._executor.shutdown(wait=True, cancel_futures=True)
                self._executor = None


_readers: dict[int, DrawingReader] = {}
_readers_lock = threading.Lock()


def drawing_reader(memory_mb: int) -> DrawingReader:
    """The reader for this memory limit, shared by every app in the process."""
    with _readers_lock:
        if memory_mb not in _readers:
            _readers[memory_mb] = DrawingReader(memory_mb)
        return _readers[memory_mb]
