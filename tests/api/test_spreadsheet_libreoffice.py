"""The value endpoint called from a real spreadsheet program: LibreOffice Calc (Debian's
``libreoffice-calc``), headless, against a real ``coldseam serve`` on loopback.

A Basic macro (run by ``soffice --headless macro:///...``) opens a new sheet, types the
formulas a user would (``=WEBSERVICE(url & A1)`` and ``=VALUE(B1)``), recalculates and writes
what the cells show to a file; the test compares that with the API's own answer.

LibreOffice refuses WEBSERVICE in a document it *opens* until the user allows link updates
(the cells show Err:540 "external content disabled"; headless there is no one to allow it), so
the formulas are entered into a new sheet, as when a user types them.
"""

from __future__ import annotations

import shutil
import subprocess
import time
from pathlib import Path
from xml.sax.saxutils import escape

import httpx
import pytest
from test_api_server import _free_port, _serve

pytestmark = pytest.mark.slow

VALUE_PATH = "/api/v1/templates/wall_corner/value?quantity=psi&insulation_thickness="
#: (what A holds, query after the thickness) per row; B = WEBSERVICE, C = VALUE(B).
ROWS = [("160", ""), ("\"160,5\"", ""), ("5", "&errors=inline"), ("5", "")]


def _soffice() -> str:
    found = shutil.which("soffice")
    assert found, ("LibreOffice is missing: install Debian's libreoffice-calc (scripts/test.sh "
                   "does so when run as root); this test shows the spreadsheet path works")
    return found


def _macro(base: str) -> str:
    lines = ["Sub Main",
             "  Dim args(0) As New com.sun.star.beans.PropertyValue",
             "  args(0).Name = \"Hidden\"", "  args(0).Value = True",
             "  doc = StarDesktop.loadComponentFromURL(\"private:factory/scalc\", \"_blank\", 0,"
             " args())",
             "  sheet = doc.Sheets.getByIndex(0)"]
    for row, (given, extra) in enumerate(ROWS):
        url = f'"{base}{VALUE_PATH}"&A{row + 1}&"{extra}"'
        for column, formula in ((0, f"={given}"), (1, f"=WEBSERVICE({url})"),
                                (2, f"=VALUE(B{row + 1})")):
            literal = formula.replace('"', '""')
            lines.append(f"  sheet.getCellByPosition({column}, {row}).setFormula(\"{literal}\")")
    lines += ["  doc.calculateAll()", "  f = FreeFile",
              "  Open Environ(\"COLDSEAM_SHEET_OUT\") For Output As #f",
              f"  For r = 0 To {len(ROWS) - 1}",
              "    b = sheet.getCellByPosition(1, r)", "    c = sheet.getCellByPosition(2, r)",
              "    Print #f, b.getString() & \"|\" & b.getError() & \"|\" & c.getValue() & \"|\" & "
              "c.getError()",
              "  Next r", "  Close #f", "  doc.close(True)", "  StarDesktop.terminate()",
              "End Sub"]
    return "\n".join(lines) + "\n"


def _install_macro(profile: Path, body: str) -> None:
    module = profile / "user" / "basic" / "Standard" / "Module1.xba"
    assert module.exists(), "LibreOffice did not create its user profile"
    module.write_text(
        '<?xml version="1.0" encoding="UTF-8"?>\n<!DOCTYPE script:module PUBLIC '
        '"-//OpenOffice.org//DTD OfficeDocument 1.0//EN" "module.dtd">\n<script:module '
        'xmlns:script="http://openoffice.org/2000/script" script:name="Module1" '
        f'script:language="StarBasic">{escape(body)}</script:module>', encoding="utf-8")


def test_a_calc_sheet_gets_the_value_endpoints_numbers(tmp_path):
    soffice = _soffice()
    profile, out = tmp_path / "lo-profile", tmp_path / "cells.txt"
    environment = {"PATH": "/usr/bin:/bin", "HOME": str(tmp_path),
                   "COLDSEAM_SHEET_OUT": str(out), "LC_ALL": "C.UTF-8"}
    where = f"-env:UserInstallation={profile.as_uri()}"
    subprocess.run([soffice, "--headless", where, "--terminate_after_init"], env=environment,
                   timeout=60, check=True, capture_output=True)
    port = _free_port()
    with _serve(tmp_path / "data", port, tmp_path / "server.log") as base:
        _install_macro(profile, _macro(base))
        started = time.monotonic()
        subprocess.run([soffice, "--headless", where, "macro:///Standard.Module1.Main"],
                       env=environment, timeout=60, check=True, capture_output=True)
        assert time.monotonic() - started < 60
        api = [httpx.get(f"{base}{VALUE_PATH}{t}", timeout=60) for t in ("160", "160.5")]
        inline = httpx.get(f"{base}{VALUE_PATH}5&errors=inline", timeout=60)
    cells = [line.split("|") for line in out.read_text(encoding="utf-8").splitlines()]
    assert len(cells) == len(ROWS), cells
    for row, answer in zip(cells[:2], api, strict=True):
        assert answer.status_code == 200
        shown, error, value, value_error = row
        assert (error, value_error) == ("0", "0"), row
        assert shown == answer.text  # the cell shows the service's text...
        assert float(value) == float(answer.text)  # ...and VALUE() reads it as that number
    assert cells[0][2] != cells[1][2]  # 160 and "160,5" (a decimal comma) differ
    shown, error, _, value_error = cells[2]
    assert error == "0" and shown == inline.text.strip()
    assert shown.startswith("error: /parameters/insulation_thickness: insulation_thickness "
                            "must be between")
    assert value_error != "0"  # VALUE() of the message is an error, as it should be
    assert cells[3][1] != "0"  # without errors=inline the cell shows only an error code
