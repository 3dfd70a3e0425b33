"""Size limits of one request, checked before it reaches a worker (HTTP 413)."""

from __future__ import annotations

from coldseam.errors import LimitExceeded
from coldseam.schema.evaluation import EvaluationRequest
from coldseam.settings import Settings


def vertex_count(request: EvaluationRequest) -> int:
    """Polygon, hole and boundary-path vertices of the section."""
    section = request.section
    regions = sum(len(r.polygon) + sum(len(h) for h in r.holes) for r in section.regions)
    return regions + sum(len(b.path) for b in section.boundaries)


def check_limits(request: EvaluationRequest, settings: Settings) -> None:
    """Raise LimitExceeded when the request is larger than this server takes.

    A request that leaves ``options.max_nodes`` at its default gets this server's limit when
    that is lower; one that asks for more than the limit is refused.
    """
    regions = len(request.section.regions)
    if regions > settings.max_regions:
        raise LimitExceeded(f"the section has {regions} regions; this server takes at most "
                            f"{settings.max_regions}", "/section/regions")
    vertices = vertex_count(request)
    if vertices > settings.max_vertices:
        raise LimitExceeded(f"the section has {vertices} vertices (polygons, holes and "
                            f"boundary paths); this server takes at most "
                            f"{settings.max_vertices}", "/section")
    options = request.options
    if "max_nodes" not in options.model_fields_set and options.max_nodes > settings.max_nodes:
        options.max_nodes = settings.max_nodes  # the default, not asked for: this server's
    if request.options.max_nodes > settings.max_nodes:
        raise LimitExceeded(f"options.max_nodes {request.options.max_nodes} is above this "
                            f"server's limit of {settings.max_nodes} mesh nodes",
                            "/options/max_nodes")
