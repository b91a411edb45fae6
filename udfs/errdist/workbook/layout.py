"""The template workbook as data: every cell laid out before anything is written.

The template builder (:mod:`errdist.workbook.template`) first describes the whole workbook as a
:class:`Plan` — for each sheet, the constants, the formulas, and for each spilling formula the
range its result fills — and only then writes it with XlsxWriter (:mod:`errdist.workbook.writer`).
Because the plan is plain data, the same plan is written twice: once without cached values (the
headless engine evaluates that file), and once with every formula cell's cached value, every cell
of a spill included.

Cells are addressed in A1 notation on a named sheet; rows and columns inside the plan are
0-based like XlsxWriter's.
"""

from __future__ import annotations

import datetime as _dt
from collections.abc import Iterator, Sequence
from dataclasses import dataclass, field
from typing import Literal

from xlsxwriter.utility import xl_cell_to_rowcol, xl_rowcol_to_cell

EntryKind = Literal["text", "number", "date", "blank", "formula", "spill"]


@dataclass(frozen=True)
class Entry:
    """One laid-out cell (or, for a spill, the anchor of a rectangular result).

    Attributes
    ----------
    row, col : int
        0-based position of the cell (the anchor for a spill).
    kind : str
        ``"text"``, ``"number"``, ``"date"``, ``"blank"`` (constants; a blank input cell
        keeps its format), ``"formula"`` (one cell) or
        ``"spill"`` (a dynamic-array formula filling ``rows`` x ``cols`` cells).
    value : object
        The constant (text, number, datetime) for constants; ``None`` for formulas.
    formula : str
        The formula text with its leading ``=`` (formulas and spills only).
    fmt : str
        Name of a cell format of :data:`errdist.workbook.writer.FORMATS` (``""`` for none).
    rows, cols : int
        Size of a spill's result (1 x 1 for every other kind).
    span : int
        For text: the number of columns merged into one cell (1: no merge).
    head_rows : int
        For a spill: leading rows of the result that are a header (shown in the header
        format).
    cell_fmts : tuple of tuple of str
        For a spill: one format name per cell of the result, row by row (``rows`` x ``cols``),
        overriding ``fmt`` and the header format; empty: ``fmt`` for every cell.
    """

    row: int
    col: int
    kind: EntryKind
    value: object = None
    formula: str = ""
    fmt: str = ""
    rows: int = 1
    cols: int = 1
    span: int = 1
    head_rows: int = 0
    cell_fmts: tuple[tuple[str, ...], ...] = ()

    @property
    def a1(self) -> str:
        """The A1 address of the cell (the anchor for a spill)."""
        return xl_rowcol_to_cell(self.row, self.col)

    @property
    def ref(self) -> str:
        """The A1 range the entry fills (``"B2"`` or ``"B2:D5"``)."""
        if self.rows == 1 and self.cols == 1:
            return self.a1
        last = xl_rowcol_to_cell(self.row + self.rows - 1, self.col + self.cols - 1)
        return f"{self.a1}:{last}"

    def cells(self) -> Iterator[tuple[int, int]]:
        """Every (row, col) the entry fills, row by row."""
        for r in range(self.row, self.row + self.rows):
            for c in range(self.col, self.col + self.cols):
                yield r, c


@dataclass
class ChartSpec:
    """A native chart: XlsxWriter chart options, its series, and where it is inserted.

    ``series`` are XlsxWriter ``add_series`` option dicts whose ranges are A1 references
    (``"='Fit check'!$A$2:$A$10"``); ``secondary`` holds an optional second chart type combined
    with the first (e.g. a line over columns).
    """

    anchor: str
    chart_type: dict[str, str]
    series: list[dict[str, object]]
    title: str
    x_axis: dict[str, object] = field(default_factory=dict)
    y_axis: dict[str, object] = field(default_factory=dict)
    legend: dict[str, object] = field(default_factory=dict)
    size: tuple[int, int] = (960, 600)
    secondary_type: dict[str, str] | None = None
    secondary_series: list[dict[str, object]] = field(default_factory=list)


@dataclass(frozen=True)
class PrintSetup:
    """How a sheet prints, declared once in its sheet module as ``PRINT = PrintSetup(...)``.

    Printing the whole book should give a short pack to read, not every row of data: the
    template applies each module's declaration after the sheet is laid out
    (:meth:`SheetPlan.apply_print`). Every printed page is fitted to the paper's width.

    Attributes
    ----------
    landscape : bool or None
        Paper orientation; ``None`` keeps what the layout chose.
    pages_tall : int
        Shrink the print area to fit this many pages tall (0: as many pages as it needs).
        Manual page breaks are dropped then: the spreadsheet ignores them when fitting to a
        number of pages, and a fitted page needs none.
    data : bool
        A data sheet (prices, returns, long spilled columns): only ``area`` prints - its
        notes - and its last two rows (left empty by the layout) say which cells were left
        out and how to print them. The area is widened to the right as far as its longest
        line of text runs, so that no note is cut off at the edge of the print.
    area : str
        A1 range printed instead of the laid-out print area (``""``: keep it).
    repeat_header : bool
        Keep the laid-out header rows repeated at the top of every printed page. Set it to
        ``False`` where the printed part fits one page or the header row also carries values.
    """

    landscape: bool | None = None
    pages_tall: int = 0
    data: bool = False
    area: str = ""
    repeat_header: bool = True


DATA_PRINT_NOTE: tuple[str, str] = (
    "Printing shows these notes only: the data in {data} is left out of the printed pack.",
    "To print it, clear the print area (Excel: Page Layout > Print Area > Clear Print Area; "
    "LibreOffice: Format > Print Ranges > Clear).",
)
"""The two lines a data sheet prints in place of its rows (see :attr:`PrintSetup.data`)."""

CHARS_PER_WIDTH_UNIT = 1.2
"""Characters of running text per unit of column width (one digit of the default font),
measured on LibreOffice's PDF export, whose fallback font is wider than Calibri."""


@dataclass
class SheetPlan:
    """Everything written on one worksheet."""

    name: str
    entries: list[Entry] = field(default_factory=list)
    col_widths: dict[int, float] = field(default_factory=dict)
    row_heights: dict[int, float] = field(default_factory=dict)
    charts: list[ChartSpec] = field(default_factory=list)
    freeze: tuple[int, int] | None = None
    landscape: bool = False
    print_area: str = ""
    repeat_rows: tuple[int, int] | None = None
    """0-based first and last rows printed at the top of every page (a table's header)."""
    fit_width: bool = True
    pages_tall: int = 0
    """Fit the print area to this many pages tall (0: no limit); manual breaks then unused."""
    page_breaks: list[int] = field(default_factory=list)
    tab_color: str = ""
    hidden: bool = False
    zoom: int = 100

    # ------------------------------------------------------------------ adders
    def _add(self, entry: Entry) -> Entry:
        self.entries.append(entry)
        return entry

    def text(self, cell: str, value: str, fmt: str = "") -> Entry:
        """Put a text constant in ``cell``."""
        row, col = xl_cell_to_rowcol(cell)
        return self._add(Entry(row, col, "text", value=value, fmt=fmt))

    def paragraph(self, cell: str, value: str, span: int, fmt: str = "wrap") -> Entry:
        """Put wrapped text in ``cell`` merged over ``span`` columns, the row made tall enough.

        The row height is estimated from the text length and the merged columns' widths
        (spreadsheets do not grow merged rows by themselves).
        """
        row, col = xl_cell_to_rowcol(cell)
        width = sum(self.col_widths.get(c, 8.43) for c in range(col, col + span))
        # CHARS_PER_WIDTH_UNIT: so the estimate never cuts a line off.
        chars_per_line = max(1.0, width * CHARS_PER_WIDTH_UNIT)
        lines = 0
        for part in value.split("\n"):
            lines += max(1, -(-len(part) // int(chars_per_line)))
        self.row_heights[row] = max(self.row_heights.get(row, 15.0), 15.0 * lines + 3.0)
        return self._add(Entry(row, col, "text", value=value, fmt=fmt, span=span))

    def number(self, cell: str, value: float, fmt: str = "") -> Entry:
        """Put a numeric constant in ``cell``."""
        row, col = xl_cell_to_rowcol(cell)
        return self._add(Entry(row, col, "number", value=float(value), fmt=fmt))

    def blank(self, cell: str, fmt: str) -> Entry:
        """Leave ``cell`` empty but formatted (an optional input)."""
        row, col = xl_cell_to_rowcol(cell)
        return self._add(Entry(row, col, "blank", fmt=fmt))

    def date(self, cell: str, value: _dt.datetime, fmt: str = "date") -> Entry:
        """Put a date constant in ``cell``."""
        row, col = xl_cell_to_rowcol(cell)
        return self._add(Entry(row, col, "date", value=value, fmt=fmt))

    def formula(self, cell: str, formula: str, fmt: str = "") -> Entry:
        """Put a one-cell formula in ``cell`` (``formula`` starts with ``=``)."""
        row, col = xl_cell_to_rowcol(cell)
        return self._add(Entry(row, col, "formula", formula=formula, fmt=fmt))

    def spill(
        self,
        cell: str,
        rows: int,
        cols: int,
        formula: str,
        fmt: str = "",
        head_rows: int = 0,
        cell_fmts: Sequence[Sequence[str]] = (),
    ) -> Entry:
        """Put a dynamic-array formula at ``cell`` whose result fills ``rows`` x ``cols``
        (the first ``head_rows`` rows of it a header; ``cell_fmts``, if given, one format
        name per cell of the result)."""
        if rows < 1 or cols < 1:
            raise ValueError(f"a spill needs at least one cell, got {rows} x {cols} at {cell}")
        grid = tuple(tuple(r) for r in cell_fmts)
        if grid and (len(grid) != rows or any(len(r) != cols for r in grid)):
            raise ValueError(f"cell_fmts of the spill at {cell} must be {rows} x {cols}")
        row, col = xl_cell_to_rowcol(cell)
        return self._add(
            Entry(
                row,
                col,
                "spill",
                formula=formula,
                fmt=fmt,
                rows=rows,
                cols=cols,
                head_rows=head_rows,
                cell_fmts=grid,
            )
        )

    def width(self, first_col: str, width: float, last_col: str | None = None) -> None:
        """Set the width of a column (or columns ``first_col:last_col``), e.g. ``"A"``."""
        first = xl_cell_to_rowcol(f"{first_col}1")[1]
        last = xl_cell_to_rowcol(f"{last_col or first_col}1")[1]
        for c in range(first, last + 1):
            self.col_widths[c] = width

    def apply_print(self, setup: PrintSetup) -> None:
        """Apply a sheet module's print declaration (:class:`PrintSetup`) to this sheet.

        For a data sheet the last cell of ``setup.area`` gets :data:`DATA_PRINT_NOTE` (it
        must be empty), naming the rows the print leaves out.
        """
        if setup.landscape is not None:
            self.landscape = setup.landscape
        if setup.pages_tall:
            self.pages_tall = setup.pages_tall
            self.page_breaks = []
        if not setup.repeat_header:
            self.repeat_rows = None
        if setup.area:
            self.print_area = setup.area
        if setup.data:
            self._print_data_notes(setup.area)

    def _print_data_notes(self, area: str) -> None:
        if ":" not in area:
            raise ValueError(f"the data sheet {self.name!r} needs a printed area of 2+ rows")
        first, last = area.split(":")
        (r0, c0), (r1, c1) = xl_cell_to_rowcol(first), xl_cell_to_rowcol(last)
        spots = [(r1 - 1, c0), (r1, c0)]
        if r1 - 1 < r0 or any((e.row, e.col) in spots for e in self.entries):
            raise ValueError(f"{self.name}: the last two rows of {area} must be empty")
        outside = [
            e
            for e in self.entries
            if not (r0 <= e.row <= r1 and c0 <= e.col <= c1 and e.rows == e.cols == 1)
        ]
        if not outside:
            return
        top, left = min(e.row for e in outside), min(e.col for e in outside)
        bottom = max(e.row + e.rows - 1 for e in outside)
        right = max(e.col + e.cols - 1 for e in outside)
        data = f"{cell(top, left)}:{cell(bottom, right)}"
        for (row, col), line in zip(spots, DATA_PRINT_NOTE, strict=True):
            self.text(cell(row, col), line.format(data=data), "note")
        # Widen the area to the right until its longest line of text fits.
        for e in self.entries:
            if e.kind != "text" or not (r0 <= e.row <= r1 and c0 <= e.col <= c1):
                continue
            need = len(str(e.value)) / CHARS_PER_WIDTH_UNIT
            c = e.col
            have = self.col_widths.get(c, 8.43)
            while have < need:
                c += 1
                have += self.col_widths.get(c, 8.43)
            c1 = max(c1, c)
        self.print_area = f"{first}:{cell(r1, c1)}"

    def formula_cells(self) -> Iterator[tuple[str, Entry]]:
        """Every cell filled by a formula (each cell of a spill), with its entry."""
        for e in self.entries:
            if e.kind in ("formula", "spill"):
                for r, c in e.cells():
                    yield xl_rowcol_to_cell(r, c), e


@dataclass
class Plan:
    """The whole workbook: sheets in order, plus document properties."""

    sheets: list[SheetPlan] = field(default_factory=list)
    title: str = ""
    subject: str = ""
    created: _dt.datetime = _dt.datetime(2026, 1, 1)
    active: str = ""
    keys: dict[str, str] = field(default_factory=dict)
    """Named key cells (absolute references), e.g. ``"var99"`` -> ``Risk!$B$17``."""

    def add_sheet(self, name: str) -> SheetPlan:
        """Append a sheet named ``name`` and return it."""
        if any(s.name == name for s in self.sheets):
            raise ValueError(f"duplicate sheet name {name!r}")
        sheet = SheetPlan(name)
        self.sheets.append(sheet)
        return sheet

    def sheet(self, name: str) -> SheetPlan:
        """The sheet named ``name``."""
        for s in self.sheets:
            if s.name == name:
                return s
        raise KeyError(name)

    def formula_cells(self) -> Iterator[tuple[str, str, Entry]]:
        """Every formula-filled cell of the workbook as (sheet, A1, entry)."""
        for s in self.sheets:
            for a1, e in s.formula_cells():
                yield s.name, a1, e


def quote_sheet(name: str) -> str:
    """The sheet name as written in a formula reference (quoted when it needs to be)."""
    if name.replace("_", "").isalnum() and not name[0].isdigit():
        return name
    return "'" + name.replace("'", "''") + "'"


def absref(sheet: str, first: str, last: str | None = None) -> str:
    """An absolute reference such as ``'Fit check'!$B$2:$B$10``."""

    def dollar(cell: str) -> str:
        row, col = xl_cell_to_rowcol(cell)
        return xl_rowcol_to_cell(row, col, row_abs=True, col_abs=True)

    rng = dollar(first) if last is None else f"{dollar(first)}:{dollar(last)}"
    return f"{quote_sheet(sheet)}!{rng}"


def cell(row: int, col: int) -> str:
    """A1 address of the 0-based (row, col)."""
    return xl_rowcol_to_cell(row, col)
