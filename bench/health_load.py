"""/healthz delay under load: ``python bench/health_load.py [--quick]``.

A served build (2 workers) is loaded with concurrent template evaluations and DXF uploads
(more than the reader's waiting line takes, so some are answered 429) while a separate process
asks /healthz every 50 ms on a kept-alive connection; prints the delays (median, p90, max) and
the statuses of the load. The aim is /healthz within 0.1 s under any load.
"""

from __future__ import annotations

import argparse
import json
import subprocess
import sys
import tempfile
import time
from concurrent.futures import ThreadPoolExecutor
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

from service import _requests, _start  # noqa: E402

PROBE = """
import json, sys, time, httpx
base, seconds = sys.argv[1], float(sys.argv[2])
delays = []
with httpx.Client(timeout=10) as client:
    client.get(base + "/healthz")
    end = time.monotonic() + seconds
    while time.monotonic() < end:
        started = time.monotonic()
        client.get(base + "/healthz")
        delays.append(time.monotonic() - started)
        time.sleep(0.05)
print(json.dumps(delays))
"""


def drawing(lines: int) -> bytes:
    """An R12 drawing of ``lines`` touching segments (a second or more to read)."""
    body = "".join(f"0\nLINE\n8\nPART\n10\n{i * 0.01:.3f}\n20\n0\n11\n{(i + 1) * 0.01:.3f}\n"
                   "21\n0\n" for i in range(lines))
    return ("0\nSECTION\n2\nENTITIES\n" + body + "0\nENDSEC\n0\nEOF\n").encode()


def run(evaluations: int, uploads: int, seconds: float) -> dict:
    import httpx

    with tempfile.TemporaryDirectory() as folder:
        process, base = _start(folder, 2)
        try:
            probe = subprocess.Popen([sys.executable, "-c", PROBE, base, str(seconds)],
                                     stdout=subprocess.PIPE, text=True)
            data = drawing(19_000)
            with ThreadPoolExecutor(evaluations + uploads) as pool:
                jobs = [pool.submit(lambda r: httpx.post(f"{base}/api/v1/evaluations",
                                                         json=r, timeout=300).status_code, r)
                        for r in _requests(evaluations, "health")]
                jobs += [pool.submit(lambda: httpx.post(
                    f"{base}/api/v1/imports/dxf", files={"file": ("x.dxf", data)},
                    timeout=300).status_code) for _ in range(uploads)]
                statuses = sorted(job.result() for job in jobs)
            delays = sorted(json.loads(probe.communicate(timeout=seconds + 60)[0]))
        finally:
            process.terminate()
            process.wait(30)
    return {"checks": len(delays), "median_s": delays[len(delays) // 2],
            "p90_s": delays[int(0.9 * len(delays))], "max_s": delays[-1],
            "statuses": statuses, "time": time.strftime("%Y-%m-%d %H:%M UTC", time.gmtime())}


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="a smaller load, 10 s")
    args = parser.parse_args()
    counts = (6, 12, 10.0) if args.quick else (40, 40, 60.0)
    print(json.dumps(run(*counts), indent=1))


if __name__ == "__main__":
    main()
