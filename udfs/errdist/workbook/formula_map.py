"""Which cells of a workbook hold formulas, and which of the template's formulas were lost.

Recomputing a workbook cannot see the classic spreadsheet error of a formula typed over with a
number: the cell holds a constant, its dependents agree with it, every value "matches". The
template's builder knows every formula cell it writes, so :func:`formula_changes` lays the
template out again for the book's own prices (:func:`errdist.workbook.template.layout_workbook`,
the same function ``errdist demo``/``refresh`` used to build it) and compares cell by cell:

- **overridden**: the template has a formula, the book a constant there;
- **deleted**: the template has a formula, the book's cell is empty;
- **changed**: both have a formula, with different text;
- **added**: the book has a formula where the template has none.

Formula texts are compared after dropping the file format's function prefixes (``_xlfn.``,
``_xlws.``, ``_xludf.``) and spaces outside quoted strings. A book not built by errdist (no
Prices sheet to lay it out from) gets no formula comparison, and says so.
"""

from __future__ import annotations

import datetime as _dt
import os
import re
from collections.abc import Iterator
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Literal

__all__ = [
    "BookFormulas",
    "FormulaChange",
    "book_formulas",
    "expected_formulas",
    "formula_changes",
    "normalise_formula",
]

ChangeKind = Literal["overridden", "deleted", "changed", "added"]
KINDS: tuple[str, ...] = ("overridden", "deleted", "changed", "added")

_PREFIX = re.compile(r"_xl(?:fn|ws|udf)\.", re.IGNORECASE)
_STRING = re.compile(r'("(?:[^"]|"")*")')


def normalise_formula(formula: str) -> str:
    """A formula text for comparison: no leading ``=``, no format prefixes, no spaces
    outside strings."""
    text = formula.strip()
    if text.startswith("{") and text.endswith("}"):
        text = text[1:-1]
    text = text.lstrip("=")
    parts = _STRING.split(text)
    for i in range(0, len(parts), 2):  # outside quoted strings
        parts[i] = re.sub(r"\s+", "", _PREFIX.sub("", parts[i]))
    return "".join(parts)


@dataclass(frozen=True)
class BookFormulas:
    """The formula cells and the constants of a workbook.

    Attributes
    ----------
    formulas : dict
        ``(sheet, "A1") -> formula`` for every formula cell, each cell of an array formula's
        range included (with the formula of its first cell), normalised.
    anchors : dict
        ``(sheet, "A1") -> "A1"`` of the cell that holds the formula.
    constants : dict
        ``(sheet, "A1") -> value`` for every non-empty cell without a formula.
    """

    formulas: dict[tuple[str, str], str]
    anchors: dict[tuple[str, str], str]
    constants: dict[tuple[str, str], Any]


def _cells(ref: str) -> Iterator[str]:
    from openpyxl.utils.cell import get_column_letter, range_boundaries

    c1, r1, c2, r2 = range_boundaries(ref)
    for r in range(r1, r2 + 1):
        for c in range(c1, c2 + 1):
            yield f"{get_column_letter(c)}{r}"


def book_formulas(path: str | os.PathLike[str]) -> BookFormulas:
    """Read the formula cells and constants of an .xlsx (already checked by
    :func:`errdist.workbook.safety.inspect_xlsx`)."""
    from openpyxl import load_workbook
    from openpyxl.worksheet.formula import ArrayFormula

    from errdist.workbook import safety

    safety.defuse_xml()
    book = load_workbook(str(path), data_only=False, read_only=True)
    formulas: dict[tuple[str, str], str] = {}
    anchors: dict[tuple[str, str], str] = {}
    constants: dict[tuple[str, str], Any] = {}
    try:
        for ws in book.worksheets:
            for row in ws.iter_rows():
                for c in row:
                    v = c.value
                    if v is None:
                        continue
                    key = (ws.title, c.coordinate)
                    if isinstance(v, ArrayFormula):
                        text = normalise_formula(v.text or "")
                        for a1 in _cells(v.ref or c.coordinate):
                            formulas[(ws.title, a1)] = text
                            anchors[(ws.title, a1)] = c.coordinate
                    elif isinstance(v, str) and v.startswith("=") and len(v) > 1:
                        formulas[key] = normalise_formula(v)
                        anchors[key] = c.coordinate
                    elif v is not None and v != "":
                        constants[key] = v
    finally:
        book.close()
    for key in formulas:  # the rest of an array range is stored as plain cached values
        constants.pop(key, None)
    return BookFormulas(formulas, anchors, constants)


def _fund_name(title: Any) -> str:
    text = str(title or "")
    return text.split("—", 1)[1].strip() if "—" in text else text.strip()


def expected_formulas(book: BookFormulas) -> dict[tuple[str, str], str] | None:
    """The template's formula map for the book's own prices, or None when the book was not
    built by errdist (no dated prices on a Prices sheet)."""
    import pandas as pd

    from errdist.workbook import template

    layout = getattr(template, "layout_workbook", None)
    if layout is None:
        return None
    from errdist.workbook.sheets import guide as guide_sheet
    from errdist.workbook.sheets import prices as prices_sheet_module

    prices_sheet = prices_sheet_module.NAME
    dates, prices = [], []
    row = 2
    while True:
        d = book.constants.get((prices_sheet, f"A{row}"))
        p = book.constants.get((prices_sheet, f"B{row}"))
        if d is None and p is None:
            break
        if not isinstance(d, (_dt.datetime, _dt.date)) or isinstance(p, bool):
            return None
        if not isinstance(p, (int, float)):
            return None
        dates.append(d)
        prices.append(float(p))
        row += 1
    if not dates:
        return None
    fund = _fund_name(book.constants.get((guide_sheet.NAME, "A1")))
    try:
        plan = layout(pd.DataFrame({"date": dates, "price": prices}), fund_name=fund or "fund")
    except ValueError:
        return None
    return {(s, a1): normalise_formula(e.formula) for s, a1, e in plan.formula_cells()}


@dataclass(frozen=True)
class FormulaChange:
    """One cell whose formula differs from the template's.

    Attributes
    ----------
    kind : {"overridden", "deleted", "changed", "added"}
    sheet, cell : str
    expected : str
        The template's formula ("" for an added formula).
    found : object
        The book's formula (changed, added), its constant (overridden) or None (deleted).
    """

    kind: ChangeKind
    sheet: str
    cell: str
    expected: str
    found: Any

    def __str__(self) -> str:
        where = f"{self.sheet}!{self.cell}"
        if self.kind == "overridden":
            return f"{where}: formula ={self.expected} replaced by the constant {self.found!r}"
        if self.kind == "deleted":
            return f"{where}: formula ={self.expected} deleted (cell is empty)"
        if self.kind == "changed":
            return f"{where}: formula ={self.expected} changed to ={self.found}"
        return f"{where}: formula ={self.found} added (the template has none here)"


def formula_changes(
    path: str | os.PathLike[str], book: BookFormulas | None = None
) -> list[FormulaChange] | None:
    """Compare a workbook's formulas with the template's (see the module docstring).

    Returns
    -------
    list of FormulaChange or None
        In sheet order of the book, then row and column; None when the book was not built
        by errdist and there is no template to compare with.
    """
    book = book_formulas(Path(path)) if book is None else book
    expected = expected_formulas(book)
    if expected is None:
        return None
    out: list[FormulaChange] = []
    for key, formula in expected.items():
        found = book.formulas.get(key)
        if found is None:
            if key in book.constants:
                out.append(FormulaChange("overridden", *key, formula, book.constants[key]))
            else:
                out.append(FormulaChange("deleted", *key, formula, None))
        elif found != formula:
            out.append(FormulaChange("changed", *key, formula, found))
    for key, found in book.formulas.items():
        if key not in expected:
            out.append(FormulaChange("added", *key, "", found))
    return out
