"""Read and validate a prices file (CSV or .xlsx) for the monthly refresh.

The file holds one row per date with at least a date column and a price column, under a header
row. Row numbers in every message are the file's own, as the user sees them: the header is
row 1 in a CSV file (the first line), and rows are the sheet's row numbers in a workbook.

Columns are found by parsing (or named with ``date_column`` / ``price_column``):

- the date column is the first column whose non-blank values all read as dates (ISO
  ``YYYY-MM-DD`` and ``YYYY/MM/DD``, ``DD.MM.YYYY``, ``DD/MM/YYYY`` or ``MM/DD/YYYY`` when only
  one of the two fits every row, English month names as in ``30 Nov 2026``, ``30-Nov-2026``
  or ``Nov 30, 2026``, or real date cells in a workbook);
- the price column is the only other column whose values are mostly numbers; with several,
  the first whose header is one of ``price, adj close, adjusted close, close, nav, value``.

Rules (each violation raises, naming the rows; nothing is ever written):

==========================================  ==========================  =========
problem                                     class                       code
==========================================  ==========================  =========
blank date or blank price in a data row     InputTypeError              #VALUE!
text that is not a date / not a number      InputTypeError              #VALUE!
price <= 0 or not finite                    DomainError                 #NUM!
the same date twice                         DomainError                 #NUM!
dates not in increasing order               DomainError                 #NUM!
fewer than MIN_RETURNS + 1 prices           InsufficientDataError       #N/A
==========================================  ==========================  =========

Prices may carry thousands separators: ``1,234.56`` (comma; quoted in a comma-separated
file), ``1.234,56`` or ``1 234,56`` (decimal comma, read only in semicolon-separated files,
where ``1,234`` is one point two three four). A CSV row with more values than the header is
refused: an unquoted ``1,234.56`` in a comma-separated file splits into two cells.

Fully blank rows are ignored. A file sorted newest first throughout is read in reverse; any
other disorder is refused. ``as_of`` keeps the rows up to and including that date, and must
not be more than ``MAX_AS_OF_GAP_DAYS`` after the last date (a file not yet updated).
"""

from __future__ import annotations

import csv
import datetime as dt
import io
import math
import os
import re
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import pandas as pd

from errdist.errors import DomainError, InputTypeError, InsufficientDataError
from errdist.workbook import safety

MIN_RETURNS = 30
"""Fewest daily returns accepted (31 prices). Below this even the sample kurtosis is mostly
noise (its standard error is about sqrt(24/n) ~ 0.9 at n = 30); a year of data (250+) is the
practical minimum for a stable tail fit and the backtest."""

MAX_CSV_BYTES = 50 * 1024 * 1024
"""Largest CSV file accepted: 50 MB."""

PRICE_NAMES = ("price", "adj close", "adj_close", "adjusted close", "close", "nav", "value")
"""Header names preferred for the price column when several columns hold numbers."""

MAX_AS_OF_GAP_DAYS = 10
"""Most calendar days ``as_of`` may fall after the file's last date: weekends and holiday
closures leave gaps of a few days (common practice, no source); a longer gap means the file
lacks the latest prices."""

_DATE_FORMATS = (
    "%Y-%m-%d",
    "%Y/%m/%d",
    "%d.%m.%Y",
    "%d/%m/%Y",
    "%m/%d/%Y",
    "%d-%m-%Y",
    "%d %b %Y",
    "%d %B %Y",
    "%d-%b-%Y",
    "%b %d, %Y",
    "%B %d, %Y",
)
_DATE_EXAMPLES = "2026-11-30, 30.11.2026, 30/11/2026 or 30 Nov 2026"
_COMMA_THOUSANDS = re.compile(r"[-+]?\d{1,3}(,\d{3})+(\.\d+)?")
_ISO_WITH_TIME = re.compile(r"^\d{4}-\d{2}-\d{2}[ T]\d{2}:\d{2}(:\d{2}(\.\d+)?)?$")


@dataclass
class _Table:
    header: list[str]
    rows: list[tuple[int, list[Any]]]  # (file row number, cells)
    decimal_comma: bool = False


def _rows_text(rows: Sequence[int], limit: int = 10) -> str:
    rows = sorted(set(rows))
    shown = ", ".join(str(r) for r in rows[:limit])
    more = f" and {len(rows) - limit} more" if len(rows) > limit else ""
    return f"row{'s' if len(rows) > 1 else ''} {shown}{more}"


def _blank(v: Any) -> bool:
    return v is None or (isinstance(v, str) and not v.strip())


# ----------------------------------------------------------------------------------------------
# Reading the raw table


def _read_csv(path: Path) -> _Table:
    size = path.stat().st_size
    if size > MAX_CSV_BYTES:
        raise InputTypeError(
            f"{path}: file is {size / 1e6:.1f} MB, larger than the "
            f"{MAX_CSV_BYTES / 1e6:.0f} MB limit for a prices file"
        )
    raw = path.read_bytes()
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError:
        text = raw.decode("cp1252", errors="replace")
    if "\x00" in text:
        raise InputTypeError(f"{path}: not a text (CSV) file")
    first = next((ln for ln in text.splitlines() if ln.strip()), "")
    sep_line = re.fullmatch(r"\s*sep=(.)\s*", first)  # a spreadsheet's delimiter hint line
    if sep_line:
        delimiter = sep_line.group(1)
    else:
        counts = {d: first.count(d) for d in (",", ";", "\t")}
        delimiter = max(counts, key=lambda d: counts[d]) if any(counts.values()) else ","
    reader = csv.reader(io.StringIO(text, newline=""), delimiter=delimiter)
    header: list[str] | None = None
    rows: list[tuple[int, list[Any]]] = []
    start = 1
    if sep_line:
        for cells in reader:  # skip up to and including the hint line
            start = reader.line_num + 1
            if not all(_blank(c) for c in cells):
                break
    for cells in reader:
        line = start
        start = reader.line_num + 1
        if header is None:
            if all(_blank(c) for c in cells):
                continue
            header = [c.strip() for c in cells]
            continue
        if all(_blank(c) for c in cells):
            continue
        rows.append((line, [c.strip() for c in cells]))
    if header is None:
        raise InputTypeError(f"{path}: the file is empty")
    wide = [r for r, cells in rows if any(not _blank(c) for c in cells[len(header) :])]
    if wide:
        hint = '; a number with a thousands separator must be in quotes ("1,234.56")'
        raise InputTypeError(
            f"{path}: {_rows_text(wide)}: more values than the {len(header)} column headers"
            + (hint if delimiter == "," else "")
        )
    return _Table(header, rows, decimal_comma=delimiter == ";")


def _first_sheet_rows_calamine(path: Path) -> list[list[Any]] | None:
    """The first sheet's rows from row 1 with python-calamine (8-12x faster than openpyxl
    on price files), or None when it is not installed. Dates come as ``datetime.date``,
    blanks as ``""``."""
    try:
        from python_calamine import CalamineWorkbook
    except ImportError:
        return None
    try:
        book = CalamineWorkbook.from_path(str(path))
        try:
            return book.get_sheet_by_index(0).to_python(skip_empty_area=False)
        finally:
            book.close()
    except Exception:  # noqa: BLE001 - a file calamine cannot read: openpyxl says why
        return None


def _first_sheet_rows_openpyxl(path: Path) -> list[list[Any]]:
    from openpyxl import load_workbook

    book = load_workbook(path, read_only=True, data_only=True)
    try:
        return [list(values) for values in book.worksheets[0].iter_rows(values_only=True)]
    finally:
        book.close()


#: Read .xlsx prices with python-calamine when it is installed (False: always openpyxl).
USE_CALAMINE = True


def _read_xlsx(path: Path) -> _Table:
    safety.inspect_xlsx(path)
    safety.defuse_xml()
    sheet = _first_sheet_rows_calamine(path) if USE_CALAMINE else None
    if sheet is None:
        sheet = _first_sheet_rows_openpyxl(path)
    header: list[str] | None = None
    rows: list[tuple[int, list[Any]]] = []
    for r, cells in enumerate(sheet, start=1):
        if all(_blank(c) for c in cells):
            continue
        if header is None:
            header = ["" if c is None else str(c).strip() for c in cells]
            continue
        rows.append((r, cells))
    if header is None:
        raise InputTypeError(f"{path}: the first sheet is empty")
    return _Table(header, rows)


# ----------------------------------------------------------------------------------------------
# Parsing values


def _parse_number(v: Any, decimal_comma: bool) -> float | None:
    """A cell as a number, or None when it is not one (text)."""
    if isinstance(v, bool):
        return None
    if isinstance(v, (int, float)):
        return float(v)
    if isinstance(v, str):
        s = v.strip().replace("\u00a0", "").replace(" ", "")
        if decimal_comma and re.fullmatch(r"[-+]?[\d.]*,\d+", s):
            s = s.replace(".", "").replace(",", ".")
        elif _COMMA_THOUSANDS.fullmatch(s) and not (decimal_comma and "." not in s):
            s = s.replace(",", "")
        try:
            return float(s)
        except ValueError:
            return None
    return None


def _date_from_cell(v: Any) -> dt.date | None:
    if isinstance(v, dt.datetime):
        return v.date()
    if isinstance(v, dt.date):
        return v
    return None


def _parse_date_column(values: list[Any]) -> list[dt.date | None] | None:
    """Dates for a column's non-blank values, or None when they do not all read as dates."""
    present = [v for v in values if not _blank(v)]
    if not present:
        return None
    if all(_date_from_cell(v) is not None for v in present):
        return [None if _blank(v) else _date_from_cell(v) for v in values]
    if not all(isinstance(v, (str, dt.date)) for v in present):
        return None
    texts = [
        v.strip() if isinstance(v, str) else v.isoformat() if isinstance(v, dt.date) else ""
        for v in present
    ]
    fits = []
    for fmt in _DATE_FORMATS:
        try:
            parsed = [_parse_one(t, fmt) for t in texts]
        except ValueError:
            continue
        fits.append((fmt, parsed))
    if not fits:
        return None
    distinct = {tuple(p) for _, p in fits}
    if len(distinct) > 1:
        raise InputTypeError(
            f"dates such as {texts[0]!r} can be read day-first or month-first; "
            "write them as YYYY-MM-DD"
        )
    it = iter(fits[0][1])
    return [None if _blank(v) else next(it) for v in values]


def _parse_one(text: str, fmt: str) -> dt.date:
    if _ISO_WITH_TIME.match(text):
        text = text[:10]
    return dt.datetime.strptime(text, fmt).date()


def _find_column(header: list[str], name: str, what: str, option: str) -> int:
    wanted = name.strip().casefold()
    for i, h in enumerate(header):
        if h.casefold() == wanted:
            return i
    available = ", ".join(repr(h) for h in header if h)
    raise InputTypeError(f"no {what} column named {name!r} (option {option}); columns: {available}")


def _column(table: _Table, i: int) -> list[Any]:
    return [cells[i] if i < len(cells) else None for _, cells in table.rows]


def _is_date_value(v: Any) -> bool:
    if _date_from_cell(v) is not None:
        return True
    if not isinstance(v, str):
        return False
    for fmt in _DATE_FORMATS:
        try:
            _parse_one(v.strip(), fmt)
            return True
        except ValueError:
            pass
    return False


def _detect_date_column(table: _Table) -> int:
    """The first column where most non-blank values read as dates (bad rows named later)."""
    for i in range(len(table.header)):
        vals = [v for v in _column(table, i) if not _blank(v)]
        if vals and sum(_is_date_value(v) for v in vals) >= 0.5 * len(vals):
            return i
    raise InputTypeError(
        f"no column holds dates in a known format ({_DATE_EXAMPLES}); name it with --date-column "
        f"(columns: {', '.join(repr(h) for h in table.header if h)})"
    )


def _detect_price_column(table: _Table, date_col: int) -> int:
    candidates = []
    for i in range(len(table.header)):
        if i == date_col:
            continue
        vals = [v for v in _column(table, i) if not _blank(v)]
        if not vals:
            continue
        numeric = sum(_parse_number(v, table.decimal_comma) is not None for v in vals)
        if numeric >= 0.5 * len(vals):
            candidates.append(i)
    if len(candidates) == 1:
        return candidates[0]
    if not candidates:
        raise InputTypeError(
            "no column holds prices (numbers); name it with --price-column "
            f"(columns: {', '.join(repr(h) for h in table.header if h)})"
        )
    for preferred in PRICE_NAMES:
        for i in candidates:
            if table.header[i].strip().casefold() == preferred:
                return i
    names = ", ".join(repr(table.header[i]) for i in candidates)
    raise InputTypeError(f"several columns hold numbers ({names}); name one with --price-column")


def _parse_as_of(as_of: Any) -> dt.date | None:
    if as_of is None or (isinstance(as_of, str) and not as_of.strip()):
        return None
    if isinstance(as_of, dt.datetime):
        return as_of.date()
    if isinstance(as_of, dt.date):
        return as_of
    if isinstance(as_of, pd.Timestamp):
        return as_of.date()
    try:
        return dt.date.fromisoformat(str(as_of).strip())
    except ValueError:
        raise InputTypeError(f"--as-of must be a date YYYY-MM-DD, got {as_of!r}") from None


# ----------------------------------------------------------------------------------------------
# The reader


def read_prices(
    path: str | os.PathLike[str],
    *,
    date_column: str | None = None,
    price_column: str | None = None,
    as_of: str | dt.date | None = None,
) -> pd.DataFrame:
    """Read a prices file and validate it.

    Parameters
    ----------
    path : path-like
        A ``.csv`` (comma, semicolon or tab separated; UTF-8 or Windows-1252) or ``.xlsx``
        file (its first sheet) with a header row.
    date_column, price_column : str, optional
        Header names of the columns (case-insensitive); detected when omitted.
    as_of : str or date, optional
        Last date to use (``YYYY-MM-DD``); later rows are ignored. Default: the last date.

    Returns
    -------
    pandas.DataFrame
        Columns ``date`` (``datetime64``) and ``price`` (float), oldest first. ``attrs`` holds
        ``source``, ``date_column``, ``price_column``, ``rows`` (file rows of the oldest and
        newest price used) and ``newest_first`` (the file was sorted newest first).

    Raises
    ------
    InputTypeError
        Unreadable file, no date/price column, blank or text values (naming the rows).
    DomainError
        Prices <= 0, repeated dates, dates out of order (naming the rows).
    InsufficientDataError
        Fewer than ``MIN_RETURNS + 1`` prices (after ``as_of``); ``as_of`` before the first
        date or more than ``MAX_AS_OF_GAP_DAYS`` after the last.
    FileNotFoundError
        No such file.
    """
    p = Path(path)
    if not p.exists():
        raise FileNotFoundError(f"{p}: no such file")
    if not p.is_file():
        raise InputTypeError(f"{p}: not a file")
    suffix = p.suffix.lower()
    if suffix in (".xlsx", ".xlsm"):
        table = _read_xlsx(p)
    elif suffix in (".csv", ".txt", ".tsv", ""):
        table = _read_csv(p)
    elif suffix == ".xls":
        raise InputTypeError(f"{p}: old .xls workbooks are not read; save as .xlsx or CSV")
    else:
        raise InputTypeError(f"{p}: expected a .csv or .xlsx file")
    if not table.rows:
        raise InsufficientDataError(f"{p}: no data rows under the header")

    try:
        if date_column is not None:
            dcol = _find_column(table.header, date_column, "date", "--date-column")
        else:
            dcol = _detect_date_column(table)
        if price_column is not None:
            pcol = _find_column(table.header, price_column, "price", "--price-column")
        else:
            pcol = _detect_price_column(table, dcol)
        if pcol == dcol:
            raise InputTypeError("the date and price columns must differ")
    except InputTypeError as exc:
        raise InputTypeError(f"{p}: {exc}") from None

    row_numbers = [r for r, _ in table.rows]
    raw_dates = _column(table, dcol)
    raw_prices = _column(table, pcol)

    blank_dates = [r for r, v in zip(row_numbers, raw_dates, strict=True) if _blank(v)]
    if blank_dates:
        raise InputTypeError(f"{p}: {_rows_text(blank_dates)}: the date is blank")
    try:
        dates = _parse_date_column(raw_dates)
    except InputTypeError as exc:
        raise InputTypeError(f"{p}: {exc}") from None
    if dates is None:
        bad = [r for r, v in zip(row_numbers, raw_dates, strict=True) if not _is_date_value(v)]
        if not bad:  # each reads as a date, but no single format fits them all
            bad = row_numbers
        shown = raw_dates[row_numbers.index(bad[0])]
        raise InputTypeError(
            f"{p}: {_rows_text(bad)}: not a date in column {table.header[dcol]!r} "
            f"(e.g. {shown!r}); use YYYY-MM-DD, one format for the whole column"
        )

    blank_prices = [r for r, v in zip(row_numbers, raw_prices, strict=True) if _blank(v)]
    if blank_prices:
        raise InputTypeError(
            f"{p}: {_rows_text(blank_prices)}: the price is blank; fill it in or delete the row"
        )
    prices: list[float] = []
    text_rows = []
    for r, v in zip(row_numbers, raw_prices, strict=True):
        x = _parse_number(v, table.decimal_comma)
        if x is None:
            text_rows.append(r)
            x = math.nan
        prices.append(x)
    if text_rows:
        example = raw_prices[row_numbers.index(text_rows[0])]
        raise InputTypeError(
            f"{p}: {_rows_text(text_rows)}: the price is not a number "
            f"(e.g. {example!r} in column {table.header[pcol]!r})"
        )
    bad_price = [
        r for r, x in zip(row_numbers, prices, strict=True) if not (math.isfinite(x) and x > 0)
    ]
    if bad_price:
        example = prices[row_numbers.index(bad_price[0])]
        raise DomainError(
            f"{p}: {_rows_text(bad_price)}: prices must be > 0 and finite, got {example:g}"
        )

    seen: dict[dt.date, int] = {}
    dupes = []
    for r, d in zip(row_numbers, dates, strict=True):
        if d in seen:
            dupes.append((seen[d], r, d))
        else:
            seen[d] = r
    if dupes:
        first = dupes[0]
        rows = sorted({x for a, b, _ in dupes for x in (a, b)})
        raise DomainError(
            f"{p}: {_rows_text(rows)}: the same date appears twice "
            f"(rows {first[0]} and {first[1]}: {first[2].isoformat()}); keep one price per date"
        )
    newest_first = len(dates) > 1 and all(
        dates[i] < dates[i - 1]  # type: ignore[operator]
        for i in range(1, len(dates))
    )
    if newest_first:
        dates, prices, row_numbers = dates[::-1], prices[::-1], row_numbers[::-1]
    out_of_order = [
        (row_numbers[i - 1], row_numbers[i])
        for i in range(1, len(dates))
        if dates[i] < dates[i - 1]  # type: ignore[operator]
    ]
    if out_of_order:
        a, b = out_of_order[0]
        raise DomainError(
            f"{p}: {_rows_text([y for _, y in out_of_order])}: dates are not in increasing "
            f"order, e.g. row {b} ({dates[row_numbers.index(b)]}) comes after row {a} "
            f"({dates[row_numbers.index(a)]}); sort the file by date, oldest first"
        )

    keep = len(dates)
    cutoff = _parse_as_of(as_of)
    if cutoff is not None:
        keep = sum(1 for d in dates if d <= cutoff)  # type: ignore[operator]
        if keep == 0:
            raise InsufficientDataError(
                f"{p}: --as-of {cutoff.isoformat()} is before the first date "
                f"{dates[0].isoformat()} (row {row_numbers[0]})"  # type: ignore[union-attr]
            )
        gap = (cutoff - dates[-1]).days  # type: ignore[operator]
        if gap > MAX_AS_OF_GAP_DAYS:
            last = dates[-1].isoformat()  # type: ignore[union-attr]
            raise InsufficientDataError(
                f"{p}: --as-of {cutoff.isoformat()} is {gap} days after the last date {last} "
                f"(row {row_numbers[-1]}); add the missing prices, or use --as-of {last}"
            )
    if keep < MIN_RETURNS + 1:
        upto = f" up to {cutoff.isoformat()}" if cutoff is not None else ""
        raise InsufficientDataError(
            f"{p}: {keep} prices{upto} give {max(keep - 1, 0)} returns; at least "
            f"{MIN_RETURNS} returns ({MIN_RETURNS + 1} prices) are needed"
        )
    df = pd.DataFrame(
        {
            "date": pd.to_datetime(pd.Series(dates[:keep], dtype="object")).astype(
                "datetime64[ns]"
            ),
            "price": pd.Series(prices[:keep], dtype="float64"),
        }
    )
    df.attrs.update(
        source=str(p),
        date_column=table.header[dcol],
        price_column=table.header[pcol],
        rows=(row_numbers[0], row_numbers[keep - 1]),
        newest_first=newest_first,
    )
    return df
