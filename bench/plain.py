"""Issue 17's targets in one run: ``python bench/plain.py [--quick]``.

Side by side, on the plain pip install path (``COLDSEAM_CHOLMOD=0``: no scikit-sparse, so the
direct solver is QDLDL, a regular dependency) and with the optional extras (CHOLMOD) when they
are installed:

1. the Case-2-class section (examples/iso10211-case2.json: thin metal layers in insulation,
   4 materials, 500 × 47.5 mm), certified to 0.1 % of the heat flow (0.0095 W/m here) and
   0.01 K, warm over HTTP (``coldseam serve``, sequential POSTs, every one a new request) and in
   the process (the engine's own time), and the same with ``options.accuracy: "iso"``;
2. every template junction at its defaults, full default evaluation, warm over HTTP (p50);
3. the service path's share: HTTP minus the engine in process, and its parts measured alone
   (validation, store writes, the worker hand-off, the answer's JSON);
4. the peer pipeline (bench/peer.py) on the same section, halving its uniform size until it is
   within 0.01 W/m and 0.01 K of the cached fine reference (bench/reference.py), once per mode.

Prints the table and writes bench/latest-plain.md (``--out`` to change). The machine's load
average is recorded at the start and end: on the shared 2-core machine compare within a run.
"""

from __future__ import annotations

import argparse
import json
import logging
import os
import statistics
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

import overhead  # noqa: E402
import peer  # noqa: E402
from reference import errors, reference  # noqa: E402
from sections import template_sections  # noqa: E402

import service  # noqa: E402

CASE_2 = HERE.parent / "examples" / "iso10211-case2.json"
FLOW_ACCURACY, TEMPERATURE_ACCURACY = 0.01, 0.01  # W/m, K: what a practitioner asks for
MODES = {"plain": {"COLDSEAM_CHOLMOD": "0"}, "extras": {}}


def case_2(accuracy: str = "default") -> dict:
    request = json.loads(CASE_2.read_text())
    if accuracy != "default":
        request["options"] = {"accuracy": accuracy}
    return request


def _named(request: dict, tag: str) -> dict:
    """A copy with a unique section name: a new request, never answered from the store."""
    out = json.loads(json.dumps(request))
    out["section"]["name"] = f"{out['section'].get('name', '')} [{tag} {time.time_ns()}]"
    return out


def in_process(requests: list[dict], repeats: int) -> dict:
    """The engine's own time (median over ``repeats`` rounds of every request, warm)."""
    from coldseam.schema import parse_request
    from coldseam.thermal.evaluate import evaluate

    parsed = [parse_request(r) for r in requests]
    for p in parsed:
        evaluate(p)
    times, cpu, last = [], [], None
    for _ in range(repeats):
        for p in parsed:
            start, start_cpu = time.perf_counter(), time.process_time()
            last = evaluate(p).result
            times.append(time.perf_counter() - start)
            cpu.append(time.process_time() - start_cpu)
    mesh = last["mesh"]
    return {"median": statistics.median(times), "min": min(times), "count": len(times),
            "cpu": statistics.median(cpu),
            "levels": [level["nodes"] for level in mesh["levels"]], "dofs": mesh["dofs"],
            "target_met": mesh["target_met"], "result": last}


def _cpu_seconds(pid: int) -> float:
    """User + system CPU seconds of process ``pid`` so far (0 when it is gone)."""
    try:
        fields = Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()
    except OSError:
        return 0.0
    return (int(fields[11]) + int(fields[12])) / os.sysconf("SC_CLK_TCK")


def _descendants(pid: int) -> list[int]:
    """Every process below ``pid`` (the workers may be children of a fork server)."""
    children = []
    for task in Path(f"/proc/{pid}/task").glob("*"):  # a child belongs to the thread that made it
        try:
            children += [int(c) for c in (task / "children").read_text().split()]
        except OSError:
            continue
    return children + [d for c in children for d in _descendants(c)]


def over_http(base: str, requests: list[dict], repeats: int, server_pid: int) -> dict:
    """Wall time per POST at the client, and CPU time per evaluation of the server process
    and of its workers (summed over the run: /proc counts in 10 ms ticks). On a busy machine
    wall time includes waiting for a core; CPU time does not."""
    import httpx

    times = []
    with httpx.Client() as client:
        service._post(client, base, _named(requests[0], "warm"))
        workers = _descendants(server_pid)
        server, worker = _cpu_seconds(server_pid), sum(map(_cpu_seconds, workers))
        for k in range(repeats):
            for request in requests:
                seconds, status = service._post(client, base, _named(request, f"r{k}"))
                if status != 200:
                    raise RuntimeError(f"POST answered {status}")
                times.append(seconds)
        server = (_cpu_seconds(server_pid) - server) / len(times)
        worker = (sum(map(_cpu_seconds, workers)) - worker) / len(times)
    times.sort()
    return {"median": statistics.median(times), "p95": times[int(0.95 * (len(times) - 1))],
            "min": times[0], "count": len(times), "server_cpu": server, "worker_cpu": worker}


def figures(result: dict) -> dict:
    interior = [k for k, s in result["surfaces"].items() if s["side"] == "interior"]
    return {"heat_flow": sum(result["heat_flows"][k] for k in interior),
            "theta_si_min": min(result["surfaces"][k]["min_temperature"] for k in interior),
            "probes": result.get("probes") or {}}


def peer_at_accuracy(ref: dict, repeats: int) -> dict:
    """The peer's first halved size within 0.01 W/m and 0.01 K; its median time there."""
    def within(f: dict) -> bool:
        err = errors(f, ref)
        return err["heat_flow"] <= FLOW_ACCURACY and err["theta_si_min"] <= TEMPERATURE_ACCURACY

    run = peer.to_accuracy(case_2(), within, max_seconds=60)
    final = run["final"]
    conductivity = peer._conductivities(case_2())
    times, cpu = [], []
    for _ in range(repeats):
        start = time.process_time()
        times.append(peer.solve(case_2(), final["size"], conductivity)["seconds"])
        cpu.append(time.process_time() - start)
    return {"met": run["met"], "seconds": statistics.median(times), "nodes": final["nodes"],
            "cpu": statistics.median(cpu), "size_mm": final["size"] * 1e3,
            "errors": errors(final, ref)}


def mode_rows(mode: str, env: dict, repeats: int, ref: dict) -> dict:
    saved = {k: os.environ.get(k) for k in env}
    os.environ.update(env)
    try:
        templates = list(template_sections().values())
        out = {"engine": {"case_2": in_process([case_2()], repeats),
                          "case_2_iso": in_process([case_2("iso")], repeats),
                          "templates": in_process(templates, max(1, repeats // 3))}}
        for key in ("case_2", "case_2_iso"):
            result = out["engine"][key].pop("result")
            out["engine"][key]["errors"] = errors(figures(result), ref)
        out["engine"]["templates"].pop("result")
        with tempfile.TemporaryDirectory() as folder:
            process, base = service._start(folder, 2, env)
            try:
                pid = process.pid
                out["http"] = {"case_2": over_http(base, [case_2()], repeats, pid),
                               "case_2_iso": over_http(base, [case_2("iso")], repeats, pid),
                               "templates": over_http(base, templates, max(1, repeats // 3),
                                                      pid)}
            finally:
                process.terminate()
                process.wait(timeout=30)
        out["peer"] = peer_at_accuracy(ref, 5)
    finally:
        for k, v in saved.items():
            if v is None:
                os.environ.pop(k, None)
            else:
                os.environ[k] = v
    return out


def _http_cpu(mode: dict, key: str) -> float:
    return mode["http"][key]["server_cpu"] + mode["http"][key]["worker_cpu"]


def _service_cpu(mode: dict, key: str) -> float:
    http, engine = mode["http"][key], mode["engine"][key]
    return http["server_cpu"] + http["worker_cpu"] - engine["cpu"]


def available_modes() -> dict:
    try:
        import sksparse.cholmod  # noqa: F401
    except ImportError:
        return {"plain": MODES["plain"]}
    return MODES


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="fewer repeats")
    parser.add_argument("--out", default=str(HERE / "latest-plain.md"))
    args = parser.parse_args(argv)
    logging.basicConfig(level=logging.INFO, format="%(message)s")
    logging.getLogger("httpx").setLevel(logging.WARNING)
    logging.getLogger("skfem").setLevel(logging.WARNING)
    repeats = 5 if args.quick else 15
    data: dict = {"date": time.strftime("%Y-%m-%d %H:%M UTC", time.gmtime()),
                  "load_at_start": os.getloadavg(), "repeats": repeats}
    ref = reference("case_2", case_2())
    data["modes"] = {m: mode_rows(m, env, repeats, ref) for m, env in available_modes().items()}
    data["overhead_parts"] = overhead.parts(case_2(), 30 if args.quick else 100)
    data["load_at_end"] = os.getloadavg()
    (HERE / "results").mkdir(exist_ok=True)
    (HERE / "results" / f"plain-{time.strftime('%Y%m%d-%H%M%S')}.json").write_text(
        json.dumps(data, indent=1))
    text = markdown(data)
    print(text)
    Path(args.out).write_text(text)
    return 0


def _ms(seconds: float) -> str:
    return f"{seconds * 1e3:.0f} ms"


def markdown(data: dict) -> str:
    start, end = data["load_at_start"], data["load_at_end"]
    lines = [
        "# Issue 17 targets: the plain install and the accuracy users ask for",
        "",
        f"`python bench/plain.py` — {data['date']}, shared 2-core machine, load average "
        f"{start[0]:.2f} / {start[1]:.2f} / {start[2]:.2f} at the start, {end[0]:.2f} at the "
        f"end; medians of {data['repeats']} runs (templates: every template in turn). "
        "plain = `pip install -e .` (QDLDL, no CHOLMOD; forced by COLDSEAM_CHOLMOD=0), "
        "extras = with scikit-sparse's CHOLMOD.",
        "",
        "| | target | " + " | ".join(data["modes"]) + " |",
        "|---|---|" + "---|" * len(data["modes"]),
    ]
    modes = data["modes"].values()

    def row(label: str, target: str, cell) -> None:
        lines.append(f"| {label} | {target} | " + " | ".join(cell(m) for m in modes) + " |")

    row("Case 2, certified (0.1 % = 0.0095 W/m, 0.01 K), warm over HTTP, median", "≤ 80 ms",
        lambda m: f"{_ms(m['http']['case_2']['median'])} (p95 {_ms(m['http']['case_2']['p95'])})")
    row("the same, engine in process (CPU)", "",
        lambda m: f"{_ms(m['engine']['case_2']['median'])} ({_ms(m['engine']['case_2']['cpu'])})")
    row("Case 2 levels (nodes), P2 dofs", "", lambda m: f"{m['engine']['case_2']['levels']}, "
        f"{m['engine']['case_2']['dofs']}")
    row("Case 2 errors against the reference: heat flow W/m, θsi,min K", "≤ 0.01, ≤ 0.01",
        lambda m: f"{m['engine']['case_2']['errors']['heat_flow']:.1e}, "
        f"{m['engine']['case_2']['errors']['theta_si_min']:.1e}")
    row("peer within 0.01 W/m and 0.01 K (nodes, uniform size)", "",
        lambda m: f"{_ms(m['peer']['seconds'])}, CPU {_ms(m['peer']['cpu'])} "
        f"({m['peer']['nodes']} nodes, {m['peer']['size_mm']:.3g} mm)"
        if m["peer"]["met"] else "not reached")
    row("Coldseam over HTTP against the peer: wall / CPU (server + workers)", "≥ 5× faster",
        lambda m: f"{m['peer']['seconds'] / m['http']['case_2']['median']:.1f}× / "
        f"{m['peer']['cpu'] / _http_cpu(m, 'case_2'):.1f}×")
    row("Case 2, accuracy \"iso\" (1 %, 0.1 K), over HTTP / in process", "cheaper than default",
        lambda m: f"{_ms(m['http']['case_2_iso']['median'])} / "
        f"{_ms(m['engine']['case_2_iso']['median'])}")
    row("Case 2 \"iso\" levels (nodes); errors W/m, K", "",
        lambda m: f"{m['engine']['case_2_iso']['levels']}; "
        f"{m['engine']['case_2_iso']['errors']['heat_flow']:.1e}, "
        f"{m['engine']['case_2_iso']['errors']['theta_si_min']:.1e}")
    row("template junctions, full default evaluation, over HTTP p50 (p95)", "≤ 100 ms",
        lambda m: f"{_ms(m['http']['templates']['median'])} "
        f"({_ms(m['http']['templates']['p95'])})")
    row("the same, engine in process, median (CPU)", "",
        lambda m: f"{_ms(m['engine']['templates']['median'])} "
        f"({_ms(m['engine']['templates']['cpu'])})")
    row("service path, wall: HTTP − engine in process, Case 2 / templates", "",
        lambda m: f"{_ms(m['http']['case_2']['median'] - m['engine']['case_2']['median'])} / "
        f"{_ms(m['http']['templates']['median'] - m['engine']['templates']['median'])}")
    row("CPU per evaluation over HTTP: server process + workers, Case 2", "",
        lambda m: f"{_ms(m['http']['case_2']['server_cpu'])} + "
        f"{_ms(m['http']['case_2']['worker_cpu'])}")
    row("service path, CPU: server + (workers − engine in process), Case 2 / templates",
        "≤ 15 ms", lambda m: " / ".join(_ms(_service_cpu(m, k)) for k in ("case_2", "templates")))
    lines += ["", "Parts of the service path, each measured alone in one process (Case 2, "
              "median):", "", "| part | time |", "|---|---|"]
    for name, value in data["overhead_parts"].items():
        shown = (" / ".join(f"{v / 1024:.0f} KiB" for v in value)
                 if isinstance(value, list | tuple) else f"{value * 1e3:.2f} ms")
        lines.append(f"| {name} | {shown} |")
    return "\n".join(lines) + "\n"


if __name__ == "__main__":
    sys.exit(main())
