"""Reading a prices file: detection, and the bad-input matrix (each message names the rows).

Row numbers are the file's own as a user sees them: the header is row 1.
"""

from __future__ import annotations

import datetime as dt
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from errdist.data.prices_io import MAX_AS_OF_GAP_DAYS, MIN_RETURNS, read_prices
from errdist.errors import DomainError, InputTypeError, InsufficientDataError

N = MIN_RETURNS + 10  # comfortably above the minimum


def _dates(n: int = N) -> list[dt.date]:
    return [d.date() for d in pd.bdate_range("2026-01-01", periods=n)]


def _prices(n: int = N) -> list[float]:
    return [round(100.0 * 1.001**i, 4) for i in range(n)]


def _csv(path: Path, rows: list[list[object]], header=("Date", "Price"), sep=",") -> Path:
    lines = [sep.join(header)] + [sep.join("" if v is None else str(v) for v in r) for r in rows]
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return path


def _rows() -> list[list[object]]:
    return [[d.isoformat(), p] for d, p in zip(_dates(), _prices(), strict=True)]


def test_reads_valid_csv(tmp_path):
    df = read_prices(_csv(tmp_path / "p.csv", _rows()))
    assert list(df.columns) == ["date", "price"]
    assert len(df) == N
    assert df["date"].iloc[0] == pd.Timestamp("2026-01-01")
    np.testing.assert_array_equal(df["price"].to_numpy(), np.array(_prices()))
    assert df.attrs["rows"] == (2, N + 1)  # header is row 1
    assert df.attrs["date_column"] == "Date" and df.attrs["price_column"] == "Price"


def test_detects_columns_among_others(tmp_path):
    rows = [
        [f"x{i}", d.isoformat(), p, 1000 + i]
        for i, (d, p) in enumerate(zip(_dates(), _prices(), strict=True))
    ]
    p = _csv(tmp_path / "p.csv", rows, header=("Ticker", "Day", "Close", "Volume"))
    df = read_prices(p)
    assert df.attrs["date_column"] == "Day" and df.attrs["price_column"] == "Close"
    df2 = read_prices(p, date_column="day", price_column="VOLUME")
    assert df2["price"].iloc[0] == 1000.0


def test_semicolon_decimal_comma_and_day_first(tmp_path):
    rows = [
        [d.strftime("%d.%m.%Y"), f"{p:.4f}".replace(".", ",")]
        for d, p in zip(_dates(), _prices(), strict=True)
    ]
    df = read_prices(_csv(tmp_path / "p.csv", rows, sep=";"))
    assert df["date"].iloc[-1] == pd.Timestamp(_dates()[-1])
    assert df["price"].iloc[-1] == pytest.approx(_prices()[-1])


def test_as_of_cuts_later_rows(tmp_path):
    cut = _dates()[-5]
    df = read_prices(_csv(tmp_path / "p.csv", _rows()), as_of=cut.isoformat())
    assert df["date"].iloc[-1] == pd.Timestamp(cut) and len(df) == N - 4


def test_reads_xlsx_with_date_cells(tmp_path):
    xlsxwriter = pytest.importorskip("xlsxwriter", reason="XlsxWriter not installed")
    path = tmp_path / "p.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("Prices")
    fmt = wb.add_format({"num_format": "yyyy-mm-dd"})
    ws.write_row(0, 0, ["Date", "NAV"])
    for i, (d, p) in enumerate(zip(_dates(), _prices(), strict=True)):
        ws.write_datetime(i + 1, 0, dt.datetime(d.year, d.month, d.day), fmt)
        ws.write_number(i + 1, 1, p)
    wb.close()
    df = read_prices(path)
    assert len(df) == N and df["price"].iloc[3] == _prices()[3]
    assert df["date"].iloc[3] == pd.Timestamp(_dates()[3])


# The bad-input matrix: (mutation of the rows, error class, text that must appear).
# Data row i (0-based) is file row i + 2.


def _blank_date(rows):
    rows[4][0] = ""
    return rows


def _blank_price(rows):
    rows[6][1] = ""
    rows[9][1] = ""
    return rows


def _text_price(rows):
    rows[3][1] = "n/a"
    return rows


def _zero_price(rows):
    rows[10][1] = 0
    rows[12][1] = -5
    return rows


def _duplicate_date(rows):
    rows[8][0] = rows[7][0]
    return rows


def _unsorted(rows):
    rows[14], rows[15] = rows[15], rows[14]
    return rows


def _bad_date(rows):
    rows[5][0] = "2026-02-30"
    return rows


MATRIX = [
    (_blank_date, InputTypeError, "row 6: the date is blank"),
    (_blank_price, InputTypeError, "rows 8, 11: the price is blank"),
    (_text_price, InputTypeError, "row 5: the price is not a number"),
    (_zero_price, DomainError, "rows 12, 14: prices must be > 0"),
    (_duplicate_date, DomainError, "rows 9 and 10"),
    (_unsorted, DomainError, "row 17"),
    (_bad_date, InputTypeError, "row 7: not a date"),
]


@pytest.mark.parametrize(("mutate", "cls", "text"), MATRIX, ids=[m[0].__name__ for m in MATRIX])
def test_bad_input_names_rows(tmp_path, mutate, cls, text):
    path = _csv(tmp_path / "bad.csv", mutate(_rows()))
    with pytest.raises(cls) as info:
        read_prices(path)
    assert text in str(info.value)
    assert list(tmp_path.iterdir()) == [path]  # nothing written


def test_newest_first_is_read_in_reverse(tmp_path):
    # Expected values are the file's own rows, oldest first; file rows stay the file's numbers.
    df = read_prices(_csv(tmp_path / "p.csv", _rows()[::-1]))
    assert list(df["date"].dt.date) == _dates()
    assert list(df["price"]) == _prices()
    assert df.attrs["newest_first"] and df.attrs["rows"] == (N + 1, 2)
    cut = read_prices(_csv(tmp_path / "p.csv", _rows()[::-1]), as_of=_dates()[-2].isoformat())
    assert cut["date"].iloc[-1] == pd.Timestamp(_dates()[-2]) and cut.attrs["rows"] == (N + 1, 3)
    # Disorder that is not a clean reversal is still refused.
    rows = _rows()[::-1]
    rows[3], rows[4] = rows[4], rows[3]
    with pytest.raises(DomainError, match="not in increasing order"):
        read_prices(_csv(tmp_path / "q.csv", rows))


def test_spreadsheet_csv_export_bom_crlf_trailing_blanks(tmp_path):
    # What a spreadsheet's "CSV UTF-8" export looks like: BOM, CRLF, blank lines at the end.
    text = "Valuation date;NAV\r\n" + "".join(
        f"{d.isoformat()};{p:.4f}\r\n" for d, p in zip(_dates(), _prices(), strict=True)
    )
    path = tmp_path / "nav.csv"
    path.write_bytes(b"\xef\xbb\xbf" + (text + "\r\n;\r\n\r\n").encode("utf-8"))
    df = read_prices(path)
    assert df.attrs["date_column"] == "Valuation date" and df.attrs["price_column"] == "NAV"
    assert list(df["price"]) == _prices() and df.attrs["rows"] == (2, N + 1)


def test_spreadsheet_sep_line_is_skipped(tmp_path):
    # A first line "sep=;" tells a spreadsheet the delimiter; the header is the next line.
    path = tmp_path / "p.csv"
    body = "".join(
        f"{d.isoformat()};{p:.4f}\n".replace(".", ",")
        for d, p in zip(_dates(), _prices(), strict=True)
    )
    path.write_text("sep=;\nDate;Price\n" + body, encoding="utf-8")
    df = read_prices(path)
    assert list(df["price"]) == _prices() and df.attrs["rows"] == (3, N + 2)


@pytest.mark.parametrize("fmt", ["%d %b %Y", "%d-%b-%Y", "%b %d, %Y", "%d %B %Y"])
def test_month_name_dates(tmp_path, fmt):
    rows = [[f'"{d.strftime(fmt)}"', p] for d, p in zip(_dates(), _prices(), strict=True)]
    df = read_prices(_csv(tmp_path / "p.csv", rows))
    assert list(df["date"].dt.date) == _dates()


def test_no_date_column_names_the_known_formats(tmp_path):
    rows = [[d.strftime("%d/%m/%y"), p] for d, p in zip(_dates(), _prices(), strict=True)]
    with pytest.raises(InputTypeError, match="no column holds dates in a known format"):
        read_prices(_csv(tmp_path / "p.csv", rows))


@pytest.mark.parametrize(
    ("sep", "text", "value"),
    [
        (",", '"1,234.56"', 1234.56),  # quoted, as a spreadsheet writes it
        (",", '"12,345,678"', 12345678.0),
        (";", "1.234,56", 1234.56),
        (";", "1 234,56", 1234.56),
        (";", "1,234.56", 1234.56),  # both separators: the last one is the decimal
        (";", "1,234", 1.234),  # semicolon file: a lone comma is the decimal comma
    ],
)
def test_thousands_separators(tmp_path, sep, text, value):
    rows = [[d.isoformat(), p] for d, p in zip(_dates(), _prices(), strict=True)]
    rows[3][1] = text
    df = read_prices(_csv(tmp_path / "p.csv", rows, sep=sep))
    assert df["price"].iloc[3] == value and df["price"].iloc[4] == _prices()[4]


def test_unquoted_thousands_separator_is_refused(tmp_path):
    # 2026-01-06,1,234.56 splits into three cells; reading '1' as the price would be wrong.
    rows = [[d.isoformat(), p] for d, p in zip(_dates(), _prices(), strict=True)]
    rows[3][1] = "1,234.56"
    rows[7][1] = "2,000"
    with pytest.raises(InputTypeError, match=r"rows 5, 9: more values than the 2 column"):
        read_prices(_csv(tmp_path / "p.csv", rows))


def test_as_of_after_the_last_date(tmp_path):
    path = _csv(tmp_path / "p.csv", _rows())
    last = _dates()[-1]
    ok = last + dt.timedelta(days=MAX_AS_OF_GAP_DAYS)  # a weekend or holiday gap
    assert read_prices(path, as_of=ok.isoformat())["date"].iloc[-1] == pd.Timestamp(last)
    late = last + dt.timedelta(days=MAX_AS_OF_GAP_DAYS + 1)  # the file lacks recent prices
    with pytest.raises(InsufficientDataError, match=f"use --as-of {last.isoformat()}") as info:
        read_prices(path, as_of=late.isoformat())
    assert f"row {N + 1}" in str(info.value)


def test_xlsx_from_a_spreadsheet_with_extra_columns(tmp_path):
    openpyxl = pytest.importorskip("openpyxl", reason="openpyxl not installed")
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.append(["Fund", "Valuation date", "Open", "NAV", "Comment"])
    for d, p in zip(_dates(), _prices(), strict=True):
        ws.append(["Meridian", dt.datetime(d.year, d.month, d.day), p * 0.99, p, None])
        ws.cell(ws.max_row, 2).number_format = "dd/mm/yyyy"
    wb.save(tmp_path / "p.xlsx")
    df = read_prices(tmp_path / "p.xlsx")
    assert df.attrs["date_column"] == "Valuation date" and df.attrs["price_column"] == "NAV"
    assert list(df["date"].dt.date) == _dates() and list(df["price"]) == _prices()


def test_too_few_rows(tmp_path):
    rows = _rows()[:MIN_RETURNS]  # MIN_RETURNS prices give MIN_RETURNS - 1 returns
    with pytest.raises(InsufficientDataError, match=f"at least {MIN_RETURNS} returns"):
        read_prices(_csv(tmp_path / "p.csv", rows))
    read_prices(_csv(tmp_path / "q.csv", _rows()[: MIN_RETURNS + 1]))  # exactly enough


def test_as_of_before_first_date(tmp_path):
    with pytest.raises(InsufficientDataError, match="before the first date"):
        read_prices(_csv(tmp_path / "p.csv", _rows()), as_of="2020-01-01")
    with pytest.raises(InputTypeError, match="--as-of must be a date"):
        read_prices(_csv(tmp_path / "p.csv", _rows()), as_of="last friday")


def test_ambiguous_day_month(tmp_path):
    # Day-first dates: 13/01/2026 and later rule out month-first, so they are read day-first.
    rows = [[d.strftime("%d/%m/%Y"), p] for d, p in zip(_dates(), _prices(), strict=True)]
    df = read_prices(_csv(tmp_path / "p.csv", rows))
    assert df["date"].iloc[1] == pd.Timestamp("2026-01-02")
    assert df["date"].iloc[-1] == pd.Timestamp(_dates()[-1])
    # When every date fits both readings and they differ, the reader refuses to guess.
    only_low = [
        [f"0{d}/0{m}/2026", 100 + i] for i, (d, m) in enumerate([(1, 2), (2, 3), (3, 4)] * 20)
    ]
    with pytest.raises(InputTypeError, match="day-first or month-first"):
        read_prices(_csv(tmp_path / "amb.csv", only_low))


def test_missing_named_column(tmp_path):
    with pytest.raises(InputTypeError, match="no price column named 'Close'"):
        read_prices(_csv(tmp_path / "p.csv", _rows()), price_column="Close")


def test_several_numeric_columns_need_a_name(tmp_path):
    rows = [[d.isoformat(), p, p * 2] for d, p in zip(_dates(), _prices(), strict=True)]
    with pytest.raises(InputTypeError, match="several columns hold numbers"):
        read_prices(_csv(tmp_path / "p.csv", rows, header=("Date", "A", "B")))


def test_unknown_extension_and_missing_file(tmp_path):
    with pytest.raises(FileNotFoundError):
        read_prices(tmp_path / "absent.csv")
    (tmp_path / "p.json").write_text("{}")
    with pytest.raises(InputTypeError, match="expected a .csv or .xlsx"):
        read_prices(tmp_path / "p.json")
