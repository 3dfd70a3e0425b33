"""``/api/v1/imports/dxf``: a DXF drawing to a section (by ``coldseam.imports.dxf``).

Drawings are read by ``coldseam.api.reader`` (a separate process under the worker memory
limit and a time limit; uploads wait their turn without holding a thread, 429 when too many
wait).
"""

from __future__ import annotations

from typing import Annotated, Any

from fastapi import APIRouter, File, Form, UploadFile
from fastapi.responses import JSONResponse

from coldseam.api.deps import SettingsDep
from coldseam.api.evaluations import ERRORS
from coldseam.api.reader import DrawingReader, check_importer, drawing_reader
from coldseam.errors import InvalidSection
from coldseam.schema.jsonlimits import load_json

__all__ = ["DrawingReader", "drawing_reader", "router"]

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
    check_importer()  # 501 before anything is started when the importer is missing
    reader = drawing_reader(settings.worker_memory_mb)
    section = await reader.read_async(data, mapping, unit)
    return JSONResponse(section)


def parse_layer_map(text: str | None) -> dict[str, Any] | None:
    """The ``layer_map`` form field as a dict, or an InvalidSection naming the problem."""
    if text is None or not text.strip():
        return None
    mapping: Any = load_json(text, prefix="/layer_map", what="layer_map")
    if not isinstance(mapping, dict):
        raise InvalidSection("layer_map must be a JSON object: layer name -> what it is",
                             "/layer_map")
    return mapping


