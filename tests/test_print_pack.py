"""Printing the workbook gives a short pack: data sheets print their notes only, the analysis
sheets fit their pages, and no repeated header row carries values.

The page setup is read back from the file by openpyxl (an independent reader of the file
format: print areas, print titles, orientation, fit to pages). The pack itself is printed by
LibreOffice: the demo book's values copy converted to PDF with ``soffice --headless
--convert-to pdf`` (private profile), pages counted by ``pdfinfo``, text layer by
``pdftotext`` and pages drawn by ``pdftoppm`` (poppler-utils) into
``test-artifacts/libreoffice/`` for a person to look at. Target: at most 12 pages (issue 13).
"""

from __future__ import annotations

import re
import shutil
import subprocess
from pathlib import Path

import pytest

pytest.importorskip("openpyxl", reason="openpyxl is not installed")

from openpyxl import load_workbook  # noqa: E402
from openpyxl.utils.cell import range_boundaries  # noqa: E402

from errdist.workbook.layout import (  # noqa: E402
    DATA_PRINT_NOTE,
    Plan,
    PrintSetup,
    SheetPlan,
)
from errdist.workbook.writer import check_repeat_rows, print_title, write_plan  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]
TEMPLATE = ROOT / "workbook_template" / "errdist-monthly-risk.xlsx"
ARTIFACTS = ROOT / "test-artifacts" / "libreoffice"
MAX_PAGES = 12  # issue 13: "Printing the demo book (PDF via LibreOffice) <= 12 pages"
DATA_SHEETS = ("Prices", "Returns")


# ------------------------------------------------------------------ the page setup, in the file


@pytest.fixture(scope="module")
def book():
    return load_workbook(TEMPLATE)


def test_data_sheets_print_their_notes_not_their_rows(book) -> None:
    for name in DATA_SHEETS:
        ws = book[name]
        area = ws.print_area
        assert area, name
        min_col, min_row, max_col, max_row = range_boundaries(area.split("!")[-1])
        # The data (dates and values in columns A:B, one row per day) are outside the area.
        assert min_col > 2 and max_row < 10, (name, area)
        texts = [ws.cell(r, min_col).value for r in range(min_row, max_row + 1)]
        assert texts[-2].startswith("Printing shows these notes only: the data in A1:B")
        assert "clear the print area" in texts[-1]
        # The data range named in the note is the sheet's data (openpyxl's own extent).
        named = re.search(r"the data in (A1:B\d+)", texts[-2]).group(1)
        assert named == f"A1:B{ws.max_row}", (name, named, ws.max_row)


def test_repeated_header_rows_hold_headings_only(book) -> None:
    # Common practice, no source: a row printed at the top of every page is a header; a
    # value in it would be printed again on each page as if it belonged there.
    checked = 0
    for ws in book.worksheets:
        rows = ws.print_title_rows
        if not rows:
            continue
        first, last = (int(x) for x in rows.replace("$", "").split(":"))
        area = ws.print_area
        cols = range(1, ws.max_column + 1)
        if area:
            c0, _, c1, _ = range_boundaries(area.split("!")[-1])
            cols = range(c0, c1 + 1)
        for r in range(first, last + 1):
            for c in cols:
                v = ws.cell(r, c).value
                assert v is None or (isinstance(v, str) and not v.startswith("=")), (
                    ws.title,
                    ws.cell(r, c).coordinate,
                    v,
                )
                checked += 1
    assert checked > 0


def test_analysis_sheets_fit_one_page_and_every_sheet_fits_the_width(book) -> None:
    one_page = {"Calibration", "Risk", "Fit check", "Backtest", "Models", "Forecasts"}
    fitted = {"Guide": 1, "Charts": 2}  # the guide on one portrait page, five charts on two
    for ws in book.worksheets:
        # ECMA-376 Part 1, 18.3.1.63 pageSetup: fitToWidth and fitToHeight default to 1
        # (an absent attribute, None here); 0 means as many pages as needed.
        wide, tall = (
            1 if v is None else int(v)
            for v in (ws.page_setup.fitToWidth, ws.page_setup.fitToHeight)
        )
        assert ws.sheet_properties.pageSetUpPr.fitToPage, ws.title
        assert wide == 1, ws.title
        assert tall == (1 if ws.title in one_page else fitted.get(ws.title, 0)), ws.title
        if ws.title in one_page:
            assert ws.page_setup.orientation == "landscape", ws.title
    assert book["Charts"].page_setup.orientation in (None, "portrait")
    # The Backtest prints its summaries; the daily table (from row 8 down) is data.
    _, min_row, _, max_row = range_boundaries(book["Backtest"].print_area.split("!")[-1])
    assert max_row < 40


# ------------------------------------------------------------------ the declarations, unit


def _sheet_with_header_row() -> SheetPlan:
    sp = SheetPlan("Table")
    sp.text("A1", "Date", "head_r")
    sp.text("B1", "Value", "head_r")
    for i in range(2, 50):
        sp.number(f"B{i}", float(i))
    sp.repeat_rows = (0, 0)
    return sp


def test_a_repeated_row_with_a_value_is_refused() -> None:
    sp = _sheet_with_header_row()
    check_repeat_rows(sp)  # headings only: accepted
    sp.formula("D1", "=SUM(B2:B49)")
    with pytest.raises(ValueError, match=r"Table: row 1 is repeated .* D1 in it holds a value"):
        check_repeat_rows(sp)
    sp.print_area = "A1:B49"  # the value is outside what is printed: accepted
    check_repeat_rows(sp)
    plan = Plan(sheets=[sp])
    sp.print_area = ""
    with pytest.raises(ValueError, match="holds a value"):
        write_plan(plan, Path("/nonexistent-dir/never-written.xlsx"))


def test_data_sheet_declaration_names_the_rows_left_out_and_widens_to_its_text() -> None:
    sp = _sheet_with_header_row()
    sp.width("D", 20)
    sp.text("D1", "A note of about sixty characters, longer than column D is.")
    sp.apply_print(PrintSetup(data=True, area="D1:D3"))
    notes = [e.value for e in sp.entries if e.col == 3 and e.row in (1, 2)]
    assert notes == [DATA_PRINT_NOTE[0].format(data="A1:B49"), DATA_PRINT_NOTE[1]]
    # 1.2 characters a width unit: the longest line (the second note) needs its columns.
    first, last = sp.print_area.split(":")
    assert first == "D1" and last[-1] == "3"
    widths = 20 + 8.43 * (ord(last[0]) - ord("D"))
    assert widths >= len(DATA_PRINT_NOTE[1]) / 1.2 > widths - 8.43
    with pytest.raises(ValueError, match="must be empty"):
        sp.apply_print(PrintSetup(data=True, area="D1:D3"))


def test_fitting_to_one_page_drops_manual_breaks_and_a_cut_title_goes_to_the_header() -> None:
    sp = _sheet_with_header_row()
    sp.page_breaks = [20]
    sp.apply_print(PrintSetup(landscape=True, pages_tall=1, repeat_header=False))
    assert (sp.landscape, sp.pages_tall, sp.page_breaks, sp.repeat_rows) == (True, 1, [], None)
    titled = SheetPlan("T")
    titled.text("A1", "Title & more", "title")
    titled.text("A2", "Sub", "subtitle")
    assert print_title(titled) == ""  # no print area: the title prints itself
    titled.print_area = "H4:L20"
    assert print_title(titled) == "Title & more\nSub"


# ------------------------------------------------------------------ printed by LibreOffice


def _need_tools() -> None:
    for tool in ("soffice", "pdftotext", "pdftoppm", "pdfinfo"):
        if shutil.which(tool) is None:
            pytest.skip(f"{tool} is not installed (libreoffice-calc, poppler-utils)")


@pytest.mark.libreoffice
def test_the_demo_book_prints_a_short_pack_without_error_texts(tmp_path: Path) -> None:
    _need_tools()
    from errdist.cli import main

    live, copy = tmp_path / "demo.xlsx", tmp_path / "demo-values.xlsx"
    assert main(["demo", "--out", str(live), "--values-copy", str(copy)]) == 0
    profile = (tmp_path / "profile").resolve().as_uri()
    subprocess.run(
        ["soffice", "--headless", "--norestore", f"-env:UserInstallation={profile}"]
        + ["--convert-to", "pdf", "--outdir", str(tmp_path), str(copy)],
        stdin=subprocess.DEVNULL,
        capture_output=True,
        timeout=300,
        check=True,
    )
    pdf = tmp_path / "demo-values.pdf"
    info = subprocess.run(["pdfinfo", str(pdf)], capture_output=True, text=True, check=True)
    pages = int(re.search(r"^Pages:\s+(\d+)", info.stdout, re.MULTILINE).group(1))
    text = subprocess.run(
        ["pdftotext", "-layout", str(pdf), "-"], capture_output=True, text=True, check=True
    ).stdout
    page_texts = text.split("\f")[:pages]
    # Measured 2026-12-02: 84 pages before the print declarations, 10 after.
    assert pages <= MAX_PAGES, pages
    # The Guide explains in words what a reader without the add-in sees ("#NAME?").
    errors = [
        line
        for line in text.splitlines()
        if ("#NAME?" in line or "Err:" in line) and "show #NAME? as soon" not in line
    ]
    assert errors == []
    # Every sheet prints (its name in a page footer) and the data do not: a printed price
    # table would put hundreds of dates on the pages.
    footers = {p.strip().splitlines()[-1].split()[0] for p in page_texts if p.strip()}
    book = load_workbook(copy, read_only=True)
    assert {name.split()[0] for name in book.sheetnames} <= footers, footers
    dates = len(re.findall(r"\b20\d\d-\d\d-\d\d\b", text))
    assert dates < 20, dates
    assert "Printing shows these notes only: the data in A1:B" in text
    ARTIFACTS.mkdir(parents=True, exist_ok=True)
    subprocess.run(
        ["pdftoppm", "-r", "60", "-png", str(pdf), str(ARTIFACTS / "print-pack")],
        check=True,
        timeout=120,
    )
