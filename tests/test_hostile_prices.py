"""Odd prices files: clear messages naming the row or the fix, never a raw library error.

Each case reproduced a traceback or a misleading message before (issue 12). Prices come from
the index 2 closes shipped with the arch package (`arch.data` index 2), altered per case.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from errdist.data.prices_io import read_prices
from errdist.errors import DomainError, InputTypeError
from real_series import index as real_index

index2 = real_index(2)


@pytest.fixture(scope="module")
def closes() -> list[tuple[str, float]]:
    s = real_index(2).load()["Adj Close"].iloc[-300:]
    return [(f"{d:%Y-%m-%d}", float(v)) for d, v in s.items()]


def _csv(path: Path, rows: list[tuple[str, float]], encoding: str = "utf-8") -> Path:
    text = "date,price\n" + "".join(f"{d},{v!r}\n" for d, v in rows)
    path.write_bytes(text.encode(encoding))
    return path


def test_constant_prices_refused(tmp_path: Path, closes: list) -> None:
    rows = [(d, 100.0) for d, _ in closes]
    with pytest.raises(DomainError, match="the price never changes: 299 of 299"):
        read_prices(_csv(tmp_path / "c.csv", rows))


def test_weekly_prices_repeated_daily_refused(tmp_path: Path, closes: list) -> None:
    rows = [(d, closes[i - i % 5][1]) for i, (d, _) in enumerate(closes)]
    with pytest.raises(DomainError, match="price repeats: 240 of 299 daily returns are 0"):
        read_prices(_csv(tmp_path / "w.csv", rows))


def test_fixed_rate_series_refused(tmp_path: Path, closes: list) -> None:
    rows = [(d, 100 * 1.0002**i) for i, (d, _) in enumerate(closes)]
    with pytest.raises(DomainError, match="fixed-rate"):
        read_prices(_csv(tmp_path / "f.csv", rows))


def test_some_holidays_repeated_are_fine(tmp_path: Path, closes: list) -> None:
    rows = [(d, closes[i - 1][1] if i % 10 == 0 else v) for i, (d, v) in enumerate(closes)]
    assert len(read_prices(_csv(tmp_path / "h.csv", rows))) == 300


def test_field_over_csv_limit(tmp_path: Path) -> None:
    p = tmp_path / "big.csv"
    p.write_text("date,price\n2024-01-02," + "1" * 140_000 + "\n")
    with pytest.raises(InputTypeError, match="line 2: a value longer than 131,072 characters"):
        read_prices(p)


@pytest.mark.parametrize("encoding", ["utf-16", "utf-16-le", "utf-16-be", "utf-8-sig"])
def test_utf16_csv_is_read(tmp_path: Path, closes: list, encoding: str) -> None:
    # Spreadsheets save "Unicode text" as UTF-16 (with BOM); some tools write it without one.
    df = read_prices(_csv(tmp_path / "u.csv", closes, encoding))
    assert len(df) == 300 and df["price"].iloc[-1] == closes[-1][1]


@pytest.mark.parametrize(("index", "date"), [(0, "1600-01-01"), (-1, "2300-01-03")])
def test_dates_outside_pandas_range_name_the_row(
    tmp_path: Path, closes: list, index: int, date: str
) -> None:
    rows = list(closes)
    rows[index] = (date, rows[index][1])
    row = 2 if index == 0 else len(rows) + 1
    with pytest.raises(DomainError, match=f"row {row}: date {date} is outside"):
        read_prices(_csv(tmp_path / "d.csv", rows))


@pytest.mark.parametrize(
    ("as_of", "message"),
    [
        (" ", "--as-of is blank"),
        ("2026-W48-1", "must be a date YYYY-MM-DD"),
        ("20261130", "must be a date YYYY-MM-DD"),
        ("2026-02-30", "day is out of range"),
        ("3000-01-01", "outside the dates"),
    ],
)
def test_as_of_forms(tmp_path: Path, closes: list, as_of: str, message: str) -> None:
    with pytest.raises(ValueError, match=message):
        read_prices(_csv(tmp_path / "a.csv", closes), as_of=as_of)


def test_refresh_of_constant_prices_exit_2_no_traceback(
    tmp_path: Path, closes: list, capsys: pytest.CaptureFixture
) -> None:
    from errdist import cli

    prices = _csv(tmp_path / "c.csv", [(d, 100.0) for d, _ in closes])
    code = cli.main(["refresh", "--prices", str(prices), "--out", str(tmp_path / "o.xlsx")])
    err = capsys.readouterr().err
    assert code == 2 and "never changes" in err and "Traceback" not in err
    assert not (tmp_path / "o.xlsx").exists()
