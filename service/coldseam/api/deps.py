"""Typed dependencies of the routes."""

from __future__ import annotations

from typing import Annotated

from fastapi import Depends, HTTPException, Request
from fastapi.security import HTTPAuthorizationCredentials, HTTPBearer

from coldseam.api.auth import OPEN_OWNER, KeyRing
from coldseam.api.jobs import Evaluations
from coldseam.errors import InvalidSection
from coldseam.settings import Settings, get_settings

SettingsDep = Annotated[Settings, Depends(get_settings)]

_bearer = HTTPBearer(auto_error=False, description="An API key of this server, when it "
                     "has any (COLDSEAM_API_KEYS); an open server needs none.")


def get_evaluations(request: Request) -> Evaluations:
    return request.app.state.evaluations


def get_owner(request: Request,
              credentials: Annotated[HTTPAuthorizationCredentials | None,
                                     Depends(_bearer)]) -> str:
    """The owner tag of the caller's key (401 without an accepted key), or the open owner."""
    ring: KeyRing = request.app.state.keys
    if ring.open:
        return OPEN_OWNER
    challenge = {"WWW-Authenticate": "Bearer"}
    presented = None
    if credentials is not None and credentials.scheme.lower() == "bearer":
        presented = credentials.credentials
    elif credentials is None and takes_query_key(request):
        presented = request.query_params.get("key") or None
    if presented is None:
        raise HTTPException(401, "this server needs an API key: send the header "
                            "'Authorization: Bearer <key>'", headers=challenge)
    owner = ring.owner_of(presented)
    if owner is None:
        raise HTTPException(401, "the API key is not accepted by this server",
                            headers=challenge)
    return owner


def single_query_values(request: Request) -> None:
    """A query parameter given twice is refused: which one was meant is not guessed."""
    seen: set[str] = set()
    for name, _ in request.query_params.multi_items():
        if name in seen:
            raise InvalidSection(f"the query parameter '{name}' is given twice: give it once",
                                 f"/query/{name}")
        seen.add(name)


def takes_query_key(request: Request) -> bool:
    """A GET of an endpoint marked ``query_key`` (the spreadsheet value endpoint, whose callers
    cannot send headers) may carry the key as ``?key=``; no other endpoint may."""
    endpoint = request.scope.get("endpoint")
    return request.method == "GET" and getattr(endpoint, "query_key", False) is True


EvaluationsDep = Annotated[Evaluations, Depends(get_evaluations)]
OwnerDep = Annotated[str, Depends(get_owner)]
