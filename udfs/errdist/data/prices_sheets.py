"""Where the prices sit in a file: which sheet of a workbook, and which row is the header.

A prices workbook often holds a cover or notes sheet first, and a sheet of prices often starts
with a title (the fund's name, "NAV history") above the row of column names. These helpers,
used by :func:`errdist.data.prices_io.read_prices`, read a sheet chosen by name and find the
header row:

- a **data row** holds a date in one cell and a number in another;
- the data start at the first data row that the next non-blank row also is (one stray
  date-and-number line in a title block does not count);
- the **header** is the row just above them when every row above the data is text only
  (titles, notes, the column names) and it names at least two columns; rows above it are
  titles and are skipped. Otherwise the first non-blank row stays the header, so a bad
  first data row is still reported as bad data, never skipped as a title;
- when the first non-blank row is already a data row there is no header: that is refused,
  saying to add a row of column names (a header-less file would otherwise lose its first
  price as "column names").
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from pathlib import Path
from typing import Any

from errdist.errors import InputTypeError

__all__ = ["locate_header", "named_sheet_rows", "sheet_hint", "sheet_names"]


def _names(names: Sequence[str]) -> str:
    return ", ".join(repr(n) for n in names)


def sheet_names(path: Path) -> list[str]:
    """The sheet names of an .xlsx workbook, in order (python-calamine, else openpyxl)."""
    try:
        from python_calamine import CalamineWorkbook
    except ImportError:
        CalamineWorkbook = None  # noqa: N806
    if CalamineWorkbook is not None:
        try:
            book = CalamineWorkbook.from_path(str(path))
            try:
                return list(book.sheet_names)
            finally:
                book.close()
        except Exception:  # noqa: BLE001 - a file calamine cannot read: openpyxl says why
            pass
    from openpyxl import load_workbook

    book = load_workbook(path, read_only=True, data_only=True)
    try:
        return list(book.sheetnames)
    finally:
        book.close()


def named_sheet_rows(path: Path, name: str) -> list[list[Any]]:
    """The rows of the sheet called ``name`` (case-insensitive), from row 1.

    Raises
    ------
    InputTypeError
        No such sheet: the message lists the workbook's sheets.
    """
    names = sheet_names(path)
    match = [n for n in names if n.casefold() == name.strip().casefold()]
    if not match:
        raise InputTypeError(
            f"{path}: no sheet named {name!r} (option --sheet); sheets: {_names(names)}"
        )
    sheet = match[0]
    try:
        from python_calamine import CalamineWorkbook

        book = CalamineWorkbook.from_path(str(path))
        try:
            return book.get_sheet_by_name(sheet).to_python(skip_empty_area=False)
        finally:
            book.close()
    except Exception:  # noqa: BLE001 - not installed, or a file it cannot read: openpyxl
        pass
    from openpyxl import load_workbook

    book = load_workbook(path, read_only=True, data_only=True)
    try:
        return [list(values) for values in book[sheet].iter_rows(values_only=True)]
    finally:
        book.close()


def sheet_hint(path: Path, chosen: str | None) -> str:
    """What to do when no prices were found on a workbook's sheet: name another with --sheet.

    ``""`` for a CSV file or a workbook of one sheet.
    """
    if path.suffix.lower() not in (".xlsx", ".xlsm"):
        return ""
    try:
        names = sheet_names(path)
    except Exception:  # noqa: BLE001 - the reader's own message stands alone
        return ""
    if len(names) < 2:
        return ""
    read = repr(chosen) if chosen else f"the first sheet, {names[0]!r}"
    return f"; read from {read}: name the sheet that holds the prices with --sheet (sheets: {_names(names)})"


def locate_header(
    lines: list[tuple[int | None, list[Any]]],
    *,
    is_date: Callable[[Any], bool],
    is_number: Callable[[Any], bool],
    blank: Callable[[Any], bool],
    source: Path,
) -> int:
    """Index in ``lines`` of the header row (see the module notes).

    Parameters
    ----------
    lines : list of (row number or None, cells)
        The non-blank rows of the sheet or file in order, the first non-blank one first.
    is_date, is_number, blank : callable
        Whether a cell reads as a date, as a number, or is blank (the reader's own rules).
    source : Path
        The file, for messages.

    Returns
    -------
    int
        0 when the first non-blank row is the header (the usual file), else the index of the
        header row below title rows.

    Raises
    ------
    InputTypeError
        The first non-blank row already holds data: there is no header row.
    """

    def kind(cells: list[Any]) -> str:
        dates = [i for i, c in enumerate(cells) if not blank(c) and is_date(c)]
        numbers = [i for i, c in enumerate(cells) if not blank(c) and is_number(c)]
        if dates and any(i not in dates for i in numbers):
            return "data"
        return "text" if not dates and not numbers else "mixed"

    kinds: list[str] = []
    first_data = None
    for i, (_, cells) in enumerate(lines):
        kinds.append(kind(cells))
        if i >= 1 and kinds[i - 1] == "data" and kinds[i] == "data":
            first_data = i - 1
            break
    if first_data is None:
        if len(lines) == 1 and kinds and kinds[0] == "data":
            first_data = 0
        else:
            return 0  # no run of data rows: the column checks report what is wrong
    if first_data == 0:
        row, cells = lines[0]
        shown = ", ".join(str(c) for c in cells if not blank(c))
        where = f"row {row}" if row is not None else "the first row"
        raise InputTypeError(
            f"{source}: no header row: {where} ({shown}) already holds a date and a price. "
            "Add a row of column names (e.g. Date, Price) above the first price"
        )
    header = lines[first_data - 1][1]
    if (
        first_data >= 2
        and all(k == "text" for k in kinds[:first_data])
        and sum(not blank(c) for c in header) >= 2
    ):
        return first_data - 1
    return 0
