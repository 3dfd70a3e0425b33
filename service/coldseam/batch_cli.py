"""``coldseam batch FILE --out results.csv|results.xlsx [--url URL]``: evaluate a junction
schedule (a CSV schedule or a batch document in JSON) and write its results table.

Without ``--url`` the batch runs in this process on local worker processes (the service's own
pool, store and batch runner, on a temporary data folder unless ``--data-dir`` keeps the
results); with it, on that server. Progress goes to stderr: a bar on a terminal, one line per
finished item otherwise. The table of results, in schedule order, and Σ ψ·l go to stdout.
"""

from __future__ import annotations

import argparse
import logging
import sys
import tempfile
import time
from pathlib import Path
from typing import Any

log = logging.getLogger(__name__)

POLL = 0.2  # s between two looks at a running batch
EXTENSIONS = (".csv", ".xlsx")


def add_batch_command(commands: Any) -> None:
    """Register ``coldseam batch`` on the CLI's subcommands."""
    batch = commands.add_parser("batch", help="evaluate a junction schedule (CSV) or a batch "
                                "document (JSON) and write its results as CSV or XLSX")
    batch.add_argument("file", help="a CSV schedule (id,template,length,<parameter>...) or a "
                       "batch document (JSON: items and/or grid)")
    batch.add_argument("--out", required=True, help="results file: .csv or .xlsx")
    batch.add_argument("--url", help="a Coldseam server, e.g. http://127.0.0.1:8000 "
                       "(default: evaluate here, on local worker processes)")
    batch.add_argument("--key", help="API key for --url (default: $COLDSEAM_API_KEY)")
    batch.add_argument("--workers", type=int, help="local worker processes (default 2)")
    batch.add_argument("--data-dir", help="keep local results here (and reuse them next "
                       "time) instead of a temporary folder")
    batch.set_defaults(command=cmd_batch)


def cmd_batch(args: argparse.Namespace) -> int:
    from coldseam.cli import EXIT_BAD_INPUT, _fail
    from coldseam.errors import ColdseamError

    out = Path(args.out)
    if out.suffix.lower() not in EXTENSIONS:
        return _fail(f"--out must end in .csv or .xlsx, not '{out.name}'")
    try:
        document = load_document(Path(args.file))
        if args.url:
            from coldseam.batch_remote import run_remote

            finished, data = run_remote(args.url, document, out.suffix.lower(), args.key)
        else:
            finished = run_local(document, args.workers, args.data_dir)
            data = results_file(finished, out.suffix.lower())
    except (OSError, ValueError) as exc:
        return _fail(str(exc))
    except ColdseamError as exc:
        return _fail(f"{exc.field}: {exc.message}" if exc.field else exc.message,
                     EXIT_BAD_INPUT)
    out.write_bytes(data)
    sys.stdout.write(summary(finished, out))
    return 0 if finished["status"] == "done" else 1


def load_document(path: Path) -> dict[str, Any]:
    """The batch document of a file: a CSV schedule (by its extension) or JSON."""
    from coldseam.batches.schedule import parse_schedule

    text = path.read_text(encoding="utf-8")
    if path.suffix.lower() == ".csv":
        return parse_schedule(text, name=path.stem)
    from coldseam.errors import InvalidSection
    from coldseam.schema.jsonlimits import load_json

    try:
        data = load_json(text, what=str(path))
    except InvalidSection as exc:
        if "not valid JSON" not in exc.message:
            raise
        raise ValueError(f"{exc.message} (a CSV schedule must end in .csv)") from None
    if isinstance(data, dict):
        data.setdefault("name", path.stem)
    return data


def run_local(document: dict[str, Any], workers: int | None,
              data_dir: str | None) -> dict[str, Any]:
    """Run a batch in this process on local worker processes; the finished batch."""
    from coldseam.settings import Settings

    overrides: dict[str, Any] = {"workers": workers} if workers else {}
    if data_dir:
        return _run_local(Settings(data_dir=Path(data_dir), **overrides), document)
    with tempfile.TemporaryDirectory(prefix="coldseam-batch-") as folder:
        return _run_local(Settings(data_dir=Path(folder), **overrides), document)


def _run_local(settings: Any, document: dict[str, Any]) -> dict[str, Any]:
    from coldseam.api.batch_runner import BatchRunner
    from coldseam.api.batch_view import batch_document
    from coldseam.api.jobs import Evaluations
    from coldseam.api.pool import WorkerPool
    from coldseam.api.store import Store, storage_key
    from coldseam.batches.spec import parse_batch

    spec = parse_batch(document, settings.max_batch_items)
    store = Store(settings.database_path)
    pool = WorkerPool(settings.workers, settings.queue_size, settings.engine,
                      settings.evaluation_timeout, settings.worker_start_method, True,
                      settings.worker_memory_mb * 2**20)
    pool.start()
    runner = BatchRunner(Evaluations(store, pool), settings)
    try:
        runner.start()
        key = storage_key("", runner.create("", spec))
        progress = Progress(len(spec.items))
        while True:
            current = batch_document(runner.evaluations, key, store.batch(key))
            progress.show(current)
            if current["status"] in ("done", "failed"):
                return current
            time.sleep(POLL)
    finally:
        runner.stop()
        pool.shutdown()
        store.close()


def results_file(document: dict[str, Any], extension: str) -> bytes:
    from coldseam.batches.tables import result_rows, to_csv, to_xlsx

    rows = result_rows(document)
    if extension == ".xlsx":
        return to_xlsx(rows, document.get("name") or "Schedule")
    return to_csv(rows).encode("utf-8")


class Progress:
    """A bar on a terminal (stderr), one line per finished item otherwise."""

    def __init__(self, total: int, stream: Any = None) -> None:
        self.total, self.stream = total, stream or sys.stderr
        self.tty = self.stream.isatty()
        self._reported: set[int] = set()

    def show(self, document: dict[str, Any]) -> None:
        if self.tty:
            self._bar(document)
        else:
            self._lines(document)

    def _bar(self, document: dict[str, Any]) -> None:
        counts = document["counts"]
        finished = counts["done"] + counts["failed"]
        width = 30
        filled = round(width * finished / max(self.total, 1))
        line = (f"\r[{'#' * filled}{'.' * (width - filled)}] {finished}/{self.total} "
                f"({counts['failed']} failed, {counts['running']} running)")
        self.stream.write(line + ("\n" if finished == self.total else ""))
        self.stream.flush()

    def _lines(self, document: dict[str, Any]) -> None:
        for item in document["items"]:
            if item["status"] in ("done", "failed") and item["position"] not in self._reported:
                self._reported.add(item["position"])
                self.stream.write(f"{len(self._reported)}/{self.total} {item['id']}: "
                                  f"{_outcome(item)}\n")
        self.stream.flush()


def _outcome(item: dict[str, Any]) -> str:
    if item["status"] == "failed":
        error = item.get("error") or {}
        return f"failed: {error.get('detail') or error.get('message')}"
    return f"done, ψ {_fixed(item.get('psi'), 4)} W/(m·K)"


def summary(document: dict[str, Any], out: Path) -> str:
    """The results in schedule order, Σ ψ·l and the caution, as printed text."""
    from coldseam import CAUTION

    width = max([28, *(len(item["id"]) for item in document["items"])])
    lines = [f"{'junction':{width}s} {'ψ W/(m·K)':>10s} {'l m':>7s} {'ψ·l W/K':>9s}  fRsi"]
    for item in document["items"]:
        if item["status"] != "done":
            lines.append(f"{item['id']:{width}s} {item['status']}")
            continue
        lines.append(f"{item['id']:{width}s} {_fixed(item['psi'], 4):>10s} "
                     f"{_fixed(item['length'], 1):>7s} {_fixed(item['psi_l'], 2):>9s}  "
                     f"{_fixed(item['fRsi'], 3)} {item.get('verdict') or ''}".rstrip())
    lines.append(f"{'Σ ψ·l':{width}s} {'':10s} {'':7s} {_fixed(document['sum_psi_l'], 2):>9s}")
    counts = document["counts"]
    lines.append(f"{counts['done']} done, {counts['failed']} failed; results in {out}")
    lines.append(CAUTION)
    return "\n".join(lines) + "\n"


def _fixed(value: Any, digits: int) -> str:
    return "–" if value is None else f"{value:.{digits}f}"
