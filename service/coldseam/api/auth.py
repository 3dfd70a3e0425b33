"""Bearer keys: kept only as sha256 digests, compared in constant time.

With no keys configured the API is open (meant for loopback) and everything belongs to one
owner, ``""``. With keys, each key is its own owner: its stored evaluations are filed under a
tag derived from the key's digest, so one key cannot see or guess another's.
"""

from __future__ import annotations

import hashlib
import hmac
from dataclasses import dataclass
from pathlib import Path

from coldseam.settings import Settings

OPEN_OWNER = ""


def key_digest(key: str) -> str:
    """The sha256 hex digest under which a bearer key is kept."""
    return hashlib.sha256(key.encode()).hexdigest()


@dataclass(frozen=True)
class KeyRing:
    """The digests of the accepted keys; empty means the API is open."""

    digests: tuple[str, ...] = ()

    @property
    def open(self) -> bool:
        return not self.digests

    def owner_of(self, presented: str) -> str | None:
        """The owner tag of a presented key, or None when it is not accepted."""
        digest = key_digest(presented)
        matched = False
        for known in self.digests:  # every digest compared: no early exit
            matched |= hmac.compare_digest(digest, known)
        if not matched:
            return None
        return hashlib.sha256(f"coldseam-owner\n{digest}".encode()).hexdigest()[:32]


class NoKeysLoaded(ValueError):
    """Keys were configured, but not one key came of it: the server must not start open."""


def load_keys(settings: Settings) -> KeyRing:
    """Keys from ``COLDSEAM_API_KEYS`` (plain, hashed here) and ``COLDSEAM_API_KEY_HASHES_FILE``.

    Raises NoKeysLoaded when either is set but holds no key (``","``, blanks, an empty or
    comments-only file): a typo there must not serve an open API.
    """
    digests = [key_digest(k.strip()) for k in (settings.api_keys or "").split(",") if k.strip()]
    if settings.api_keys is not None and not digests:
        raise NoKeysLoaded("COLDSEAM_API_KEYS is set but holds no key (only commas or "
                           "blanks): give at least one key, or unset it")
    if settings.api_key_hashes_file is not None:
        path = settings.api_key_hashes_file
        try:
            from_file = read_digest_file(path)
        except OSError as exc:
            raise NoKeysLoaded(f"COLDSEAM_API_KEY_HASHES_FILE {path} cannot be read: "
                               f"{exc.strerror or exc}") from None
        if not from_file:
            raise NoKeysLoaded(f"COLDSEAM_API_KEY_HASHES_FILE {path} holds no key digest "
                               "(it is empty or all comments): add one "
                               "(`coldseam hash-key`), or unset it")
        digests += from_file
    return KeyRing(tuple(dict.fromkeys(digests)))


def read_digest_file(path: Path) -> list[str]:
    """sha256 hex digests, one a line; blank lines and ``#`` comments are skipped."""
    digests = []
    for number, line in enumerate(path.read_text().splitlines(), start=1):
        text = line.split("#", 1)[0].strip().lower()
        if not text:
            continue
        if len(text) != 64 or any(c not in "0123456789abcdef" for c in text):
            raise ValueError(f"{path}:{number}: not a sha256 hex digest")
        digests.append(text)
    return digests
