"""The HTTP/1.1 connection protocol of ``coldseam serve``: uvicorn's h11 protocol with a bound
on the time a connection may take to send a request's headers, or stay idle between requests.

uvicorn closes a connection idle after a response (``timeout_keep_alive``), but that timer goes
at the first byte received, and a fresh connection has none: a client trickling header bytes
(or sending none) would hold its connection open for as long as it likes.
"""

from __future__ import annotations

import asyncio
import logging
from typing import Any

import h11
from uvicorn.protocols.http.h11_impl import H11Protocol

log = logging.getLogger(__name__)


class HeaderTimedH11(H11Protocol):
    """Closes a connection whose next request's headers are not complete ``header_timeout``
    seconds after the connection opened or the previous response ended."""

    header_timeout = 10.0
    _header_timer: asyncio.TimerHandle | None = None

    def connection_made(self, transport: Any) -> None:  # type: ignore[override]
        super().connection_made(transport)
        self._arm_header_timer()

    def connection_lost(self, exc: Exception | None) -> None:
        self._disarm_header_timer()
        super().connection_lost(exc)

    def handle_events(self) -> None:
        super().handle_events()
        if self._request_in_progress():
            self._disarm_header_timer()

    def on_response_complete(self) -> None:
        super().on_response_complete()
        if not self._request_in_progress():
            self._arm_header_timer()

    def _request_in_progress(self) -> bool:
        return self.cycle is not None and not self.cycle.response_complete

    def _arm_header_timer(self) -> None:
        self._disarm_header_timer()
        self._header_timer = self.loop.call_later(self.header_timeout, self._headers_late)

    def _disarm_header_timer(self) -> None:
        if self._header_timer is not None:
            self._header_timer.cancel()
            self._header_timer = None

    def _headers_late(self) -> None:
        self._header_timer = None
        if self._request_in_progress() or self.transport.is_closing():
            return
        log.info("closing a connection that sent no complete request headers in %g s",
                 self.header_timeout)
        if self.conn.our_state in (h11.IDLE, h11.DONE):
            try:
                self.conn.send(h11.ConnectionClosed())
            except h11.LocalProtocolError:
                pass
        self.transport.close()


def protocol_with(header_timeout: float) -> type[HeaderTimedH11]:
    """The protocol class with ``header_timeout`` seconds."""
    return type("HeaderTimedH11", (HeaderTimedH11,), {"header_timeout": header_timeout})
