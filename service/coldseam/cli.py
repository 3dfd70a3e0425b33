"""The ``coldseam`` command: ``serve`` runs the service, ``evaluate`` one file.

Imports stay inside the commands: ``coldseam evaluate`` must start fast and never loads the web
stack.
"""

from __future__ import annotations

import argparse
import json
import os
import sys
from pathlib import Path
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from coldseam.settings import Settings

#: Exit status for input the user must fix.
EXIT_BAD_INPUT = 2


def main(argv: list[str] | None = None) -> int:
    """Entry point of the ``coldseam`` command."""
    args = build_parser().parse_args(argv)
    return args.command(args)


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(prog="coldseam", description="Thermal-bridge evaluation "
                                     "of 2D building-envelope sections.")
    commands = parser.add_subparsers(required=True, metavar="COMMAND")
    serve = commands.add_parser("serve", help="run the web service")
    serve.add_argument("--host", help="address to listen on (default 127.0.0.1)")
    serve.add_argument("--port", type=int, help="port (default 8000)")
    serve.add_argument("--data-dir", help="where results are stored (default ./coldseam-data)")
    serve.add_argument("--workers", type=int, help="evaluation worker processes")
    serve.set_defaults(command=cmd_serve)
    evaluate = commands.add_parser("evaluate", help="evaluate one request or section file")
    evaluate.add_argument("file", help="an evaluation request or a bare section (JSON), or "
                          "a DXF drawing (with --layers); - for standard input")
    evaluate.add_argument("--layers", metavar="MAP.json", help="layer map of a DXF drawing: "
                          "JSON object, layer name -> material, environment or ignore (the "
                          "page saves one with 'Save layer map')")
    evaluate.add_argument("--unit", choices=("mm", "m", "cm", "in"),
                          help="unit of a DXF drawing, overriding its $INSUNITS")
    evaluate.add_argument("--indent", type=int, default=2, help="JSON indent (0: one line)")
    evaluate.set_defaults(command=cmd_evaluate)
    hash_key = commands.add_parser("hash-key", help="print the sha256 digest of an API key "
                                   "read from standard input, for COLDSEAM_API_KEY_HASHES_FILE")
    hash_key.set_defaults(command=cmd_hash_key)
    from coldseam.batch_cli import add_batch_command

    add_batch_command(commands)
    return parser


def cmd_serve(args: argparse.Namespace) -> int:
    """Start uvicorn with the app; options override ``COLDSEAM_*`` settings."""
    from pydantic import ValidationError

    from coldseam.settings import Settings

    overrides = {name: value for name, value in (
        ("host", args.host), ("port", args.port), ("data_dir", args.data_dir),
        ("workers", args.workers)) if value is not None}
    try:
        settings = Settings(**overrides)
    except ValidationError as exc:
        return _fail(f"bad setting: {exc.errors()[0]['loc'][0]}: {exc.errors()[0]['msg']}")
    problem = _exposure_problem(settings) or _keys_problem(settings) or _data_problem(settings)
    if problem:
        return _fail(problem)
    _serve(settings)
    return 0


def _keys_problem(settings: Settings) -> str | None:
    from coldseam.api.auth import load_keys

    try:
        load_keys(settings)
    except ValueError as exc:  # NoKeysLoaded, or a line of the file that is no digest
        return f"refusing to start: {exc}"
    return None


def _data_problem(settings: Settings) -> str | None:
    from coldseam.api.store import StoreUnavailable, check_writable

    try:
        check_writable(settings.data_dir)
    except StoreUnavailable as exc:
        return f"refusing to start: {exc.message}"
    return None


def _exposure_problem(settings: Settings) -> str | None:
    from ipaddress import ip_address

    try:
        loopback = settings.host == "localhost" or ip_address(settings.host).is_loopback
    except ValueError:
        loopback = False
    keyed = settings.api_keys or settings.api_key_hashes_file
    if loopback or keyed or settings.allow_open:
        return None
    return (f"refusing to serve without API keys on {settings.host}: set COLDSEAM_API_KEYS "
            "(or COLDSEAM_API_KEY_HASHES_FILE), or COLDSEAM_ALLOW_OPEN=1 to accept that")


def _serve(settings: Settings) -> None:
    import logging

    import uvicorn

    from coldseam.api.main import create_app
    from coldseam.api.protocol import protocol_with

    logging.basicConfig(level=settings.log_level.upper(), stream=sys.stderr,
                        format="%(asctime)s %(levelname)s %(name)s %(message)s")
    app = create_app(settings)
    uvicorn.run(app, host=settings.host, port=settings.port, access_log=False,
                log_level=settings.log_level.lower(),
                http=protocol_with(settings.header_timeout),
                timeout_keep_alive=min(5, int(settings.header_timeout)) or 1)


def cmd_evaluate(args: argparse.Namespace) -> int:
    """Evaluate one file in this process and print the result (with its id) on stdout."""
    from coldseam.errors import ColdseamError, SolveFailed

    try:
        data, notes = _read_input(args)
        result = evaluate_document(data)
    except (OSError, ValueError) as exc:
        return _fail(str(exc))
    except SolveFailed as exc:
        return _fail(f"{exc.field}: {exc.message}" if exc.field else exc.message, 1)
    except ColdseamError as exc:
        return _fail(f"{exc.field}: {exc.message}" if exc.field else exc.message)
    if notes:
        result["warnings"] = [*notes, *result.get("warnings", [])]
    return _print(json.dumps(result, indent=args.indent or None, ensure_ascii=False) + "\n")


def _print(text: str) -> int:
    """Write ``text`` to standard output; a reader that stops early (``| head``) ends the
    command quietly. gmsh leaves SIGPIPE ignored, so a closed pipe is a BrokenPipeError."""
    try:
        sys.stdout.write(text)
        sys.stdout.flush()
    except BrokenPipeError:
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())  # so the flush at exit does not raise again
    return 0


def _read_input(args: argparse.Namespace) -> tuple[object, list[str]]:
    """The request document to evaluate and the import warnings (a DXF drawing's)."""
    is_dxf = args.file.lower().endswith(".dxf")
    if args.layers is None:
        if is_dxf:
            raise ValueError(f"{args.file}: a DXF drawing needs a layer map: --layers "
                             "map.json (layer name -> material, environment or ignore)")
        return _read_json(args.file), []
    from coldseam.imports.dxf import import_dxf

    data = sys.stdin.buffer.read() if args.file == "-" else Path(args.file).read_bytes()
    layer_map = _read_json(args.layers)
    imported = import_dxf(data, layer_map, args.unit, name=Path(args.file).name)
    return {"section": imported["section"]}, list(imported["warnings"])


def evaluate_document(data: object) -> dict:
    """The result document (with ``id``) of an evaluation request or bare section."""
    from coldseam import CAUTION, DEFAULT_ENGINE
    from coldseam.api.worker import load_engine
    from coldseam.schema.evaluation import parse_request, request_digest

    request = parse_request(data)
    engine = load_engine(os.environ.get("COLDSEAM_ENGINE", DEFAULT_ENGINE))
    evaluation = engine(request, None)
    result = {"id": request_digest(request), **evaluation.result}
    result.setdefault("caution", CAUTION)
    return result


def _read_json(name: str) -> object:
    """The JSON of a file (or standard input), read under the limits the server applies."""
    from coldseam.schema.jsonlimits import load_json

    data = sys.stdin.buffer.read() if name == "-" else Path(name).read_bytes()
    return load_json(data, what=name if name != "-" else "standard input")


def cmd_hash_key(args: argparse.Namespace) -> int:
    import hashlib

    key = sys.stdin.readline().strip()
    if not key:
        return _fail("no key on standard input")
    sys.stdout.write(hashlib.sha256(key.encode()).hexdigest() + "\n")
    return 0


def _fail(message: str, code: int = EXIT_BAD_INPUT) -> int:
    sys.stderr.write(f"coldseam: {message}\n")
    return code


if __name__ == "__main__":
    sys.exit(main())
