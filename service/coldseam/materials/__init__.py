"""The materials library: design thermal conductivities λ in W/(m·K), each with its source.

The table lives in ``library.csv`` beside this module (columns id, name, conductivity,
density, specific_heat, description, source, capacity_source: ``source`` says where λ comes
from, ``capacity_source`` where ρ and c come from, each as a reader of a report should see it). A section refers to a row with ``{"id": "...", "library": "<row id>"}``;
:func:`resolve_materials` turns every material of a section into (λx, λy, source).

>>> load_library()["steel"].conductivity
50.0
"""

from __future__ import annotations

import csv
import difflib
import logging
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path
from typing import NamedTuple

from coldseam.errors import InvalidSection
from coldseam.schema.section import Section

logger = logging.getLogger(__name__)

LIBRARY_PATH = Path(__file__).with_name("library.csv")
SECTION_SOURCE = "given in the section"


@dataclass(frozen=True)
class LibraryMaterial:
    """One row of the library. ``conductivity`` is the isotropic design λ in W/(m·K)."""

    id: str
    name: str
    conductivity: float
    description: str
    source: str
    density: float = 0.0  # ρ, kg/m³
    specific_heat: float = 0.0  # c, J/(kg·K)
    capacity_source: str = ""


class ResolvedMaterial(NamedTuple):
    """Conductivity along the drawing axes, W/(m·K), and where the value comes from."""

    lambda_x: float
    lambda_y: float
    source: str


@lru_cache(maxsize=1)
def load_library() -> dict[str, LibraryMaterial]:
    """All library rows by id, read once from ``library.csv``."""
    with LIBRARY_PATH.open(encoding="utf-8", newline="") as handle:
        rows = list(csv.DictReader(handle))
    library: dict[str, LibraryMaterial] = {}
    for line, row in enumerate(rows, start=2):
        material = _row_to_material(row, line)
        if material.id in library:
            raise ValueError(f"{LIBRARY_PATH.name} line {line}: id '{material.id}' repeated")
        library[material.id] = material
    logger.debug("materials library: %d rows", len(library))
    return library


def _row_to_material(row: dict[str, str], line: int) -> LibraryMaterial:
    try:
        conductivity = float(row["conductivity"])
    except (KeyError, TypeError, ValueError):
        raise ValueError(f"{LIBRARY_PATH.name} line {line}: conductivity is not a number") from None
    if not conductivity > 0:
        raise ValueError(f"{LIBRARY_PATH.name} line {line}: conductivity must be above 0")
    density, specific_heat = (_positive(row, key, line) for key in ("density", "specific_heat"))
    return LibraryMaterial(
        id=row["id"].strip(),
        name=row["name"].strip(),
        conductivity=conductivity,
        description=row["description"].strip(),
        source=row["source"].strip(),
        density=density,
        specific_heat=specific_heat,
        capacity_source=row["capacity_source"].strip(),
    )


def _positive(row: dict[str, str], key: str, line: int) -> float:
    try:
        value = float(row[key])
    except (KeyError, TypeError, ValueError):
        raise ValueError(f"{LIBRARY_PATH.name} line {line}: {key} is not a number") from None
    if not value > 0:
        raise ValueError(f"{LIBRARY_PATH.name} line {line}: {key} must be above 0")
    return value


def lookup(material_id: str, field: str) -> LibraryMaterial:
    """The library row ``material_id``; InvalidSection at ``field`` naming close ids if unknown."""
    library = load_library()
    if material_id in library:
        return library[material_id]
    close = difflib.get_close_matches(material_id, list(library), n=4, cutoff=0.5)
    hint = f"; did you mean {', '.join(repr(c) for c in close)}?" if close else (
        "; see the materials library for the ids available")
    raise InvalidSection(f"'{material_id}' is not a material of the library{hint}", field)


def resolve_materials(section: Section) -> dict[str, ResolvedMaterial]:
    """(λx, λy, source) for every material of ``section``, keyed by material id.

    A conductivity given in the section wins over a library reference; a library reference
    that names no row raises InvalidSection at ``/section/materials/{i}/library``.
    """
    resolved: dict[str, ResolvedMaterial] = {}
    for i, material in enumerate(section.materials):
        if material.cavity is not None:
            continue  # an air cavity: λeq is computed per cavity (coldseam.thermal.cavities)
        if material.conductivity is not None:
            lam = material.conductivity
            lam_x, lam_y = lam if isinstance(lam, tuple) else (lam, lam)
            resolved[material.id] = ResolvedMaterial(float(lam_x), float(lam_y), SECTION_SOURCE)
            continue
        row = lookup(str(material.library), f"/section/materials/{i}/library")
        source = f"library '{row.id}': {row.source}"
        resolved[material.id] = ResolvedMaterial(row.conductivity, row.conductivity, source)
    return resolved


class ResolvedCapacity(NamedTuple):
    """Density ρ in kg/m³ and specific heat c in J/(kg·K) of one material, and their source;
    ``None`` values when neither the section nor the library gives them."""

    density: float | None
    specific_heat: float | None
    source: str


def resolve_capacities(section: Section) -> dict[str, ResolvedCapacity]:
    """(ρ, c, source) for every material of ``section``: values given in the section win,
    each missing one is taken from the library row the material names (if any)."""
    out: dict[str, ResolvedCapacity] = {}
    for i, material in enumerate(section.materials):
        rho, c = getattr(material, "density", None), getattr(material, "specific_heat", None)
        given = rho is not None and c is not None
        row = (lookup(str(material.library), f"/section/materials/{i}/library")
               if material.library and not given else None)
        if row is None:
            out[material.id] = ResolvedCapacity(rho, c, SECTION_SOURCE if given else "")
            continue
        source = f"library '{row.id}': {row.capacity_source}"
        if rho is not None or c is not None:
            source = f"partly given in the section, the rest from {source}"
        out[material.id] = ResolvedCapacity(row.density if rho is None else rho,
                                            row.specific_heat if c is None else c, source)
    return out
