"""Open a workbook in headless LibreOffice, recalculate it and read every formula cell.

Run by :mod:`errdist.libreoffice.recalc` with the Python that has LibreOffice's ``uno`` module
(Debian: ``/usr/bin/python3`` with python3-uno), not errdist's environment; it needs nothing
but the standard library and ``uno``::

    /usr/bin/python3 uno_recalc.py JOB.json

``JOB.json`` holds ``book`` (a COPY: it is opened and never saved), ``profile`` (a private
profile folder, ``-env:UserInstallation``), ``out`` (the result JSON) and optionally ``pdf``
(export the recalculated book to this PDF).

The result is ``{"version": "...", "cells": [[sheet, "A1", kind, value], ...],
"timings": {...}}`` for every formula cell, with kind ``"value"`` (a full double),
``"text"``, ``"error"`` (LibreOffice's error number) or ``"empty"``.

LibreOffice is started on a private pipe (no TCP port), stopped through UNO at the end and
killed by its process id if it does not exit.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import time
import uuid

import uno  # type: ignore[import-not-found]
from com.sun.star.beans import PropertyValue  # type: ignore[import-not-found]

_FORMULA = 16  # com.sun.star.sheet.CellFlags.FORMULA
_RESULT_ERROR = 4  # com.sun.star.sheet.FormulaResult.ERROR


def _prop(name: str, value: object) -> PropertyValue:
    p = PropertyValue()
    p.Name = name
    p.Value = value
    return p


def _connect(pipe: str, proc: subprocess.Popen, timeout: float = 90.0):
    local = uno.getComponentContext()
    resolver = local.ServiceManager.createInstanceWithContext(
        "com.sun.star.bridge.UnoUrlResolver", local
    )
    deadline = time.time() + timeout
    while True:
        try:
            return resolver.resolve(f"uno:pipe,name={pipe};urp;StarOffice.ComponentContext")
        except Exception:  # noqa: BLE001 - NoConnectException until soffice listens
            if proc.poll() is not None:
                raise RuntimeError(f"LibreOffice exited early (code {proc.returncode})") from None
            if time.time() > deadline:
                raise RuntimeError("LibreOffice did not start listening in time") from None
            time.sleep(0.2)


def _col(c: int) -> str:
    s = ""
    c += 1
    while c:
        c, r = divmod(c - 1, 26)
        s = chr(65 + r) + s
    return s


def _addresses(ranges) -> list:
    return list(ranges.getRangeAddresses()) if ranges is not None else []


def _read_sheet(sheet) -> list[list[object]]:
    name = sheet.getName()
    out: dict[tuple[int, int], list[object]] = {}
    for a in _addresses(sheet.queryContentCells(_FORMULA)):
        rng = sheet.getCellRangeByPosition(a.StartColumn, a.StartRow, a.EndColumn, a.EndRow)
        for i, row in enumerate(rng.getDataArray()):
            for j, v in enumerate(row):
                r, c = a.StartRow + i, a.StartColumn + j
                if v is None:  # error results (filled in below)
                    out[(r, c)] = ["empty", None]
                elif isinstance(v, str):
                    out[(r, c)] = ["text", v] if v != "" else ["empty", None]
                else:
                    out[(r, c)] = ["value", float(v)]
    for a in _addresses(sheet.queryFormulaCells(_RESULT_ERROR)):
        for r in range(a.StartRow, a.EndRow + 1):
            for c in range(a.StartColumn, a.EndColumn + 1):
                out[(r, c)] = ["error", sheet.getCellByPosition(c, r).getError()]
    return [[name, f"{_col(c)}{r + 1}", *kv] for (r, c), kv in sorted(out.items())]


def _version(smgr, ctx) -> str:
    provider = smgr.createInstanceWithContext(
        "com.sun.star.configuration.ConfigurationProvider", ctx
    )
    node = provider.createInstanceWithArguments(
        "com.sun.star.configuration.ConfigurationAccess",
        (_prop("nodepath", "/org.openoffice.Setup/Product"),),
    )
    return f"{node.getByName('ooName')} {node.getByName('ooSetupVersionAboutBox')}"


def main(job_path: str) -> int:
    with open(job_path, encoding="utf-8") as fh:
        job = json.load(fh)
    timings: dict[str, float] = {}
    t0 = time.perf_counter()
    pipe = f"errdist_{uuid.uuid4().hex}"
    profile = uno.systemPathToFileUrl(os.path.abspath(job["profile"]))
    proc = subprocess.Popen(
        [
            job.get("soffice", "soffice"),
            "--headless",
            "--invisible",
            "--norestore",
            "--nologo",
            "--nodefault",
            "--nolockcheck",
            f"-env:UserInstallation={profile}",
            f"--accept=pipe,name={pipe};urp;",
        ],
        stdout=subprocess.DEVNULL,
        stderr=subprocess.DEVNULL,
        stdin=subprocess.DEVNULL,
    )
    desktop = None
    try:
        ctx = _connect(pipe, proc)
        smgr = ctx.ServiceManager
        desktop = smgr.createInstanceWithContext("com.sun.star.frame.Desktop", ctx)
        t1 = time.perf_counter()
        timings["start"] = t1 - t0
        url = uno.systemPathToFileUrl(os.path.abspath(job["book"]))
        doc = desktop.loadComponentFromURL(url, "_blank", 0, (_prop("Hidden", True),))
        if doc is None:
            raise RuntimeError("LibreOffice could not open the workbook")
        t2 = time.perf_counter()
        timings["load"] = t2 - t1
        doc.calculateAll()
        t3 = time.perf_counter()
        timings["calculate"] = t3 - t2
        cells = []
        for sheet in doc.getSheets():
            cells += _read_sheet(sheet)
        t4 = time.perf_counter()
        timings["read"] = t4 - t3
        if job.get("pdf"):
            pdf_url = uno.systemPathToFileUrl(os.path.abspath(job["pdf"]))
            doc.storeToURL(pdf_url, (_prop("FilterName", "calc_pdf_Export"),))
        timings["export"] = time.perf_counter() - t4
        version = _version(smgr, ctx)
        doc.close(True)
        with open(job["out"], "w", encoding="utf-8") as fh:
            json.dump({"cells": cells, "version": version, "timings": timings}, fh)
    finally:
        if desktop is not None:
            try:
                desktop.terminate()
            except Exception:  # noqa: BLE001 - the bridge drops as soffice exits
                pass
        try:
            proc.wait(timeout=30)
        except subprocess.TimeoutExpired:
            proc.kill()
            proc.wait()
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1]))
