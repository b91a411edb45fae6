"""Evaluating a workbook: load it into ``formulas``, calculate, collect every value.

The file is checked by :func:`errdist.workbook.safety.inspect_xlsx` and evaluated from a
private copy; every formula is scanned (:mod:`~errdist.workbook.engine.scan`) before anything
is compiled, and the values are collected cell by cell, spills included.
"""

from __future__ import annotations

import functools
import logging
import math
import os
import shutil
import tempfile
import time
from pathlib import Path
from typing import Any

import numpy as np

from errdist.workbook import safety
from errdist.workbook.engine.register import CAPTURE, formulas_runtime, register_functions
from errdist.workbook.engine.results import ERROR_CODES, EngineError, Evaluation, Problem
from errdist.workbook.engine.scan import (
    dynamic_anchors,
    formula_problems,
    mark_omitted_arguments,
    sheet_parts,
    strip_strings,
)

__all__ = ["evaluate_details", "evaluate_workbook"]


def _plain(value: Any, sh: Any) -> Any:
    """An engine value -> float / str / bool / None / error-code string."""
    if value is sh.EMPTY or value is None:
        return None
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, str):
        return str(value)  # XlError -> "#NUM!", text stays text
    if isinstance(value, (int, float, np.integer, np.floating)):
        v = float(value)
        return "#NUM!" if not math.isfinite(v) else v
    if isinstance(value, np.ndarray):
        return _plain(value.ravel()[0], sh) if value.size else None
    return value


@functools.lru_cache(maxsize=1)
def _model_class() -> type:
    """``formulas.ExcelModel`` that does not compile blank cells or non-anchor spill cells.

    ``ExcelModel.push`` parses every cell of the sheet's used rectangle into a ``Cell`` (about
    0.1 ms each), blanks included, and then drops the blanks (they add no node) and the cells
    inside an array/spill range (their values come from the anchor's formula). Skipping both
    before parsing gives the same model and saves most of the load time of a workbook with
    long columns.
    """
    import formulas
    import schedula as sh
    from openpyxl.utils.cell import range_boundaries

    class Model(formulas.ExcelModel):
        def push(self, worksheet: Any, context: Any) -> Any:
            worksheet, context = self.add_sheet(worksheet, context)
            references = self.references
            formula_references = self.formula_references(context)
            formula_ranges = self.formula_ranges(context)
            ctx = {"external_links": self.external_links(context)}
            ctx.update(context)
            covered: set[tuple[int, int]] = set()
            for anchor, ref in formula_references.items():
                min_col, min_row, max_col, max_row = range_boundaries(ref)
                covered.update(
                    (r, c) for r in range(min_row, max_row + 1) for c in range(min_col, max_col + 1)
                )
                a_col, a_row = _col_row(anchor)
                covered.discard((a_row, a_col))
            cells = []
            for row in worksheet.iter_rows():
                for c in row:
                    if getattr(c, "value", None) is None or (c.row, c.column) in covered:
                        continue  # blank (adds nothing to the model) or filled by a spill
                    if c.data_type == "f":
                        _mark_cell(c)
                    cells.append(self.compile_cell(c, ctx, references, formula_references))
            for cell in cells:
                self.add_cell(sh.await_result(cell), ctx, formula_ranges)
            return self

    return Model


def _mark_cell(cell: Any) -> None:
    """Apply :func:`mark_omitted_arguments` to an openpyxl formula cell in place."""
    value = cell.value
    if isinstance(value, str):
        marked = mark_omitted_arguments(value)
        if marked != value:
            cell.value = marked
    elif hasattr(value, "text") and isinstance(value.text, str):
        value.text = mark_omitted_arguments(value.text)


class _ProblemLog(logging.Handler):
    def __init__(self) -> None:
        super().__init__(logging.WARNING)
        self.records: list[str] = []

    def emit(self, record: logging.LogRecord) -> None:
        self.records.append(record.getMessage().replace("\n", " ").strip())


def _col_row(coord: str) -> tuple[int, int]:
    from openpyxl.utils.cell import column_index_from_string, coordinate_from_string

    col, row = coordinate_from_string(coord)
    return column_index_from_string(col), row


def evaluate_details(path: str | os.PathLike[str]) -> Evaluation:
    """Evaluate every formula of a workbook and return values, problems and timings.

    Parameters
    ----------
    path : path-like
        The .xlsx workbook (checked by :func:`errdist.workbook.safety.inspect_xlsx` first).

    Returns
    -------
    Evaluation
        See :class:`Evaluation`. Never raises for unsupported formulas: they are listed in
        ``problems`` (use :func:`evaluate_workbook` to raise).
    """
    from openpyxl.utils.cell import get_column_letter, range_boundaries

    ev = Evaluation()
    t0 = time.perf_counter()
    safety.inspect_xlsx(path)
    safety.defuse_xml()
    functions, _array, _error, sh = formulas_runtime()
    register_functions()  # the catalog's functions (cheap when already registered)

    def known(name: str) -> bool:
        return name in functions

    ev.timings["check"] = time.perf_counter() - t0
    handler = _ProblemLog()
    flog = logging.getLogger("formulas")
    flog.addHandler(handler)
    CAPTURE.messages, CAPTURE.failures = ev.messages, []
    try:
        with tempfile.TemporaryDirectory(prefix="errdist-engine-") as tmp:
            local = Path(tmp) / "book.xlsx"
            shutil.copyfile(path, local)
            parts = sheet_parts(local)
            dynamic = dynamic_anchors(local, parts)

            t1 = time.perf_counter()
            model = _model_class()()
            book, context = model.add_book(str(local))
            # Scan every formula before compiling anything.
            scans: list[tuple[str, str, str, str | None]] = []  # sheet, anchor, text, ref
            upper_to_sheet = {ws.title.upper(): ws.title for ws in book.worksheets}
            for ws in book.worksheets:
                for row in ws.iter_rows():
                    for c in row:
                        if getattr(c, "data_type", None) != "f":
                            continue
                        val = c.value
                        text = val if isinstance(val, str) else getattr(val, "text", "")
                        ref = None if isinstance(val, str) else getattr(val, "ref", None)
                        if text and not text.startswith("="):
                            text = "=" + text
                        scans.append((ws.title, c.coordinate, text, ref))
            for dn in getattr(book.defined_names, "values", lambda: [])():
                if "[" in strip_strings(str(dn.value)):
                    ev.problems.append(
                        Problem(
                            "",
                            "",
                            f"name {dn.name}",
                            "defined name refers to another workbook; not followed",
                        )
                    )
            blocked: set[tuple[str, str]] = set()
            for sheet, anchor, text, _ref in scans:
                reasons, volatile = formula_problems(text, known)
                if volatile:
                    ev.volatile.add((sheet, anchor))
                for reason in reasons:
                    ev.problems.append(Problem(sheet, anchor, text, reason))
                if any("another workbook" in r for r in reasons):
                    blocked.add((sheet, anchor))
            if blocked:
                # Never let formulas try to open another file: refuse before compiling.
                return ev
            model.pushes(*book.worksheets, context=context)
            t2 = time.perf_counter()
            ev.timings["load"] = t2 - t1
            model.finish()
            t3 = time.perf_counter()
            ev.timings["compile"] = t3 - t2
            solution = model.calculate()
            t4 = time.perf_counter()
            ev.timings["calculate"] = t4 - t3

            index: dict[tuple[str, int, int], tuple[str, Any]] = {}
            for out, cell in model.cells.items():
                if getattr(cell, "func", None) is None or cell.range is None:
                    continue
                rng = cell.range.ranges[0]
                sheet = upper_to_sheet.get(str(rng.get("sheet", "")).upper())
                if sheet is None:
                    continue
                index[(sheet, int(rng["r1"]), int(rng["n1"]))] = (out, rng)
            for sheet, anchor, text, ref in scans:
                col, row = _col_row(anchor)
                entry = index.get((sheet, row, col))
                if ref:
                    min_col, min_row, max_col, max_row = range_boundaries(ref)
                else:
                    min_col, min_row, max_col, max_row = col, row, col, row
                value = None
                if entry is not None:
                    value = solution.get(entry[0])
                if entry is None or value is None:
                    ev.problems.append(Problem(sheet, anchor, text, "not computed by the engine"))
                    arr = np.full((max_row - min_row + 1, max_col - min_col + 1), None, object)
                else:
                    arr = np.asarray(getattr(value, "value", value), dtype=object)
                    if arr.ndim < 2:
                        arr = np.atleast_2d(arr)
                cells = []
                for r in range(min_row, max_row + 1):
                    for c in range(min_col, max_col + 1):
                        i, j = r - min_row, c - min_col
                        v = arr[i, j] if i < arr.shape[0] and j < arr.shape[1] else None
                        cells.append((f"{get_column_letter(c)}{r}", _plain(v, sh)))
                is_dynamic = anchor in dynamic.get(sheet, set())
                if is_dynamic and len(cells) > 1:
                    first = cells[0][1]
                    if (
                        isinstance(first, str)
                        and first in ERROR_CODES
                        and all(v == first for _, v in cells)
                    ):
                        cells = [cells[0]] + [(k, None) for k, _ in cells[1:]]
                for coord, v in cells:
                    ev.values[(sheet, coord)] = v
                    ev.formulas[(sheet, coord)] = text
                    ev.anchors[(sheet, coord)] = anchor
            ev.timings["collect"] = time.perf_counter() - t4
    finally:
        flog.removeHandler(handler)
        failures = CAPTURE.failures or []
        CAPTURE.messages, CAPTURE.failures = None, None
    for msg in failures:
        ev.problems.append(Problem("", "", "", f"internal error in {msg}"))
    for msg in handler.records:
        ev.problems.append(Problem("", "", "", f"engine warning: {msg}"))
    return ev


def evaluate_workbook(path: str | os.PathLike[str]) -> dict[tuple[str, str], Any]:
    """Evaluate every formula of a workbook headlessly.

    Parameters
    ----------
    path : path-like
        The .xlsx workbook.

    Returns
    -------
    dict
        ``(sheet name, "A1") -> value`` for every formula cell, every cell of an array/spill
        range included: ``float``, ``str``, ``bool``, ``None`` (blank) or an error code string
        (``"#NUM!"``, ``"#VALUE!"``, ``"#N/A"``, ...).

    Raises
    ------
    EngineError
        When any formula cannot be evaluated faithfully (unsupported or unreliable function,
        reference to another workbook, an internal failure); the message lists the cells.
    safety.UnsafeFileError, FileNotFoundError
        When the file is refused (see :mod:`errdist.workbook.safety`).
    """
    ev = evaluate_details(path)
    if ev.problems:
        raise EngineError(ev.problems)
    return ev.values
