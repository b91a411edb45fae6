"""Prices files as people keep them: on a second sheet, under title rows, with stale prices.

The files are written by the test with pandas / openpyxl (no binary fixtures); what
``read_prices`` returns is compared with the frame pandas wrote, and the repeated-price runs
with a pandas run-length count (``(s != s.shift()).cumsum()`` groups), not with errdist's.
"""

from __future__ import annotations

import warnings
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from errdist.data.prices_io import MIN_RETURNS, read_prices
from errdist.data.stale_prices import STALE_RUN, StalePricesWarning, stale_runs
from errdist.errors import InputTypeError

openpyxl = pytest.importorskip("openpyxl", reason="openpyxl is not installed")

N = MIN_RETURNS + 30


def _frame(n: int = N, seed: int = 3) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    return pd.DataFrame(
        {
            "Date": pd.bdate_range("2026-01-01", periods=n),
            "NAV": np.round(100 * np.exp(np.cumsum(rng.normal(0, 0.01, n))), 4),
        }
    )


def _book(path: Path, sheets: dict[str, list[list[object]]]) -> Path:
    wb = openpyxl.Workbook()
    wb.remove(wb.active)
    for name, rows in sheets.items():
        ws = wb.create_sheet(name)
        for row in rows:
            ws.append(row)
    wb.save(path)
    return path


def _table_rows(df: pd.DataFrame) -> list[list[object]]:
    return [["Date", "NAV"]] + [[d.to_pydatetime(), float(v)] for d, v in df.itertuples(False)]


def _assert_same(got: pd.DataFrame, want: pd.DataFrame) -> None:
    assert got["date"].tolist() == want["Date"].tolist()
    np.testing.assert_array_equal(got["price"].to_numpy(), want["NAV"].to_numpy())


# ------------------------------------------------------------------------------ --sheet


def test_prices_on_a_second_sheet_are_read_with_sheet(tmp_path: Path) -> None:
    df = _frame()
    path = _book(
        tmp_path / "nav.xlsx",
        {"Cover": [["Harrowgate fund - NAV history"], ["prepared by ops"]], "NAV": _table_rows(df)},
    )
    with pytest.raises(InputTypeError) as err:
        read_prices(path)
    text = str(err.value)
    assert "--sheet" in text and "'Cover'" in text and "'NAV'" in text, text
    got = read_prices(path, sheet="nav")  # sheet names are case-insensitive, as in Excel
    _assert_same(got, df)
    assert got.attrs["sheet"] == "nav" and got.attrs["rows"] == (2, N + 1)
    with pytest.raises(InputTypeError, match=r"no sheet named 'Prices'.*'Cover', 'NAV'"):
        read_prices(path, sheet="Prices")


def test_sheet_is_refused_for_a_csv_file(tmp_path: Path) -> None:
    path = tmp_path / "p.csv"
    _frame().to_csv(path, index=False)
    with pytest.raises(InputTypeError, match="--sheet applies to .xlsx"):
        read_prices(path, sheet="NAV")


def test_an_empty_first_sheet_says_to_name_the_sheet(tmp_path: Path) -> None:
    path = _book(tmp_path / "p.xlsx", {"Notes": [], "Data": _table_rows(_frame())})
    with pytest.raises(InputTypeError, match=r"first sheet is empty.*--sheet.*'Data'"):
        read_prices(path)


# ------------------------------------------------------------------------------ title rows


def test_title_rows_above_the_header_are_skipped_in_a_workbook(tmp_path: Path) -> None:
    df = _frame()
    rows = [["Harrowgate Meridian - daily NAV"], [], ["Source: fund administrator"]]
    path = _book(tmp_path / "p.xlsx", {"NAV": rows + _table_rows(df)})
    got = read_prices(path)
    _assert_same(got, df)
    # openpyxl appended the header as sheet row 4 (the blank row counts), data from row 5.
    assert got.attrs["header_row"] == 4 and got.attrs["rows"] == (5, N + 4)
    assert got.attrs["price_column"] == "NAV"


def test_title_rows_above_the_header_are_skipped_in_a_csv_file(tmp_path: Path) -> None:
    df = _frame()
    path = tmp_path / "p.csv"
    path.write_text("Daily NAV history\nas of 2026-03-31\n" + df.to_csv(index=False))
    got = read_prices(path)
    _assert_same(got, df)
    assert got.attrs["header_row"] == 3 and got.attrs["rows"] == (4, N + 3)


def test_a_file_without_a_header_row_is_refused_with_what_to_do(tmp_path: Path) -> None:
    path = tmp_path / "p.csv"
    _frame().to_csv(path, index=False, header=False)
    with pytest.raises(InputTypeError, match=r"no header row.*Add a row of column names"):
        read_prices(path)


def test_a_bad_first_data_row_is_reported_not_skipped_as_a_title(tmp_path: Path) -> None:
    df = _frame()
    path = tmp_path / "p.csv"
    text = df.to_csv(index=False).splitlines()
    text.insert(1, ",n/a")  # a blank date and a text price on row 2
    path.write_text("\n".join(text) + "\n")
    with pytest.raises(InputTypeError, match=r"row 2: the date is blank"):
        read_prices(path)


# ------------------------------------------------------------------------------ stale prices


def _pandas_runs(prices: pd.Series, min_run: int) -> list[tuple[int, int]]:
    """(first index, length) of runs of equal consecutive values, by pandas."""
    groups = (prices != prices.shift()).cumsum()
    sizes = prices.groupby(groups).agg(["size"])
    starts = prices.index.to_series().groupby(groups).min()
    return [(int(starts[g]), int(n)) for g, n in sizes["size"].items() if n >= min_run]


def test_repeated_prices_warn_with_rows_and_count_and_are_kept(tmp_path: Path) -> None:
    df = _frame()
    nav = df["NAV"].to_numpy().copy()
    nav[10:14] = nav[10]  # four equal prices: three zero returns
    nav[20:23] = nav[20]  # three equal prices
    nav[30:32] = nav[30]  # one repeat only: a tick, not reported
    df["NAV"] = nav
    path = tmp_path / "p.csv"
    df.to_csv(path, index=False)
    with pytest.warns(StalePricesWarning) as caught:
        got = read_prices(path)
    _assert_same(got, df)  # used as given
    want = _pandas_runs(df["NAV"], STALE_RUN)
    assert want == [(10, 4), (20, 3)]
    text = str(caught[0].message)
    assert got.attrs["warning"] == text
    repeats = sum(n - 1 for _, n in want)
    # File rows: the header is row 1, so frame index i is row i + 2.
    rows = ", ".join(f"rows {i + 2}-{i + n + 1} ({n} x {df['NAV'][i]:g})" for i, n in want)
    assert f"{repeats} prices repeat the one before unchanged, in 2 runs" in text, text
    assert rows in text, text
    assert "used as given" in text


def test_no_warning_without_runs(tmp_path: Path) -> None:
    path = tmp_path / "p.csv"
    _frame().to_csv(path, index=False)
    with warnings.catch_warnings():
        warnings.simplefilter("error", StalePricesWarning)
        got = read_prices(path)
    assert got.attrs["warning"] == ""


def test_many_runs_are_counted_and_the_first_few_named() -> None:
    prices = [float(p) for p in np.repeat(np.arange(1.0, 9.0), 3)]  # eight runs of three
    rows = list(range(2, 2 + len(prices)))
    runs = stale_runs(prices, rows)
    assert [(r.first_row, r.length) for r in runs] == [(2 + 3 * k, 3) for k in range(8)]
    from errdist.data.stale_prices import stale_warning

    text = stale_warning(prices, rows, "f.csv")
    assert text.startswith("f.csv: 16 prices repeat") and "and 3 more runs" in text
    with pytest.raises(ValueError):
        stale_runs([1.0, 1.0], [2], 3)
