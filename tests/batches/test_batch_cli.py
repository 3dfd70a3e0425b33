"""``coldseam batch``: a CSV schedule or a JSON batch, in-process on local workers or through a
server (``--url``), results as CSV or XLSX, progress as a bar or as plain lines."""

from __future__ import annotations

import csv
import io
import json
import socket
import threading
import time

import pytest
import uvicorn
from batch_support import FAKE
from openpyxl import load_workbook

from coldseam.api.main import create_app
from coldseam.batch_cli import Progress
from coldseam.cli import main
from coldseam.settings import Settings

SCHEDULE = ("id,template,length,insulation_thickness,connection\n"
            "J2 slab edge,floor_slab,64,160,\n"
            "J4 balcony,balcony,12,,thermal_break\n"
            "J9 typo,floor_slab,5,1,\n")


@pytest.fixture
def fake_engine(monkeypatch):
    monkeypatch.setenv("COLDSEAM_ENGINE", FAKE)
    monkeypatch.setenv("COLDSEAM_WORKERS", "1")


def _rows(path):
    return list(csv.reader(io.StringIO(path.read_text())))


def test_a_csv_schedule_runs_in_process_and_writes_csv(tmp_path, fake_engine, capsys):
    schedule = tmp_path / "schedule.csv"
    schedule.write_text(SCHEDULE)
    out = tmp_path / "results.csv"
    code = main(["batch", str(schedule), "--out", str(out)])
    printed = capsys.readouterr()
    assert code == 1  # one item failed: the table is written all the same
    rows = _rows(out)
    assert [row[0] for row in rows[1:4]] == ["J2 slab edge", "J4 balcony", "J9 typo"]
    assert [row[2] for row in rows[1:4]] == ["done", "done", "failed"]
    assert "/items/2/parameters/insulation_thickness" in rows[3][11]
    psi_l = [float(row[5]) for row in rows[1:3]]
    assert float(rows[4][5]) == pytest.approx(sum(psi_l), rel=1e-15)
    assert "Σ ψ·l" in printed.out and "competent person" in printed.out
    lines = printed.err.splitlines()  # not a terminal: one plain line per finished item
    assert len(lines) == 3 and all(line.split()[0] in ("1/3", "2/3", "3/3") for line in lines)
    assert "\r" not in printed.err


def test_a_json_batch_writes_xlsx_with_the_rows_of_the_csv(tmp_path, fake_engine, capsys):
    document = tmp_path / "grid.json"
    document.write_text(json.dumps({"grid": {"template": "eaves", "length": 2,
                                             "parameters": {"roof_pitch": [0, 15, 30]}}}))
    assert main(["batch", str(document), "--out", str(tmp_path / "r.csv"),
                 "--data-dir", str(tmp_path / "kept")]) == 0
    assert main(["batch", str(document), "--out", str(tmp_path / "r.xlsx"),
                 "--data-dir", str(tmp_path / "kept")]) == 0
    sheet = load_workbook(tmp_path / "r.xlsx").active
    xlsx = [["" if v is None else v for v in row] for row in sheet.iter_rows(values_only=True)]
    text = _rows(tmp_path / "r.csv")
    assert len(xlsx) == len(text) == 1 + 3 + 2
    for csv_row, xlsx_row in zip(text, xlsx, strict=True):
        assert [float(c) if isinstance(x, int | float) else c
                for c, x in zip(csv_row, xlsx_row, strict=True)] == xlsx_row
    assert [row[0] for row in xlsx[1:4]] == ["roof_pitch=0", "roof_pitch=15", "roof_pitch=30"]


def test_bad_input_is_refused_with_a_message(tmp_path, fake_engine, capsys):
    schedule = tmp_path / "s.csv"
    schedule.write_text("name,length\nJ1,3\n")
    assert main(["batch", str(schedule), "--out", str(tmp_path / "r.txt")]) == 2
    assert "--out must end in .csv or .xlsx" in capsys.readouterr().err
    assert main(["batch", str(schedule), "--out", str(tmp_path / "r.csv")]) == 2
    assert "no 'id' column" in capsys.readouterr().err
    assert not (tmp_path / "r.csv").exists()


class _Terminal(io.StringIO):
    def isatty(self) -> bool:
        return True


def test_on_a_terminal_progress_is_a_bar():
    stream = _Terminal()
    progress = Progress(4, stream)
    counts = {"queued": 1, "running": 1, "done": 2, "failed": 0}
    progress.show({"counts": counts, "items": []})
    progress.show({"counts": {**counts, "running": 0, "queued": 0, "done": 4}, "items": []})
    text = stream.getvalue()
    assert text.startswith("\r[" + "#" * 15 + "." * 15 + "] 2/4")
    assert text.endswith("] 4/4 (0 failed, 0 running)\n")


def _free_port() -> int:
    with socket.socket() as probe:
        probe.bind(("127.0.0.1", 0))
        return probe.getsockname()[1]


def test_with_url_the_batch_runs_on_that_server(tmp_path, capsys):
    settings = Settings(data_dir=tmp_path / "server", engine=FAKE, workers=1,
                        frontend_dir=None, api_keys="cli-key")
    port = _free_port()
    server = uvicorn.Server(uvicorn.Config(create_app(settings), host="127.0.0.1", port=port,
                                           log_level="warning"))
    thread = threading.Thread(target=server.run, daemon=True)
    thread.start()
    try:
        while not server.started:
            time.sleep(0.05)
        schedule = tmp_path / "schedule.csv"
        schedule.write_text(SCHEDULE)
        url = f"http://127.0.0.1:{port}"
        assert main(["batch", str(schedule), "--out", str(tmp_path / "r.csv"), "--url", url,
                     "--key", "wrong"]) == 2
        assert "401" in capsys.readouterr().err
        assert main(["batch", str(schedule), "--out", str(tmp_path / "r.csv"), "--url", url,
                     "--key", "cli-key"]) == 1
        rows = _rows(tmp_path / "r.csv")
        assert [row[2] for row in rows[1:4]] == ["done", "done", "failed"]
    finally:
        server.should_exit = True
        thread.join(20)
