"""Real components for the scale-out tests: a PostgreSQL server from Debian's package (initdb
in a temporary folder, run as an unprivileged user), a Dask scheduler with worker processes
(the ``dask`` command of ``distributed``), and ``coldseam serve`` processes using them."""

from __future__ import annotations

import copy
import glob
import json
import os
import pwd
import shutil
import signal
import socket
import subprocess
import sys
import tempfile
import time
from collections.abc import Iterator
from contextlib import contextmanager
from dataclasses import dataclass, field
from pathlib import Path

import httpx

HERE = Path(__file__).resolve().parent
ENGINE = "scaleout_engines:evaluate"
WALL = json.loads((HERE.parents[1] / "examples" / "wall-1d.json").read_text())
PG_USER = "coldseam-pg"  # the unprivileged account PostgreSQL runs as when the tests are root


def free_port() -> int:
    with socket.socket() as probe:
        probe.bind(("127.0.0.1", 0))
        return probe.getsockname()[1]


def pg_bindir() -> Path | None:
    """Debian's PostgreSQL binaries (the newest version installed), or None."""
    found = sorted(glob.glob("/usr/lib/postgresql/*/bin/initdb"),
                   key=lambda p: int(Path(p).parts[-3]) if Path(p).parts[-3].isdigit() else 0)
    if found:
        return Path(found[-1]).parent
    initdb = shutil.which("initdb")
    return Path(initdb).parent if initdb else None


def _as_user(command: list[str]) -> list[str]:
    """``command`` run as PG_USER when we are root (PostgreSQL refuses to run as root)."""
    if os.geteuid() != 0:
        return command
    try:
        pwd.getpwnam(PG_USER)
    except KeyError:
        subprocess.run(["useradd", "--system", "--no-create-home", "--shell", "/usr/sbin/nologin",
                        PG_USER], check=True)
    return ["runuser", "-u", PG_USER, "--", *command]


@dataclass
class Postgres:
    """One PostgreSQL server on 127.0.0.1:``port`` with its data in ``folder``."""

    bindir: Path
    folder: Path
    port: int
    databases: int = 0

    @property
    def data(self) -> Path:
        return self.folder / "data"

    def url(self, database: str = "postgres") -> str:
        return f"postgresql://postgres@127.0.0.1:{self.port}/{database}"

    def pg_ctl(self, *args: str) -> None:
        subprocess.run(_as_user([str(self.bindir / "pg_ctl"), "-D", str(self.data), *args]),
                       check=True, stdout=subprocess.DEVNULL, timeout=60)

    def start(self) -> None:
        options = (f"-p {self.port} -c listen_addresses=127.0.0.1 "
                   f"-k {self.folder} -c fsync=on -c max_connections=200")
        self.pg_ctl("-o", options, "-l", str(self.folder / "server.log"), "-w", "start")

    def stop(self, mode: str = "fast") -> None:
        self.pg_ctl("-m", mode, "-w", "stop")

    def new_database(self) -> str:
        """A fresh empty database; its URL."""
        import psycopg

        self.databases += 1
        name = f"coldseam_test_{self.databases}"
        with psycopg.connect(self.url(), autocommit=True) as conn:
            conn.execute(f"CREATE DATABASE {name}")
        return self.url(name)


@contextmanager
def postgres() -> Iterator[Postgres]:
    """initdb into a temporary folder and start the server; stop it and remove the folder."""
    bindir = pg_bindir()
    if bindir is None:
        raise RuntimeError("PostgreSQL is not installed: apt-get install postgresql "
                           "(scripts/test.sh does it when run as root)")
    folder = Path(tempfile.mkdtemp(prefix="coldseam-pg-"))
    if os.geteuid() == 0:
        _as_user(["true"])  # makes the account
        shutil.chown(folder, PG_USER, PG_USER)
    server = Postgres(bindir, folder, free_port())
    subprocess.run(_as_user([str(bindir / "initdb"), "-D", str(server.data), "-U", "postgres",
                             "--auth=trust", "-E", "UTF8", "--no-instructions"]),
                   check=True, stdout=subprocess.DEVNULL, timeout=120)
    server.start()
    try:
        yield server
    finally:
        try:
            server.stop("immediate")
        finally:
            shutil.rmtree(folder, ignore_errors=True)


def environment(**settings: str) -> dict[str, str]:
    """This process's environment without COLDSEAM_* settings, plus ``settings`` as them; the
    test engines importable."""
    env = {k: v for k, v in os.environ.items() if not k.startswith(("COLDSEAM_", "DASK_"))}
    env["PYTHONPATH"] = os.pathsep.join(filter(None, [str(HERE), env.get("PYTHONPATH")]))
    env.update({f"COLDSEAM_{k.upper()}": v for k, v in settings.items()})
    return env


@dataclass
class Dask:
    """A scheduler and ``dask worker`` processes (each its own nanny and worker process)."""

    address: str
    log: Path
    scheduler: subprocess.Popen
    workers: list[subprocess.Popen] = field(default_factory=list)

    def add_worker(self, nworkers: int = 1) -> subprocess.Popen:
        with open(self.log, "ab") as log:
            process = subprocess.Popen(
                ["dask", "worker", self.address, "--nthreads", "1", "--nworkers",
                 str(nworkers), "--host", "127.0.0.1", "--no-dashboard", "--memory-limit", "0"],
                stdout=log, stderr=log, env=environment(), start_new_session=True)
        self.workers.append(process)
        return process

    def worker_pids(self) -> list[int]:
        """Pids of the Dask worker processes (the children of the nannies), as the
        scheduler knows them."""
        from distributed import Client

        with Client(self.address, timeout=10) as client:
            return sorted(client.run(os.getpid).values())

    def wait_workers(self, count: int, timeout: float = 90.0) -> None:
        from distributed import Client

        with Client(self.address, timeout=10) as client:
            client.wait_for_workers(count, timeout=timeout)

    def close(self) -> None:
        for process in [*self.workers, self.scheduler]:
            _end(process)


@contextmanager
def dask_cluster(log: Path, workers: int) -> Iterator[Dask]:
    port = free_port()
    address = f"tcp://127.0.0.1:{port}"
    with open(log, "ab") as out:
        scheduler = subprocess.Popen(
            ["dask", "scheduler", "--host", "127.0.0.1", "--port", str(port), "--no-dashboard"],
            stdout=out, stderr=out, env=environment(), start_new_session=True)
    cluster = Dask(address, log, scheduler)
    try:
        if workers:
            cluster.add_worker(workers)
            cluster.wait_workers(workers)
        yield cluster
    finally:
        cluster.close()


def _end(process: subprocess.Popen, group: bool = True) -> None:
    """SIGTERM ``process`` (with ``group``, its whole process group: a nanny and its worker),
    then SIGKILL whatever of its group is left (a server's workers, when it hung)."""
    if process.poll() is None:
        try:
            if group:
                os.killpg(process.pid, signal.SIGTERM)
            else:
                process.terminate()
            process.wait(timeout=20)
        except subprocess.TimeoutExpired:
            pass
        except ProcessLookupError:
            return
    try:
        os.killpg(process.pid, signal.SIGKILL)
    except (ProcessLookupError, PermissionError):
        pass
    process.wait()


@dataclass
class Server:
    base: str
    process: subprocess.Popen
    log: Path

    def client(self) -> httpx.Client:
        return httpx.Client(base_url=self.base, timeout=60)

    def log_has(self, text: str) -> bool:
        return text in self.log.read_text(errors="replace")


@contextmanager
def serve(log: Path, instance: str, **settings: str) -> Iterator[Server]:
    """``coldseam serve`` on a free loopback port with the given COLDSEAM_* settings."""
    port = free_port()
    data_dir = log.parent / f"data-{instance}"
    env = environment(instance=instance, data_dir=str(data_dir), **settings)
    with open(log, "ab") as out:
        process = subprocess.Popen(
            [sys.executable, "-m", "coldseam.cli", "serve", "--host", "127.0.0.1", "--port",
             str(port)], stdout=out, stderr=out, env=env, start_new_session=True)
    server = Server(f"http://127.0.0.1:{port}", process, log)
    try:
        _wait_healthy(server)
        yield server
    finally:
        _end(process, group=False)  # the server stops its own workers


def _wait_healthy(server: Server, timeout: float = 90.0) -> None:
    deadline = time.monotonic() + timeout
    while time.monotonic() < deadline:
        if server.process.poll() is not None:
            raise AssertionError(f"server exited with {server.process.returncode}")
        try:
            if httpx.get(f"{server.base}/healthz", timeout=1).status_code == 200:
                return
        except httpx.TransportError:
            pass
        time.sleep(0.2)
    raise AssertionError("server did not become healthy")


def wait_for(check, timeout: float, what: str, every: float = 0.2):
    """Poll ``check()`` until it returns something true; that value."""
    deadline = time.monotonic() + timeout
    while time.monotonic() < deadline:
        value = check()
        if value:
            return value
        time.sleep(every)
    raise AssertionError(f"timed out waiting for {what}")


def request(description: str = "", name: str = "wall") -> dict:
    """The example wall; ``description`` tells the stand-in engine what to do."""
    body = copy.deepcopy(WALL)
    body["section"].update(name=name, description=description)
    return body


def when(value, check):
    """``value`` when ``check(value)``, else None (for wait_for)."""
    return value if check(value) else None


def all_done(client: httpx.Client, locations: list[str]) -> list[dict] | None:
    """The states of the evaluations at ``locations`` once all are done."""
    states = [client.get(location) for location in locations]
    if all(s.status_code == 200 and s.json()["status"] == "done" for s in states):
        return [s.json() for s in states]
    return None


def batch_of(names: list[str], description: str) -> dict:
    """A batch of stand-in requests, one item per name."""
    return {"name": "scale-out test batch",
            "items": [{"id": name, "request": request(description, name)} for name in names]}


def batch_finished(client: httpx.Client, location: str) -> dict | None:
    answer = client.get(location)
    if answer.status_code == 200 and answer.json()["status"] in ("done", "failed"):
        return answer.json()
    return None
