"""A real ``coldseam serve`` on 127.0.0.1 for the persistence and load tests, and the memory of
its process tree (server and workers) read from /proc."""

from __future__ import annotations

import os
import signal
import socket
import subprocess
import sys
import time
from collections.abc import Iterator
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path

import httpx

PAGE = os.sysconf("SC_PAGE_SIZE")


def free_port() -> int:
    with socket.socket() as probe:
        probe.bind(("127.0.0.1", 0))
        return probe.getsockname()[1]


@dataclass
class Server:
    base: str
    process: subprocess.Popen

    def tree(self) -> list[int]:
        """The server's pid and those of its children (the workers)."""
        return [self.process.pid, *children(self.process.pid)]

    def rss(self) -> int:
        """Resident bytes of the server and its workers."""
        return sum(resident(pid) for pid in self.tree())


def children(pid: int) -> list[int]:
    out: list[int] = []
    try:
        tasks = os.listdir(f"/proc/{pid}/task")
    except OSError:
        return out
    for task in tasks:
        try:
            with open(f"/proc/{pid}/task/{task}/children") as listing:
                out += [int(p) for p in listing.read().split()]
        except OSError:
            continue
    return out


def resident(pid: int) -> int:
    try:
        with open(f"/proc/{pid}/statm") as statm:
            return int(statm.read().split()[1]) * PAGE
    except (OSError, ValueError, IndexError):
        return 0


@contextmanager
def serve(data_dir: Path, log_path: Path, workers: int = 2,
          **settings: str) -> Iterator[Server]:
    """Run ``coldseam serve`` until the block ends (SIGTERM; SIGKILL if it hangs), then make
    sure none of its workers is left behind."""
    port = free_port()
    environment = {k: v for k, v in os.environ.items() if not k.startswith("COLDSEAM_")}
    environment.update({f"COLDSEAM_{k.upper()}": v for k, v in settings.items()})
    with open(log_path, "ab") as log:
        process = subprocess.Popen(
            [sys.executable, "-m", "coldseam.cli", "serve", "--host", "127.0.0.1", "--port",
             str(port), "--data-dir", str(data_dir), "--workers", str(workers)],
            stdout=log, stderr=log, env=environment)
    server = Server(f"http://127.0.0.1:{port}", process)
    workers_seen: set[tuple[int, str]] = set()
    try:
        wait_healthy(server)
        workers_seen.update(identities(children(process.pid)))
        yield server
    finally:
        workers_seen.update(identities(children(process.pid)))
        stop(process)
        reap(workers_seen)


def wait_healthy(server: Server, timeout: float = 60.0) -> None:
    deadline = time.monotonic() + timeout
    while time.monotonic() < deadline:
        if server.process.poll() is not None:
            raise AssertionError(f"server exited with {server.process.returncode}")
        try:
            if httpx.get(f"{server.base}/healthz", timeout=1).status_code == 200:
                return
        except httpx.TransportError:
            time.sleep(0.1)
    raise AssertionError("server did not become healthy")


def stop(process: subprocess.Popen) -> None:
    if process.poll() is None:
        process.send_signal(signal.SIGTERM)
        try:
            process.wait(timeout=20)
        except subprocess.TimeoutExpired:
            process.kill()
            process.wait()


def identities(pids: list[int]) -> set[tuple[int, str]]:
    """(pid, start time) of each process: a pid alone may be reused after it ends."""
    return {(pid, start) for pid in pids if (start := _start_time(pid))}


def reap(processes: set[tuple[int, str]], timeout: float = 15.0) -> list[int]:
    """Wait for the given workers of a stopped server to end; kill any that do not (the same
    process only: pid and start time). Returns the pids that had to be killed."""
    deadline = time.monotonic() + timeout
    alive = {p for p in processes if _start_time(p[0]) == p[1]}
    while alive and time.monotonic() < deadline:
        time.sleep(0.1)
        alive = {p for p in alive if _start_time(p[0]) == p[1]}
    for pid, _ in alive:
        os.kill(pid, signal.SIGKILL)
    return sorted(pid for pid, _ in alive)


def _start_time(pid: int) -> str | None:
    """Field 22 of /proc/<pid>/stat (start time in clock ticks); None when it is gone or a
    zombie."""
    try:
        with open(f"/proc/{pid}/stat") as stat:
            fields = stat.read().rsplit(")", 1)[1].split()
    except OSError:
        return None
    return None if fields[0] == "Z" else fields[19]
