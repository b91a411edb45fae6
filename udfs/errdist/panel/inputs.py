"""Read a panel of price series: a wide or a long table, validated series by series.

Layouts
-------
``wide``
    A date column and one price column per series (the header names the series). A series
    may start later or end earlier than the table: blank cells before its first price and
    after its last are not part of it. A blank *between* two prices is refused, as
    ``errdist refresh`` refuses it.
``long``
    Three columns: date, series name, price — one row per series and date, in any order of
    series (each series' own dates oldest first, or newest first throughout).

File types: CSV and .xlsx (read by :mod:`errdist.data.prices_io`, the reader of
``errdist refresh``) and Parquet (``pandas.read_parquet``; needs ``pyarrow``).

Validation reuses the refresh reader's steps (:func:`~errdist.data.prices_io.check_dates`,
:func:`~errdist.data.prices_io.check_prices`,
:func:`~errdist.data.prices_io.order_and_cut`), so each series gets the same rules and
the same messages as a single-series refresh. A problem of the whole file (unreadable, no
date column) raises; a problem of one series is kept as that series' ``reason`` and the other
series go on.

All series are cut at one ``as_of`` date: the one given, or the table's last date. A series
whose last price is more than :data:`~errdist.data.prices_io.MAX_AS_OF_GAP_DAYS` days
before it is refused as stale, with refresh's message.
"""

from __future__ import annotations

import datetime as dt
import os
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Literal

import numpy as np
import pandas as pd

from errdist.data import prices_io as pio
from errdist.data.returns import returns_from_prices
from errdist.errors import InputTypeError, InsufficientDataError

__all__ = ["LAYOUTS", "MAX_PANEL_CSV_BYTES", "PanelInput", "SeriesData", "read_panel"]

LAYOUTS = ("auto", "wide", "long")
"""Accepted values of ``layout``."""

MAX_PANEL_CSV_BYTES = 1024 * 1024 * 1024
"""Largest panel CSV file read: 1 GB (a long table of 2,000 series x 5 years is ~80 MB)."""

SERIES_NAMES = ("series", "name", "ticker", "symbol", "id", "fund", "asset", "factor")
"""Header names taken as the series column of a long table."""


@dataclass
class SeriesData:
    """One series of the panel: its returns, or the reason it cannot be used.

    Attributes
    ----------
    name : str
        The series name (wide: the column header; long: the series column's value).
    index : int
        Position in the input (column order, or order of first appearance), from 0.
    returns : numpy.ndarray or None
        Daily log returns of the prices used, oldest first; None when ``reason`` is set.
    prices : pandas.DataFrame or None
        The validated prices (``date``, ``price``) as :func:`read_prices` returns them.
    reason : str
        Why the series cannot be used ("" when it can).
    """

    name: str
    index: int
    returns: np.ndarray | None = None
    prices: pd.DataFrame | None = field(default=None, repr=False)
    reason: str = ""

    @property
    def first_date(self) -> dt.date | None:
        return None if self.prices is None else self.prices["date"].iloc[0].date()

    @property
    def last_date(self) -> dt.date | None:
        return None if self.prices is None else self.prices["date"].iloc[-1].date()


@dataclass
class PanelInput:
    """A validated panel: every series of the file, usable or not, in input order."""

    source: str
    layout: str
    as_of: dt.date
    series: list[SeriesData]

    @property
    def usable(self) -> list[SeriesData]:
        return [s for s in self.series if not s.reason]

    @property
    def failed(self) -> list[SeriesData]:
        return [s for s in self.series if s.reason]


# ----------------------------------------------------------------------------------------------
# Reading


def _read_parquet(path: Path) -> pio.RawTable:
    try:
        frame = pd.read_parquet(path)
    except ImportError:
        raise InputTypeError(
            f"{path}: reading Parquet needs pyarrow: pip install errdist[parquet]"
        ) from None
    except Exception as exc:  # pyarrow raises its own error types for a damaged file
        raise InputTypeError(f"{path}: not a readable Parquet file ({exc})") from None
    frame = frame.reset_index() if frame.index.name is not None else frame
    header = [str(c).strip() for c in frame.columns]
    cells = frame.astype(object).where(frame.notna(), None).to_numpy().tolist()
    # Row numbers as in a CSV export of the table: the header is row 1.
    return pio.RawTable(header, [(i + 2, row) for i, row in enumerate(cells)])


def _read_raw(path: Path) -> pio.RawTable:
    if not path.exists():
        raise FileNotFoundError(f"{path}: no such file")
    if path.suffix.lower() in (".parquet", ".pq"):
        table = _read_parquet(path)
        if not table.rows:
            raise InsufficientDataError(f"{path}: no data rows under the header")
        return table
    try:
        return pio.read_table(path, max_csv_bytes=MAX_PANEL_CSV_BYTES)
    except InputTypeError as exc:
        if "expected a .csv or .xlsx file" in str(exc):
            raise InputTypeError(f"{path}: expected a .csv, .xlsx or .parquet file") from None
        raise


def _numeric_share(table: pio.RawTable, i: int) -> float:
    vals = [v for v in pio.column(table, i) if not pio._blank(v)]
    if not vals:
        return 0.0
    return sum(pio._parse_number(v, table.decimal_comma) is not None for v in vals) / len(vals)


def _series_column(table: pio.RawTable, dcol: int, series_column: str | None) -> int | None:
    """The series column of a long table, or None for a wide one."""
    if series_column is not None:
        wanted = series_column.strip().casefold()
        for i, h in enumerate(table.header):
            if h.casefold() == wanted:
                return i
        names = ", ".join(repr(h) for h in table.header if h)
        raise InputTypeError(f"no series column named {series_column!r}; columns: {names}")
    for i, h in enumerate(table.header):
        if i != dcol and h.strip().casefold() in SERIES_NAMES and _numeric_share(table, i) < 0.5:
            return i
    return None


def read_panel(
    path: str | os.PathLike[str],
    *,
    layout: Literal["auto", "wide", "long"] = "auto",
    date_column: str | None = None,
    series_column: str | None = None,
    price_column: str | None = None,
    as_of: str | dt.date | None = None,
) -> PanelInput:
    """Read and validate a panel of price series.

    Parameters
    ----------
    path : path-like
        ``.csv``, ``.xlsx`` or ``.parquet`` file with a header row.
    layout : {"auto", "wide", "long"}
        ``"auto"``: long when a column is named ``series``, ``name``, ``ticker``, ``symbol``,
        ``id``, ``fund``, ``asset`` or ``factor`` (or ``series_column`` is given) and holds
        text; wide otherwise.
    date_column, series_column, price_column : str, optional
        Header names (case-insensitive); detected when omitted. ``price_column`` applies to
        a long table.
    as_of : str or date, optional
        Last date for every series (``YYYY-MM-DD``); default the table's last date.

    Returns
    -------
    PanelInput

    Raises
    ------
    FileNotFoundError, InputTypeError, InsufficientDataError
        Problems of the whole file: no such file, unreadable, no date column, no series.
    """
    if layout not in LAYOUTS:
        raise InputTypeError(f"layout must be one of {', '.join(LAYOUTS)}, got {layout!r}")
    p = Path(path)
    table = _read_raw(p)
    dcol = pio.find_date_column(p, table, date_column)
    scol = _series_column(table, dcol, series_column)
    if layout == "wide" and series_column is not None:
        raise InputTypeError("a series column is given, but the layout is wide")
    if layout == "long" and scol is None:
        raise InputTypeError(
            f"{p}: no series column for the long layout; name it with --series-column "
            f"(columns: {', '.join(repr(h) for h in table.header if h)})"
        )
    is_long = scol is not None and layout != "wide"
    cutoff = pio._parse_as_of(as_of)
    if is_long:
        return _read_long(p, table, dcol, scol, price_column, cutoff)  # type: ignore[arg-type]
    return _read_wide(p, table, dcol, cutoff)


def _label(p: Path, name: str) -> str:
    return f"{p}, series {name!r}"


def _finish(
    p: Path,
    s: SeriesData,
    rows: list[int],
    dates: list[dt.date],
    raw: list[Any],
    dec: bool,
    column_name: str,
    as_of: dt.date,
) -> None:
    """Validate one series' prices (refresh's rules) and set its returns or its reason."""
    label = _label(p, s.name)
    try:
        prices = pio.check_prices(label, rows, raw, column_name, dec)
        frame = pio.order_and_cut(label, rows, dates, prices, as_of)
        s.returns = returns_from_prices(frame["price"].to_numpy(), "log")
        s.prices = frame
    except ValueError as exc:
        s.reason = str(exc)


def _read_wide(p: Path, table: pio.RawTable, dcol: int, cutoff: dt.date | None) -> PanelInput:
    row_numbers = [r for r, _ in table.rows]
    dates = pio.check_dates(p, row_numbers, pio.column(table, dcol), table.header[dcol])
    as_of = cutoff or max(dates)
    series: list[SeriesData] = []
    seen: dict[str, int] = {}
    for i, head in enumerate(table.header):
        if i == dcol:
            continue
        raw = pio.column(table, i)
        filled = [k for k, v in enumerate(raw) if not pio._blank(v)]
        name = head or f"column {i + 1}"
        if not filled and not head:
            continue  # an empty, unnamed column: nothing there
        s = SeriesData(name=name, index=len(series))
        series.append(s)
        if name in seen:
            s.reason = (
                f"{_label(p, name)}: the name is used by column {seen[name] + 1} too; "
                "give each series its own name"
            )
            continue
        seen[name] = i
        if not filled:
            s.reason = f"{_label(p, name)}: the column holds no prices"
            continue
        a, b = filled[0], filled[-1] + 1  # the series' own span of rows
        _finish(p, s, row_numbers[a:b], dates[a:b], raw[a:b], table.decimal_comma, head, as_of)
    if not series:
        raise InsufficientDataError(f"{p}: no price columns next to the date column")
    return PanelInput(str(p), "wide", as_of, series)


def _read_long(
    p: Path,
    table: pio.RawTable,
    dcol: int,
    scol: int,
    price_column: str | None,
    cutoff: dt.date | None,
) -> PanelInput:
    if price_column is not None:
        _, pcol = pio.find_columns(
            p, table, date_column=table.header[dcol], price_column=price_column
        )
    else:
        numeric = [
            i
            for i in range(len(table.header))
            if i not in (dcol, scol) and _numeric_share(table, i) >= 0.5
        ]
        if len(numeric) != 1:
            what = "no column" if not numeric else "several columns"
            raise InputTypeError(
                f"{p}: {what} of prices next to the date and series columns; name it with "
                f"--price-column (columns: {', '.join(repr(h) for h in table.header if h)})"
            )
        pcol = numeric[0]
    names = pio.column(table, scol)
    raw_dates = pio.column(table, dcol)
    raw_prices = pio.column(table, pcol)
    row_numbers = [r for r, _ in table.rows]
    blank_names = [r for r, v in zip(row_numbers, names, strict=True) if pio._blank(v)]
    if blank_names:
        raise InputTypeError(
            f"{p}: {pio._rows_text(blank_names)}: the series name is blank "
            f"(column {table.header[scol]!r})"
        )
    groups: dict[str, list[int]] = {}
    for k, v in enumerate(names):
        groups.setdefault(str(v).strip(), []).append(k)
    parsed = _parse_dates_once(p, row_numbers, raw_dates, table.header[dcol])
    all_dates = [d for d in parsed.values() if d is not None] if parsed else []
    as_of = cutoff or (max(all_dates) if all_dates else None)
    series: list[SeriesData] = []
    for name, ks in groups.items():
        s = SeriesData(name=name, index=len(series))
        series.append(s)
        rows = [row_numbers[k] for k in ks]
        raw_d = [raw_dates[k] for k in ks]
        try:
            if parsed is None or any(pio._blank(v) for v in raw_d):
                dates = pio.check_dates(_label(p, name), rows, raw_d, table.header[dcol])
            else:
                dates = [parsed[v] for v in raw_d]  # type: ignore[misc]
        except ValueError as exc:
            s.reason = str(exc)
            continue
        if as_of is None:
            as_of = max(dates)
        _finish(
            p,
            s,
            rows,
            dates,
            [raw_prices[k] for k in ks],
            table.decimal_comma,
            table.header[pcol],
            as_of,
        )
    if as_of is None:
        raise InputTypeError(f"{p}: no date in column {table.header[dcol]!r} could be read")
    return PanelInput(str(p), "long", as_of, series)


def _parse_dates_once(
    p: Path, row_numbers: list[int], raw_dates: list[Any], name: str
) -> dict[Any, dt.date] | None:
    """Each distinct date value parsed once (a long table repeats every date per series);
    None when the column as a whole does not read, so that each series is checked alone and
    gets its own message."""
    first: dict[Any, int] = {}
    for r, v in zip(row_numbers, raw_dates, strict=True):
        if not pio._blank(v) and v not in first:
            first[v] = r
    if not first:
        return None
    try:
        parsed = pio.check_dates(p, list(first.values()), list(first), name)
    except ValueError:
        return None
    return dict(zip(first, parsed, strict=True))
