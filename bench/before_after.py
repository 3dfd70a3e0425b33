"""Case 2 on the plain install path, one engine tree at a time, for before/after comparisons
in one sitting: ``python bench/before_after.py TAG [SERVICE_DIR]``.

Runs itself again in a child interpreter whose ``PYTHONPATH`` is a folder with a stand-in
``sksparse`` package that refuses to import (so CHOLMOD is absent, as after a plain
``pip install``) followed by SERVICE_DIR (default: this tree's service/, e.g. give the
service/ folder of ``git archive <commit> service`` for "before"). Prints one JSON line:
the engine in process (wall and CPU ms, median of 9), its levels, and over HTTP the wall
median and the CPU per evaluation of the server process and of its workers.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import tempfile
from pathlib import Path

HERE = Path(__file__).resolve().parent


def measure(tag: str) -> dict:
    sys.path.insert(0, str(HERE))
    import plain

    import service

    engine = plain.in_process([plain.case_2()], 9)
    with tempfile.TemporaryDirectory() as folder:
        process, base = service._start(folder, 2, {})
        try:
            http = plain.over_http(base, [plain.case_2()], 9, process.pid)
        finally:
            process.terminate()
            process.wait(timeout=30)
    return {"tag": tag, "engine_wall_ms": round(engine["median"] * 1e3, 1),
            "engine_cpu_ms": round(engine["cpu"] * 1e3, 1), "levels": engine["levels"],
            "http_wall_ms": round(http["median"] * 1e3, 1),
            "server_cpu_ms": round(http["server_cpu"] * 1e3, 1),
            "worker_cpu_ms": round(http["worker_cpu"] * 1e3, 1),
            "load": round(os.getloadavg()[0], 2)}


def main() -> int:
    tag = sys.argv[1] if len(sys.argv) > 1 else "this tree"
    if os.environ.get("COLDSEAM_BEFORE_AFTER_CHILD"):
        print(json.dumps(measure(tag)))
        return 0
    tree = Path(sys.argv[2]) if len(sys.argv) > 2 else HERE.parent / "service"
    with tempfile.TemporaryDirectory() as blocker:
        (Path(blocker) / "sksparse").mkdir()
        (Path(blocker) / "sksparse" / "__init__.py").write_text(
            'raise ImportError("not installed: the plain pip install path")\n')
        env = {**os.environ, "PYTHONPATH": os.pathsep.join([blocker, str(tree)]),
               "COLDSEAM_BEFORE_AFTER_CHILD": "1"}
        return subprocess.run([sys.executable, __file__, tag], env=env,
                              stderr=subprocess.DEVNULL).returncode


if __name__ == "__main__":
    sys.exit(main())
