"""Typed errors raised by the engine; the API maps each to one HTTP status."""

from __future__ import annotations


class ColdseamError(Exception):
    """Base of every error a user can cause. ``field`` is a JSON pointer into the request."""

    def __init__(self, message: str, field: str = "") -> None:
        super().__init__(message)
        self.message = message
        self.field = field

    def __reduce__(self):
        # Keep the field when the error crosses a process boundary (DXF reader, workers).
        return (type(self), (self.message, self.field))

    def as_detail(self) -> dict[str, str]:
        return {"field": self.field, "message": self.message}


class InvalidSection(ColdseamError):
    """The section or evaluation request cannot be evaluated as given (HTTP 422)."""


class MeshingFailed(ColdseamError):
    """gmsh could not mesh the section (HTTP 422: the drawing needs attention)."""


class LimitExceeded(ColdseamError):
    """The request is larger than the configured limits (HTTP 413)."""


class SolveFailed(ColdseamError):
    """The linear solve did not converge (HTTP 500-class: an engine fault, logged)."""


class StoreFailure(ColdseamError):
    """The result store cannot take a write (base of StoreFull and StoreUnavailable); raised
    by every store (SQLite, PostgreSQL) so that the API answers the same."""


class StoreFull(StoreFailure):
    """The disk (or database) holding results is full (HTTP 507)."""


class StoreUnavailable(StoreFailure):
    """The result store cannot be written at all: read-only, I/O error, gone (HTTP 503)."""
