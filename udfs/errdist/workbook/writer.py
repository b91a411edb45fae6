"""Write a :class:`~errdist.workbook.layout.Plan` to .xlsx with XlsxWriter, cached values included.

Every formula cell gets a cached value, and so does every cell of a spilled (dynamic-array)
result: the anchor is written with ``write_dynamic_array_formula`` (``<f t="array" ref=…>`` and
the ``cm`` dynamic-array marker), and the other cells of the range as plain values — numbers as
``<v>``, text as formula-result strings (``t="str"``), errors as ``t="e"`` — which is how a
spreadsheet application stores a spilled result. The file therefore shows correct numbers in any
spreadsheet, with or without the add-in, and charts carry their data caches.

The output is deterministic: the same plan and values give the same bytes (fixed creation date,
no timestamps from the clock).
"""

from __future__ import annotations

import math
from collections import namedtuple
from collections.abc import Mapping
from pathlib import Path

import xlsxwriter
from xlsxwriter.utility import xl_cell_to_rowcol, xl_rowcol_to_cell_fast
from xlsxwriter.worksheet import Worksheet

from errdist.workbook.layout import ChartSpec, Entry, Plan, SheetPlan

ERROR_CODES = ("#DIV/0!", "#N/A", "#NAME?", "#NULL!", "#NUM!", "#REF!", "#VALUE!")
"""Spreadsheet error values that are written as error cells (``t="e"``)."""

FORMATS: dict[str, dict[str, object]] = {
    "title": {"bold": True, "font_size": 16, "font_color": "#1F3864"},
    "subtitle": {"italic": True, "font_color": "#595959"},
    "h2": {"bold": True, "font_size": 12, "font_color": "#1F3864", "bottom": 1},
    "head": {"bold": True, "bg_color": "#DDE4EE", "bottom": 1, "text_wrap": True, "valign": "top"},
    "head_r": {
        "bold": True,
        "bg_color": "#DDE4EE",
        "bottom": 1,
        "text_wrap": True,
        "valign": "top",
        "align": "right",
    },
    # One-line header: for a header row that shares its row with other content, where a
    # wrapped header would make the spreadsheet grow the whole row.
    "head_r1": {"bold": True, "bg_color": "#DDE4EE", "bottom": 1, "align": "right"},
    "label": {},
    "label_b": {"bold": True},
    "label_r": {"align": "right"},
    "note": {"italic": True, "font_color": "#595959"},
    "note_i": {"italic": True, "font_color": "#595959", "indent": 1},
    "wrap": {"text_wrap": True, "valign": "top"},
    "note_wrap": {"italic": True, "font_color": "#595959", "text_wrap": True, "valign": "top"},
    "input": {"bg_color": "#FFF2CC", "border": 1, "border_color": "#BFBFBF"},
    "input_pct": {
        "bg_color": "#FFF2CC",
        "border": 1,
        "border_color": "#BFBFBF",
        "num_format": "0.0%",
    },
    "input_num": {
        "bg_color": "#FFF2CC",
        "border": 1,
        "border_color": "#BFBFBF",
        "num_format": "#,##0",
    },
    "input_date": {"bg_color": "#FFF2CC", "num_format": "yyyy-mm-dd"},
    "input_price": {"bg_color": "#FFF2CC", "num_format": "0.0000"},
    "date": {"num_format": "yyyy-mm-dd"},
    "pct": {"num_format": "0.00%"},
    "pct1": {"num_format": "0.0%"},
    "pct3": {"num_format": "0.000%"},
    "num": {"num_format": "0.000000"},
    "num2": {"num_format": "0.00"},
    "num4": {"num_format": "0.0000"},
    "sci": {"num_format": "0.000E+00"},
    "int": {"num_format": "0"},
    "pval": {"num_format": "0.000"},
    # A true/false result reads TRUE/FALSE even where it arrives as 1/0 (LibreOffice stores
    # booleans as numbers); a spreadsheet that keeps a real boolean shows it as such anyway.
    "bool": {"num_format": '"TRUE";"TRUE";"FALSE"', "align": "right"},
    "money": {"num_format": "#,##0"},
    "gen": {"num_format": "General"},
    "key": {"bold": True, "num_format": "0.000000", "bg_color": "#E2EFDA"},
    "key_pct": {"bold": True, "num_format": "0.00%", "bg_color": "#E2EFDA"},
    "key_text": {"bold": True, "bg_color": "#E2EFDA"},
    "key_text_r": {"bold": True, "bg_color": "#E2EFDA", "align": "right"},
    "text_r": {"align": "right"},
    "key_int": {"bold": True, "num_format": "0", "bg_color": "#E2EFDA"},
    "key_p": {"bold": True, "num_format": "0.000", "bg_color": "#E2EFDA"},
    "check": {"num_format": "0.0E+00", "font_color": "#375623"},
}
"""Named cell formats used by the template (XlsxWriter format properties)."""

_SpillValue = namedtuple("_SpillValue", "value, format")


class _SpillWorksheet(Worksheet):
    """A worksheet that can store the non-anchor cells of a spilled result.

    Numbers are stored as plain ``<v>`` values with full double precision (shortest
    round-trip text); text and error values of a spill are stored as formula results
    (``t="str"`` / ``t="e"``) rather than as shared-string constants, and an anchor whose own
    value is an error is stored with ``t="e"``.
    """

    def write_spill_value(self, row: int, col: int, value: object, cell_format=None) -> None:
        """Store ``value`` (number, text, error code or bool) as a spilled result at (row, col)."""
        self._check_dimensions(row, col)
        self.table[row][col] = _SpillValue(value, cell_format)

    def _write_cell(self, row: int, col: int, cell) -> None:  # noqa: D401
        kind = cell.__class__.__name__
        if kind == "_SpillValue":
            attributes = [("r", xl_rowcol_to_cell_fast(row, col))]
            if cell.format:
                attributes.append(("s", cell.format._get_xf_index()))
            value = cell.value
            if isinstance(value, bool):
                attributes.append(("t", "b"))
                value = 1 if value else 0
            elif isinstance(value, float):
                value = repr(value)  # shortest text that reads back as the same double
            elif value in ERROR_CODES:
                attributes.append(("t", "e"))
            else:
                attributes.append(("t", "str"))
            self._xml_start_tag("c", attributes)
            self._write_cell_value(value)
            self._xml_end_tag("c")
            return
        if kind == "ArrayFormula" and cell.value in ERROR_CODES:
            attributes = [("r", xl_rowcol_to_cell_fast(row, col))]
            if cell.format:
                attributes.append(("s", cell.format._get_xf_index()))
            if cell.atype == "dynamic":
                attributes.append(("cm", 1))
            attributes.append(("t", "e"))
            self._xml_start_tag("c", attributes)
            self._write_cell_array_formula(cell.formula, cell.range)
            self._write_cell_value(cell.value)
            self._xml_end_tag("c")
            return
        super()._write_cell(row, col, cell)

    def _get_range_data(self, row_start, col_start, row_end, col_end):
        # Chart caches: numbers as Excel-precision text, text as text, errors and missing
        # cells as gaps (None) — the parent's rules, plus the spilled-value cells.
        data: list[object] = []
        for row_num in range(row_start, row_end + 1):
            row = self.table.get(row_num, {})
            for col_num in range(col_start, col_end + 1):
                data.append(self._chart_value(row.get(col_num)))
        return data

    def _chart_value(self, cell) -> object:
        if cell is None:
            return None
        kind = cell.__class__.__name__
        if kind in ("Number", "Datetime"):
            return f"{cell.number:.16g}"
        if kind == "String":
            return self.str_table._get_shared_string(cell.string)
        if kind in ("Formula", "ArrayFormula", "_SpillValue"):
            value = cell.value
            if value is None or value in ERROR_CODES:
                return None
            if isinstance(value, float):
                return f"{value:.16g}"
            return value
        if kind == "Blank":
            return ""
        return None


def normalise_value(value: object) -> object:
    """Turn an engine result into float, str, bool or an error code string.

    NaN and infinities become ``"#NUM!"``; blank results stay ``None``; numpy scalars become
    Python scalars; error objects become their code (``"#N/A"``).
    """
    if value is None:
        return None
    if isinstance(value, bool):
        return value
    if hasattr(value, "item") and not isinstance(value, str):
        try:
            value = value.item()
        except (ValueError, AttributeError):
            pass
    if isinstance(value, bool):
        return value
    if isinstance(value, (int, float)):
        value = float(value)
        if not math.isfinite(value):
            return "#NUM!"
        return value
    text = str(value)
    return text


def _write_value(ws: _SpillWorksheet, row: int, col: int, value: object, fmt) -> None:
    if value is None:
        # a blank inside a spill (e.g. a result that collapsed to one error in the anchor):
        # no stored value. XlsxWriter padded the range with zeros; drop this cell's.
        ws.table.get(row, {}).pop(col, None)
        if fmt is not None:
            ws.write_blank(row, col, None, fmt)
        return
    # Numbers too go through write_spill_value: write_number keeps only 16 significant
    # digits, and a cached value must read back as exactly the double the engine computed.
    ws.write_spill_value(row, col, value, fmt)


def _write_entry(
    ws: _SpillWorksheet,
    sheet: str,
    e: Entry,
    values: Mapping[tuple[str, str], object] | None,
    fmts: Mapping[str, object],
) -> None:
    fmt = fmts.get(e.fmt) if e.fmt else None
    if e.kind == "text" and e.span > 1:
        ws.merge_range(e.row, e.col, e.row, e.col + e.span - 1, str(e.value), fmt)
    elif e.kind == "text":
        ws.write_string(e.row, e.col, str(e.value), fmt)
    elif e.kind == "number":
        ws.write_number(e.row, e.col, float(e.value), fmt)  # type: ignore[arg-type]
    elif e.kind == "blank":
        ws.write_blank(e.row, e.col, None, fmt)
    elif e.kind == "date":
        ws.write_datetime(e.row, e.col, e.value, fmt)
    elif e.kind == "formula":
        value = normalise_value(values.get((sheet, e.a1), 0.0)) if values is not None else 0
        ws.write_formula(e.row, e.col, e.formula, fmt, "" if value is None else value)
    elif e.kind == "spill":
        head = fmts["head"] if e.head_rows else None

        def cell_fmt(r: int, c: int):
            if e.cell_fmts:
                name = e.cell_fmts[r - e.row][c - e.col]
                return fmts.get(name) if name else fmt
            return head if r < e.row + e.head_rows else fmt

        anchor = normalise_value(values.get((sheet, e.a1), 0.0)) if values is not None else 0
        ws.write_dynamic_array_formula(
            e.ref, e.formula, cell_fmt(e.row, e.col), "" if anchor is None else anchor
        )
        if values is None:
            # First pass, for the engine: the anchor alone. XlsxWriter pads the rest of the
            # range with zeros; drop them, the engine reads the range from the anchor's ref
            # and parsing them only costs time.
            for r, c in e.cells():
                if (r, c) != (e.row, e.col):
                    ws.table[r].pop(c, None)
            return
        for r, c in e.cells():
            if (r, c) == (e.row, e.col):
                continue
            key = (sheet, xl_rowcol_to_cell_fast(r, c))
            _write_value(ws, r, c, normalise_value(values.get(key, "")), cell_fmt(r, c))
    else:  # pragma: no cover - Entry kinds are closed
        raise ValueError(f"unknown entry kind {e.kind!r}")


def _add_chart(wb: xlsxwriter.Workbook, ws: Worksheet, spec: ChartSpec) -> None:
    chart = wb.add_chart(spec.chart_type)
    for s in spec.series:
        chart.add_series(s)
    if spec.secondary_type is not None:
        second = wb.add_chart(spec.secondary_type)
        for s in spec.secondary_series:
            second.add_series(s)
        chart.combine(second)
    chart.set_title({"name": spec.title, "name_font": {"size": 12, "bold": True}})
    if spec.x_axis:
        chart.set_x_axis(spec.x_axis)
    if spec.y_axis:
        chart.set_y_axis(spec.y_axis)
    chart.set_legend(spec.legend or {"position": "bottom"})
    chart.set_size({"width": spec.size[0], "height": spec.size[1]})
    chart.set_chartarea({"border": {"none": True}})
    ws.insert_chart(spec.anchor, chart, {"object_position": 3})


def _area_bounds(sp: SheetPlan) -> tuple[int, int, int, int] | None:
    """0-based (first row, first col, last row, last col) of the print area, if any."""
    if not sp.print_area:
        return None
    first, _, last = sp.print_area.replace("$", "").partition(":")
    (r0, c0), (r1, c1) = xl_cell_to_rowcol(first), xl_cell_to_rowcol(last or first)
    return r0, c0, r1, c1


def check_repeat_rows(sp: SheetPlan) -> None:
    """Refuse header rows, repeated on every printed page, that carry values.

    A repeated row is printed again above each page's rows: a number or formula in it would
    be shown on every page as if it belonged to each. Only text (headings) may be repeated.

    Raises
    ------
    ValueError
        Naming the first cell of a repeated row, inside the print area, that holds a value.
    """
    if sp.repeat_rows is None:
        return
    top, bottom = sp.repeat_rows
    bounds = _area_bounds(sp)
    for e in sp.entries:
        if e.kind in ("text", "blank"):
            continue
        for r, c in e.cells():
            if not top <= r <= bottom:
                continue
            if bounds is not None and not bounds[1] <= c <= bounds[3]:
                continue
            raise ValueError(
                f"{sp.name}: row {r + 1} is repeated on every printed page but "
                f"{xl_rowcol_to_cell_fast(r, c)} in it holds a value, not a heading"
            )


def print_title(sp: SheetPlan) -> str:
    """The page header: the sheet's title when its print area leaves the title cell out.

    The title is the text in A1 in the ``title`` format and the subtitle below it (see
    :func:`errdist.workbook.sheets.tables.heading`), one line each; ``""`` when they are
    printed anyway or the sheet has no title.
    """
    bounds = _area_bounds(sp)
    if bounds is None or (bounds[0] == 0 and bounds[1] == 0):
        return ""
    lines = {
        e.row: str(e.value)
        for e in sp.entries
        if e.col == 0 and e.kind == "text" and (e.row, e.fmt) in ((0, "title"), (1, "subtitle"))
    }
    return "\n".join(lines[r] for r in sorted(lines)) if 0 in lines else ""


def _setup_sheet(ws: Worksheet, sp: SheetPlan) -> None:
    for col, width in sorted(sp.col_widths.items()):
        ws.set_column(col, col, width)
    for row, height in sorted(sp.row_heights.items()):
        ws.set_row(row, height)
    if sp.freeze is not None:
        ws.freeze_panes(*sp.freeze)
    if sp.landscape:
        ws.set_landscape()
    ws.set_paper(9)  # A4
    title = print_title(sp)
    # A page header of two lines needs room above the first printed row.
    ws.set_margins(left=0.5, right=0.5, top=0.95 if title else 0.6, bottom=0.6)
    if sp.print_area:
        ws.print_area(sp.print_area)
    if sp.repeat_rows is not None:
        check_repeat_rows(sp)
        ws.repeat_rows(*sp.repeat_rows)
    if sp.fit_width or sp.pages_tall:
        ws.fit_to_pages(1, sp.pages_tall)
    if sp.page_breaks and not sp.pages_tall:
        ws.set_h_pagebreaks(sp.page_breaks)
    if title:
        ws.set_header("&L" + title.replace("&", "&&"), {"margin": 0.3})
    ws.set_footer(f"&L{sp.name.replace('&', '&&')}&RPage &P of &N")
    if sp.tab_color:
        ws.set_tab_color(sp.tab_color)
    if sp.zoom != 100:
        ws.set_zoom(sp.zoom)
    if sp.hidden:
        ws.hide()


def write_plan(
    plan: Plan, path: str | Path, values: Mapping[tuple[str, str], object] | None = None
) -> Path:
    """Write ``plan`` to ``path`` (.xlsx).

    Parameters
    ----------
    plan : Plan
        The laid-out workbook.
    path : str or Path
        File to write (overwritten).
    values : mapping, optional
        Cached values keyed by (sheet name, A1 cell) for every formula cell, each cell of a
        spill included. ``None`` writes placeholders (the file for the engine's first pass).

    Returns
    -------
    Path
        The path written.
    """
    path = Path(path)
    wb = xlsxwriter.Workbook(
        str(path),
        {
            "use_future_functions": True,
            "strings_to_numbers": False,
            "strings_to_formulas": False,
            "strings_to_urls": False,
        },
    )
    wb.set_properties(
        {
            "title": plan.title,
            "subject": plan.subject,
            "author": "errdist",
            "comments": "Generated by errdist.workbook.template; cached values from the "
            "headless engine.",
            "created": plan.created,
        }
    )
    wb.set_calc_mode("auto")
    # No full recalculation on load: the cached values are right, and a spreadsheet without
    # the add-in would otherwise replace every ERRDIST_ result by #NAME? as the file opens.
    wb.calc_on_load = False
    fmts = {name: wb.add_format(props) for name, props in FORMATS.items()}
    for sp in plan.sheets:
        ws = wb.add_worksheet(sp.name, worksheet_class=_SpillWorksheet)
        _setup_sheet(ws, sp)
        for e in sp.entries:
            _write_entry(ws, sp.name, e, values, fmts)
        for spec in sp.charts:
            _add_chart(wb, ws, spec)
        if plan.active == sp.name:
            ws.activate()
    wb.close()
    return path


def cell_rowcol(a1: str) -> tuple[int, int]:
    """0-based (row, col) of an A1 address."""
    return xl_cell_to_rowcol(a1)
