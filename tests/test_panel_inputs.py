"""Reading a panel: wide and long tables, CSV / xlsx / Parquet, validated per series.

The messages are refresh's own (errdist.data.prices_io): each failing series is checked
against ``read_prices`` run on that series alone, written as a one-series file — so the panel
cannot drift from the single-series rules.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from errdist.data.prices_io import read_prices
from errdist.errors import InputTypeError
from errdist.panel.inputs import read_panel
from panel_data import simulated_wide, to_long, write


def _broken_wide() -> pd.DataFrame:
    w = simulated_wide(n_series=6, n_prices=120).astype(object)
    w.loc[:29, "S01"] = None  # starts later: fine
    w.loc[50, "S02"] = None  # a blank inside the series
    w.loc[60, "S03"] = -5.0  # a negative price
    w.loc[:100, "S04"] = None  # too short (19 prices)
    w.loc[70, "S05"] = "n/a"  # text
    return w


def _single_message(w: pd.DataFrame, name: str, tmp_path) -> str:
    """refresh's message for the series ``name`` alone (its own rows in its own file; the
    series start in the first data row, so the row numbers are the wide file's)."""
    alone = w[["date", name]]
    keep = alone[name].notna()
    idx = np.flatnonzero(keep.to_numpy())
    alone = alone.iloc[idx[0] : idx[-1] + 1]
    path = tmp_path / f"{name}.csv"
    alone.to_csv(path, index=False)
    with pytest.raises(ValueError) as info:
        read_prices(path, as_of=w["date"].iloc[-1])  # the panel cuts every series there
    return str(info.value).split(": ", 1)[1]


@pytest.mark.parametrize("suffix", [".csv", ".xlsx", ".parquet"])
def test_wide_table_series_fail_alone_with_refresh_messages(tmp_path, suffix):
    w = _broken_wide()
    if suffix == ".parquet":  # a Parquet column holds one type: no text among numbers
        w = w.drop(columns="S05")
        w[[c for c in w.columns if c != "date"]] = w.drop(columns="date").astype(float)
    path = write(w, tmp_path / f"wide{suffix}")
    panel = read_panel(path)
    assert panel.layout == "wide"
    by_name = {s.name: s for s in panel.series}
    assert [s.name for s in panel.series] == [c for c in w.columns if c != "date"]
    assert not by_name["S00"].reason and not by_name["S01"].reason
    # S01 starts at row 32 (30 blank rows): 89 prices, 88 returns.
    assert by_name["S01"].returns.size == 120 - 30 - 1
    assert by_name["S01"].first_date.isoformat() == w.loc[30, "date"]
    for name, words in {
        "S02": "the price is blank",
        "S03": "prices must be > 0",
        "S04": "at least 30 returns",
    }.items():
        s = by_name[name]
        assert s.returns is None
        assert s.reason.startswith(f"{path}, series {name!r}: ")
        assert words in s.reason
        if suffix == ".csv":  # row numbers as in the file: the same text as refresh's
            body = s.reason.split(": ", 1)[1]
            assert body == _single_message(w, name, tmp_path)
    if suffix != ".parquet":
        assert "the price is not a number" in by_name["S05"].reason


def test_returns_are_log_returns_of_the_prices(tmp_path):
    """Returns: ln(p_i / p_{i-1}) (Campbell, Lo & MacKinlay 1997, section 1.4), computed here
    with numpy directly from the prices written to the file."""
    w = simulated_wide(n_series=2, n_prices=80)
    panel = read_panel(write(w, tmp_path / "w.csv"))
    for s in panel.series:
        p = pd.read_csv(tmp_path / "w.csv")[s.name].to_numpy()
        np.testing.assert_allclose(s.returns, np.diff(np.log(p)), rtol=1e-12, atol=1e-15)


@pytest.mark.parametrize("suffix", [".csv", ".parquet"])
def test_long_table_equals_wide_table(tmp_path, suffix):
    w = simulated_wide(n_series=3, n_prices=90)
    w.loc[:9, "S02"] = np.nan
    long = to_long(w).sample(frac=1.0, random_state=3)  # series interleaved
    long = long.sort_values(["series", "date"], kind="stable")
    a = read_panel(write(w, tmp_path / "w.csv"))
    b = read_panel(write(long, tmp_path / f"long{suffix}"))
    assert b.layout == "long"
    assert [s.name for s in b.series] == ["S00", "S01", "S02"]
    for sa, sb in zip(a.series, b.series, strict=True):
        np.testing.assert_array_equal(sa.returns, sb.returns)


def test_long_table_refuses_a_repeated_date_in_one_series_only(tmp_path):
    long = to_long(simulated_wide(n_series=2, n_prices=60))
    dup = long[(long.series == "S01")].iloc[[5]]
    long = pd.concat([long, dup]).sort_values(["series", "date"], kind="stable")
    panel = read_panel(write(long, tmp_path / "long.csv"))
    s0, s1 = panel.series
    assert not s0.reason
    assert "the same date appears twice" in s1.reason


def test_stale_series_is_refused_with_the_as_of_message(tmp_path):
    w = simulated_wide(n_series=2, n_prices=120).astype(object)
    w.loc[90:, "S01"] = None  # stops 30 business days before the others
    panel = read_panel(write(w, tmp_path / "w.csv"))
    assert panel.as_of.isoformat() == w["date"].iloc[-1]
    assert "days after the last date" in panel.series[1].reason
    # Cut earlier, both are in use.
    panel = read_panel(tmp_path / "w.csv", as_of=w.loc[89, "date"])
    assert all(not s.reason for s in panel.series)


def test_whole_file_problems_raise(tmp_path):
    with pytest.raises(FileNotFoundError):
        read_panel(tmp_path / "missing.csv")
    bad = tmp_path / "nodates.csv"
    bad.write_text("a,b\n1,2\n3,4\n")
    with pytest.raises(InputTypeError, match="no column holds dates"):
        read_panel(bad)
    other = tmp_path / "prices.json"
    other.write_text("{}")
    with pytest.raises(InputTypeError, match=r"\.csv, \.xlsx or \.parquet"):
        read_panel(other)
    w = simulated_wide(n_series=2, n_prices=40)
    with pytest.raises(InputTypeError, match="no series column"):
        read_panel(write(w, tmp_path / "w.csv"), layout="long")


def test_duplicate_series_name_is_reported(tmp_path):
    path = tmp_path / "dup.csv"
    w = simulated_wide(n_series=2, n_prices=40)
    text = w.to_csv(index=False).replace("S01", "S00", 1)
    path.write_text(text)
    panel = read_panel(path)
    assert not panel.series[0].reason
    assert "the name is used by column 2 too" in panel.series[1].reason
