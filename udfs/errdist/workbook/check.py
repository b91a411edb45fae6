"""Audit a workbook: recompute every formula and compare with the stored values; compare its
formulas with the template's.

A saved .xlsx keeps, beside each formula, the value the spreadsheet last computed (the "cached"
value that every viewer shows). :func:`check_report` recomputes each formula cell and lists the
cells whose stored value differs. Two engines recompute:

- ``"formulas"`` (default): the headless engine (:mod:`errdist.workbook.engine`, PyPI
  ``formulas`` with the catalog registered), in this process;
- ``"libreoffice"``: LibreOffice Calc itself, headless, with errdist's Calc functions live
  (:mod:`errdist.libreoffice.recalc`): every built-in by Calc's own engine, every ERRDIST_
  function through the same Basic wrappers a Calc user has. ERRDIST_ failures there are coded
  texts (``#NUM! ...``); they agree with a stored error value of the same code. Calc has no
  logical type: a stored TRUE/FALSE agrees with 1/0. The cell of
  ``ERRDIST_VERSION()`` names the Python that computed it, so there only the errdist version
  is compared.

Recomputing cannot see a formula typed over with a number whose dependents agree; the report
therefore also lists the formulas overridden, deleted, changed or added against the template
the book was built from (:mod:`errdist.workbook.formula_map`).

Numbers agree when ``|a - b| <= tolerance * max(|a|, |b|)`` or ``|a - b| <= tolerance * 1e-3``
(the second clause accepts values that are zero up to rounding, e.g. ``2e-17`` against ``0``).
Text, logical values and error values must be equal; a blank stored value agrees with a blank
or empty-text result. Cells the engine cannot evaluate (unsupported functions) are reported as
mismatches with the reason, never skipped silently.
"""

from __future__ import annotations

import math
import os
import shutil
import tempfile
import time
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from errdist.workbook import engine as engine_module
from errdist.workbook import safety
from errdist.workbook.formula_map import FormulaChange, book_formulas, formula_changes

ENGINES: tuple[str, ...] = ("formulas", "libreoffice")
"""The engines :func:`check_report` can recompute with."""


@dataclass(frozen=True)
class Mismatch:
    """One formula cell whose stored value differs from its recomputation.

    Attributes
    ----------
    sheet, cell : str
        Where (``"Risk"``, ``"C7"``).
    formula : str
        The formula (of the anchor, for a cell of a spilled range).
    stored : object
        Value stored in the file (float, str, bool, None, or an error code).
    recomputed : object
        Value the headless engine computes (None when it cannot: see ``note``).
    rel_diff : float
        ``|a - b| / max(|a|, |b|)`` for numbers; ``inf`` for a change of type or text.
    note : str
        Why the cell could not be recomputed, or that its formula is volatile; "" otherwise.
    """

    sheet: str
    cell: str
    formula: str
    stored: Any
    recomputed: Any
    rel_diff: float
    note: str = ""

    def __str__(self) -> str:
        where = f"{self.sheet}!{self.cell}"
        if self.note and self.recomputed is None and self.rel_diff != self.rel_diff:
            return f"{where} {self.formula}: cannot recompute ({self.note})"
        diff = "" if math.isinf(self.rel_diff) else f"  rel diff {self.rel_diff:.1e}"
        note = f"  ({self.note})" if self.note else ""
        return (
            f"{where} {self.formula}: stored {_show(self.stored)}, "
            f"recomputed {_show(self.recomputed)}{diff}{note}"
        )


def _show(v: Any) -> str:
    if v is None:
        return "(blank)"
    if isinstance(v, float):
        return repr(v)
    if isinstance(v, str) and v not in engine_module.ERROR_CODES:
        return repr(v)
    return str(v)


def _is_number(v: Any) -> bool:
    return isinstance(v, (int, float)) and not isinstance(v, bool)


def compare_values(stored: Any, recomputed: Any, tolerance: float) -> float | None:
    """Relative difference when the two values disagree, None when they agree.

    See the module docstring for the rule; a change of type returns ``inf``.
    """
    blank = (None, "")
    if stored in blank and recomputed in blank:
        return None
    if _is_number(stored) and _is_number(recomputed):
        a, b = float(stored), float(recomputed)
        if a == b:
            return None
        diff = abs(a - b)
        scale = max(abs(a), abs(b))
        if diff <= tolerance * scale or diff <= tolerance * 1e-3:
            return None
        return diff / scale if scale > 0 else math.inf
    if type(stored) is bool or type(recomputed) is bool:
        return None if stored is recomputed else math.inf
    if isinstance(stored, str) and isinstance(recomputed, str) and stored == recomputed:
        return None
    return math.inf


def stored_values(path: str | os.PathLike[str]) -> dict[tuple[str, str], Any]:
    """The values stored in the file for every non-empty cell, ``(sheet, "A1") -> value``.

    Dates stay serial numbers (as the file stores them); error cells give their code.
    The file must already have passed :func:`errdist.workbook.safety.inspect_xlsx`.
    """
    from formulas.excel.xlreader import load_workbook

    safety.defuse_xml()
    book = load_workbook(str(path), data_only=True)
    out: dict[tuple[str, str], Any] = {}
    for ws in book.worksheets:
        for row in ws.iter_rows():
            for c in row:
                v = getattr(c, "value", None)
                if v is not None:
                    out[(ws.title, c.coordinate)] = v
    return out


@dataclass(frozen=True)
class CheckReport:
    """Result of :func:`check_report`.

    Attributes
    ----------
    mismatches : list of Mismatch
        Formula cells whose stored value differs from the recomputation (or that could not be
        recomputed).
    cells : int
        Formula cells compared (spill cells included).
    timings : dict
        Seconds per step.
    changes : list of FormulaChange or None
        Formulas overridden, deleted, changed or added against the template; None when the
        book was not built by errdist (nothing to compare with).
    engine : str
        What recomputed (``"formulas"`` or LibreOffice's name and version).
    """

    mismatches: list[Mismatch]
    cells: int
    timings: dict[str, float]
    changes: list[FormulaChange] | None = None
    engine: str = "formulas"


def check_workbook(path: str | os.PathLike[str], tolerance: float = 1e-9) -> list[Mismatch]:
    """Recompute every formula of a workbook and list the cells whose stored value differs.

    Same as ``check_report(path, tolerance).mismatches``; see :func:`check_report`.
    """
    return check_report(path, tolerance).mismatches


def check_report(
    path: str | os.PathLike[str],
    tolerance: float = 1e-9,
    *,
    engine: str = "formulas",
    venv: str | os.PathLike[str] | None = None,
) -> CheckReport:
    """Recompute every formula of a workbook, compare with the stored values, and compare its
    formulas with the template's.

    Parameters
    ----------
    path : path-like
        The .xlsx workbook (refused if unsafe, see :mod:`errdist.workbook.safety`).
    tolerance : float
        Relative tolerance for numbers (default 1e-9).
    engine : {"formulas", "libreoffice"}
        What recomputes (see the module docstring).
    venv : path-like, optional
        For ``engine="libreoffice"``: the virtual environment LibreOffice's Python uses
        (:func:`errdist.libreoffice.install.install`).

    Returns
    -------
    CheckReport
        ``mismatches`` is empty when every formula cell agrees; cells the engine cannot
        evaluate are included with ``recomputed=None``, ``rel_diff=nan`` and the reason in
        ``note``. ``cells`` counts the formula cells compared (spill cells included).

    Raises
    ------
    ValueError
        ``tolerance`` negative or not finite, or an unknown ``engine``.
    errdist.libreoffice.recalc.LibreOfficeUnavailable
        ``engine="libreoffice"`` without LibreOffice and its Python parts.
    safety.UnsafeFileError, FileNotFoundError
        The file is refused.
    """
    if not (isinstance(tolerance, (int, float)) and math.isfinite(tolerance) and tolerance >= 0):
        raise ValueError(f"tolerance must be a finite number >= 0, got {tolerance!r}")
    if engine not in ENGINES:
        raise ValueError(f"engine must be one of {', '.join(ENGINES)}, got {engine!r}")
    safety.inspect_xlsx(path)
    with tempfile.TemporaryDirectory(prefix="errdist-check-") as tmp:
        local = Path(tmp) / "book.xlsx"
        shutil.copyfile(path, local)
        t0 = time.perf_counter()
        book = book_formulas(local)
        changes = formula_changes(local, book)
        t1 = time.perf_counter()
        if engine == "libreoffice":
            report = _libreoffice_report(local, book, tolerance, venv)
        else:
            report = _formulas_report(local, tolerance)
    timings = {**report.timings, "formula map": t1 - t0}
    return CheckReport(report.mismatches, report.cells, timings, changes, report.engine)


def _formulas_report(local: Path, tolerance: float) -> CheckReport:
    """Recompute with the headless engine (``formulas``)."""
    ev = engine_module.evaluate_details(local)
    stored = stored_values(local)
    out: list[Mismatch] = []
    by_anchor: dict[tuple[str, str], list[engine_module.Problem]] = {}
    for p in ev.problems:
        by_anchor.setdefault((p.sheet, p.cell), []).append(p)
    for (sheet, cell), problems in by_anchor.items():
        if not cell:
            continue
        reason = "; ".join(p.reason for p in problems)
        formula = problems[0].formula
        out.append(
            Mismatch(sheet, cell, formula, stored.get((sheet, cell)), None, math.nan, reason)
        )
    for p in by_anchor.get(("", ""), []):
        out.append(Mismatch("(workbook)", "", p.formula, None, None, math.nan, p.reason))
    bad = {(m.sheet, m.cell) for m in out}
    for key, value in ev.values.items():
        anchor = (key[0], ev.anchors[key])
        if anchor in bad:
            continue
        s = stored.get(key)
        rel = compare_values(s, value, tolerance)
        if rel is not None:
            note = "volatile formula" if anchor in ev.volatile else ""
            out.append(Mismatch(key[0], key[1], ev.formulas[key], s, value, rel, note))
    return CheckReport(out, len(ev.values), dict(ev.timings))


def _coded_text_agrees(stored: Any, recomputed: Any) -> bool:
    """A stored error value and a coded text of the same code (``#NUM!`` / ``#NUM! ...``)."""
    return (
        isinstance(stored, str)
        and stored in engine_module.ERROR_CODES
        and isinstance(recomputed, str)
        and (recomputed == stored or recomputed.startswith(stored + " "))
    )


def _errdist_version(text: Any) -> Any:
    return str(text).split(";", 1)[0] if isinstance(text, str) else text


def _libreoffice_report(
    local: Path, book: Any, tolerance: float, venv: str | os.PathLike[str] | None
) -> CheckReport:
    """Recompute live in headless LibreOffice (:mod:`errdist.libreoffice.recalc`)."""
    from errdist.libreoffice.recalc import recalculate

    t0 = time.perf_counter()
    stored = stored_values(local)
    t1 = time.perf_counter()
    rec = recalculate(local, venv=venv)
    out: list[Mismatch] = []
    for key in book.formulas:
        if key not in rec.values:
            out.append(
                Mismatch(
                    *key,
                    "=" + book.formulas[key],
                    stored.get(key),
                    None,
                    math.nan,
                    "LibreOffice found no formula in this cell",
                )
            )
    for key, value in rec.values.items():
        formula = "=" + book.formulas.get(key, "?")
        s = stored.get(key)
        note = ""
        if formula == "=ERRDIST_VERSION()":
            s, value, note = _errdist_version(s), _errdist_version(value), "errdist version only"
        if _coded_text_agrees(s, value):
            continue
        if type(s) is bool and _is_number(value):  # Calc has no logical type: TRUE is 1
            s = float(s)
        rel = compare_values(s, value, tolerance)
        if rel is not None:
            out.append(Mismatch(*key, formula, s, value, rel, note))
    timings = {
        "read stored values": t1 - t0,
        **{f"libreoffice {k}": v for k, v in rec.timings.items()},
    }
    return CheckReport(out, len(rec.values), timings, engine=rec.version)
