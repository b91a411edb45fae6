"""Recalculate a workbook copy in LibreOffice through UNO and report every formula's value.

Run with the system Python that has the ``uno`` module (Debian's python3-uno), not the venv::

    /usr/bin/python3 tests/uno_crosscheck.py JOB.json

``JOB.json`` holds:

- ``book``: path of a COPY of the workbook (it is opened, never saved);
- ``profile``: a private LibreOffice profile folder (``-env:UserInstallation``);
- ``writes``: ``[[sheet, "A1:B9", [[v, ...], ...]], ...]`` — values to put in place of the
  ERRDIST_ formulas, which LibreOffice does not know (it shows ``#NAME?`` for them): each
  range's array formula is removed first, then the values are written;
- ``reads``: ``[[sheet, "A1"], ...]`` — cells to read after ``calculateAll()``;
- ``pdf`` (optional): export the recalculated copy to this PDF file (the ``calc_pdf_Export``
  filter that ``soffice --convert-to pdf`` uses), so the charts are drawn from the filled-in
  values rather than from ``#NAME?`` cells;
- ``out``: where to write the result JSON: ``{"values": [[sheet, a1, kind, value], ...],
  "version": "..."}`` with kind ``"value"`` (a full double), ``"text"``, ``"error"`` (the
  error number) or ``"empty"``.

The script starts its own headless LibreOffice listening on a private pipe and stops it at
the end.
"""

from __future__ import annotations

import importlib.util
import json
import os
import subprocess
import sys
import uuid
from pathlib import Path

import uno  # type: ignore[import-not-found]  # noqa: F401 - fail early without python3-uno

# The UNO connection helpers are the package's own (errdist/libreoffice/uno_recalc.py), loaded
# by file path: the system Python that has ``uno`` need not have errdist's dependencies.
_HELPER = Path(__file__).resolve().parents[1] / "udfs" / "errdist" / "libreoffice" / "uno_recalc.py"
_spec = importlib.util.spec_from_file_location("errdist_uno_recalc", _HELPER)
_uno_recalc = importlib.util.module_from_spec(_spec)  # type: ignore[arg-type]
_spec.loader.exec_module(_uno_recalc)  # type: ignore[union-attr]
_prop = _uno_recalc._prop
_connect = _uno_recalc._connect


def _cell_value(cell) -> list[object]:
    from com.sun.star.table.CellContentType import EMPTY, FORMULA, TEXT  # noqa: N811

    t = cell.getType()
    if t == EMPTY:
        return ["empty", None]
    if cell.getError() != 0:
        return ["error", cell.getError()]
    if t == TEXT:
        return ["text", cell.getString()]
    if t == FORMULA:
        # FormulaResultType2: com.sun.star.sheet.FormulaResult VALUE=1, STRING=2, ERROR=4
        kind = cell.FormulaResultType2
        if kind == 2:
            return ["text", cell.getString()]
        if kind == 4:
            return ["error", cell.getError()]
    return ["value", cell.getValue()]


def main(job_path: str) -> int:
    with open(job_path, encoding="utf-8") as fh:
        job = json.load(fh)
    pipe = f"errdist_{uuid.uuid4().hex}"
    profile = "file://" + os.path.abspath(job["profile"])
    proc = subprocess.Popen(
        [
            "soffice",
            "--headless",
            "--invisible",
            "--norestore",
            "--nologo",
            "--nodefault",
            f"-env:UserInstallation={profile}",
            f"--accept=pipe,name={pipe};urp;",
        ],
        stdout=subprocess.DEVNULL,
        stderr=subprocess.DEVNULL,
    )
    try:
        ctx = _connect(pipe, proc)
        smgr = ctx.ServiceManager
        desktop = smgr.createInstanceWithContext("com.sun.star.frame.Desktop", ctx)
        url = uno.systemPathToFileUrl(os.path.abspath(job["book"]))
        doc = desktop.loadComponentFromURL(url, "_blank", 0, (_prop("Hidden", True),))
        sheets = doc.getSheets()
        for sheet, ref, rows in job["writes"]:
            rng = sheets.getByName(sheet).getCellRangeByName(ref)
            if rng.getArrayFormula():
                rng.setArrayFormula("")
            data = tuple(
                tuple("" if v is None else (float(v) if isinstance(v, bool) else v) for v in row)
                for row in rows
            )
            rng.setDataArray(data)
        doc.calculateAll()
        out = []
        for sheet, a1 in job["reads"]:
            cell = sheets.getByName(sheet).getCellRangeByName(a1)
            out.append([sheet, a1, *_cell_value(cell)])
        provider = smgr.createInstanceWithContext(
            "com.sun.star.configuration.ConfigurationProvider", ctx
        )
        node = provider.createInstanceWithArguments(
            "com.sun.star.configuration.ConfigurationAccess",
            (_prop("nodepath", "/org.openoffice.Setup/Product"),),
        )
        version = f"{node.getByName('ooName')} {node.getByName('ooSetupVersionAboutBox')}"
        if job.get("pdf"):
            pdf_url = uno.systemPathToFileUrl(os.path.abspath(job["pdf"]))
            doc.storeToURL(pdf_url, (_prop("FilterName", "calc_pdf_Export"),))
        doc.close(True)
        with open(job["out"], "w", encoding="utf-8") as fh:
            json.dump({"values": out, "version": version}, fh)
        try:
            desktop.terminate()
        except Exception:  # noqa: BLE001 - the bridge drops as soffice exits
            pass
    finally:
        try:
            proc.wait(timeout=20)
        except subprocess.TimeoutExpired:
            proc.kill()
            proc.wait()
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1]))
