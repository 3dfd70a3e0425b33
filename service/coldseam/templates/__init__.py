"""Parametric junction templates: each builds a model-v1 evaluation request from a few
engineer's parameters (lengths in mm, materials by library id or λ).

>>> [t.id for t in list_templates()][:2]
['wall_corner', 'floor_slab']
>>> build("wall_corner", {"insulation_thickness": 200})["section"]["unit"]
'mm'

A new template is a module with ``INFO`` (a TemplateInfo) and ``build(parameters)``, listed
in ``_MODULES`` below.
"""

from __future__ import annotations

import dataclasses
import difflib
import logging
from types import ModuleType
from typing import Any

from coldseam.errors import InvalidSection
from coldseam.templates import (
    balcony,
    corner,
    eaves,
    floor_slab,
    framed_wall,
    glazing_edge,
    ground_floor,
    window_installation,
    window_reveal,
)
from coldseam.templates.base import Parameter, TemplateInfo, resolve_parameters
from coldseam.templates.climate import CLIMATE_PARAMETERS, apply_climate

logger = logging.getLogger(__name__)

__all__ = ["Parameter", "TemplateInfo", "build", "get_template", "list_templates"]

_MODULES: tuple[ModuleType, ...] = (corner, floor_slab, balcony, window_reveal, eaves,
                                    ground_floor, framed_wall, window_installation, glazing_edge)
_BY_ID: dict[str, ModuleType] = {m.INFO.id: m for m in _MODULES}
#: Each template's declaration with the design-climate parameters every template takes.
_INFO: dict[str, TemplateInfo] = {
    m.INFO.id: dataclasses.replace(m.INFO, parameters=(*m.INFO.parameters, *CLIMATE_PARAMETERS))
    for m in _MODULES}


def list_templates() -> list[TemplateInfo]:
    """Every template with its parameters (its own, then the climate's), in a stable order."""
    return [_INFO[m.INFO.id] for m in _MODULES]


def get_template(template_id: str) -> TemplateInfo:
    """The template ``template_id``; InvalidSection at ``/template`` when there is none."""
    return _INFO[_module(template_id).INFO.id]


def build(template_id: str, params: dict[str, Any] | None = None) -> dict[str, Any]:
    """An evaluation request (model-v1 dict) for template ``template_id``.

    ``params`` overrides the defaults; a bad value raises InvalidSection at
    ``/parameters/<name>``.
    """
    module = _module(template_id)
    resolved = resolve_parameters(_INFO[module.INFO.id], params)
    logger.debug("building template %s", template_id)
    return apply_climate(module.build(resolved), resolved)


def _module(template_id: str) -> ModuleType:
    if template_id in _BY_ID:
        return _BY_ID[template_id]
    close = difflib.get_close_matches(str(template_id), list(_BY_ID), n=3, cutoff=0.4)
    hint = f"; did you mean {', '.join(close)}?" if close else ""
    raise InvalidSection(f"there is no template '{template_id}' (templates: "
                         f"{', '.join(_BY_ID)}){hint}", "/template")
