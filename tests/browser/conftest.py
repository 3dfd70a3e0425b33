"""Fixtures of the browser tests: a live ``coldseam serve`` on a free loopback port with its own
data directory, and Debian's chromium driven by playwright (never a downloaded browser)."""

from __future__ import annotations

import os
import socket
import subprocess
import sys
import time
import urllib.error
import urllib.request
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path

import pytest
from browser_support import TEST_KEY

CHROMIUM = "/usr/bin/chromium"
CHROMIUM_ARGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic",
                 "--no-first-run", "--disable-background-networking",
                 "--disable-component-update", "--disable-sync"]
START_TIMEOUT = 60.0


def _free_port() -> int:
    with socket.socket() as sock:
        sock.bind(("127.0.0.1", 0))
        return sock.getsockname()[1]


def _wait_healthy(url: str, process: subprocess.Popen, log: Path) -> None:
    deadline = time.monotonic() + START_TIMEOUT
    while time.monotonic() < deadline:
        if process.poll() is not None:
            pytest.fail(f"coldseam serve exited with {process.returncode}:\n{log.read_text()}")
        try:
            with urllib.request.urlopen(f"{url}/healthz", timeout=2) as answer:
                if answer.status == 200:
                    return
        except (urllib.error.URLError, ConnectionError, TimeoutError):
            pass
        time.sleep(0.3)
    pytest.fail(f"coldseam serve did not answer /healthz in {START_TIMEOUT} s:\n{log.read_text()}")


@contextmanager
def _serve(data: Path, env_extra: dict[str, str]) -> Iterator[str]:
    """``coldseam serve`` on a free loopback port with data in ``data``; yields its base URL."""
    port = _free_port()
    log = data / "serve.log"
    env = {k: v for k, v in os.environ.items() if not k.startswith("COLDSEAM_")} | env_extra
    command = [sys.executable, "-m", "coldseam.cli", "serve", "--host", "127.0.0.1",
               "--port", str(port), "--data-dir", str(data), "--workers", "1"]
    with log.open("w") as out:
        process = subprocess.Popen(command, stdout=out, stderr=subprocess.STDOUT, env=env)
    url = f"http://127.0.0.1:{port}"
    try:
        _wait_healthy(url, process, log)
        yield url
    finally:
        process.terminate()
        try:
            process.wait(timeout=15)
        except subprocess.TimeoutExpired:
            process.kill()
            process.wait()


@pytest.fixture(scope="session")
def server(tmp_path_factory: pytest.TempPathFactory) -> Iterator[str]:
    """Base URL of a live service with an empty store."""
    with _serve(tmp_path_factory.mktemp("coldseam-data"), {}) as url:
        yield url


@pytest.fixture(scope="session")
def keyed_server(tmp_path_factory: pytest.TempPathFactory) -> Iterator[str]:
    """Base URL of a live service that needs the access key ``TEST_KEY``."""
    with _serve(tmp_path_factory.mktemp("coldseam-keyed"),
                {"COLDSEAM_API_KEYS": TEST_KEY}) as url:
        yield url


@pytest.fixture(scope="session")
def browser() -> Iterator[object]:
    if not Path(CHROMIUM).exists():
        message = "Debian chromium is not installed (apt-get install -y chromium)"
        if os.environ.get("CI"):
            pytest.fail(message)  # CI installs it (scripts/test.sh): missing means broken
        pytest.skip(message)
    sync_api = pytest.importorskip("playwright.sync_api")
    with sync_api.sync_playwright() as p:
        instance = p.chromium.launch(executable_path=CHROMIUM, args=CHROMIUM_ARGS)
        yield instance
        instance.close()


class PageProblems(list):
    """Script errors and content-security-policy violations seen by a page."""


@pytest.fixture
def page_factory(browser):
    """New pages at a given viewport width that record script errors and CSP violations."""
    contexts = []

    def make(width: int = 1280, height: int = 800):
        context = browser.new_context(viewport={"width": width, "height": height},
                                      accept_downloads=True)
        contexts.append(context)
        page = context.new_page()
        page.problems = PageProblems()
        page.on("pageerror", lambda err: page.problems.append(f"page error: {err}"))
        page.on("console", lambda msg: page.problems.append(f"console: {msg.text}")
                if msg.type == "error" else None)
        return page

    yield make
    for context in contexts:
        context.close()
