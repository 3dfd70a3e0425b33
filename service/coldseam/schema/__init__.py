"""Public JSON contract (model-v1) as pydantic models."""

from coldseam.schema.evaluation import EvaluationRequest, parse_request
from coldseam.schema.section import Section

__all__ = ["EvaluationRequest", "Section", "parse_request"]
