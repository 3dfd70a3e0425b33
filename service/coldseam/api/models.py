"""Response shapes of the API, for the OpenAPI page and for clients."""

from __future__ import annotations

from typing import Literal

from pydantic import BaseModel, ConfigDict, Field

Status = Literal["queued", "running", "done", "failed"]


class ErrorOut(BaseModel):
    detail: str = Field(description="What is wrong, naming the field: enough to show a user.")
    field: str = Field(default="", description="JSON pointer into the request, or ''.")
    message: str = ""
    kind: str = Field(default="", description="InvalidSection, MeshingFailed, LimitExceeded, "
                      "SolveFailed, WorkerCrashed, Timeout, QueueFull, ...")
    request_id: str = ""
    errors: list[dict[str, str]] | None = Field(
        default=None, description="Validation errors: every offending field and why.")


class EvaluationAccepted(BaseModel):
    id: str
    status: Status
    location: str = Field(description="Where to GET the evaluation.")


class EvaluationStatusOut(BaseModel):
    """An evaluation not finished (or failed); a done one answers with the full result."""

    model_config = ConfigDict(extra="allow")

    id: str
    status: Status
    stage: str | None = Field(default=None, description="geometry, meshing, solving, "
                              "post-processing")
    progress: float = Field(default=0.0, ge=0, le=1, description="Fraction of the whole.")
    created_at: str | None = None
    error: ErrorOut | None = None


class EvaluationSummary(BaseModel):
    id: str
    name: str | None
    status: Status
    created_at: str
    L2D: float | None = None
    psi: float | None = None
    fRsi: float | None = None
    verdict: str | None = None


class EvaluationPage(BaseModel):
    items: list[EvaluationSummary]
    total: int
    limit: int
    offset: int


class Health(BaseModel):
    status: Literal["ok"]
    version: str
    engine_version: str
    workers: int
    auth: Literal["open", "keys"]


class BatchAccepted(BaseModel):
    id: str
    status: Status
    location: str = Field(description="Where to GET the batch.")
    items: int = Field(description="How many items the batch has.")


class BatchPage(BaseModel):
    """The caller's batches: each as ``GET /api/v1/batches/{id}`` without its items."""

    items: list[dict]
    total: int
    limit: int
    offset: int
