"""Panels for the panel tests: invented series (simulated, seeded) and real index series.

The invented series are draws of the error law with made-up parameters; the real ones are the
index 2 and index 1 closes that the ``arch`` package ships (``arch.data``).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd

import errdist


def simulated_wide(n_series: int = 4, n_prices: int = 320, seed: int = 7) -> pd.DataFrame:
    """A wide prices table: ``date`` (ISO text) and columns ``S00``, ``S01``...; invented."""
    rng = np.random.default_rng(seed)
    dates = pd.bdate_range("2024-01-01", periods=n_prices)
    cols = {}
    for k in range(n_series):
        r = errdist.rvs(n_prices - 1, 0.0002, 0.006 + 0.002 * k, 1.0 + 0.25 * k, seed=rng)
        cols[f"S{k:02d}"] = 100.0 * np.exp(np.concatenate([[0.0], np.cumsum(r)]))
    frame = pd.DataFrame(cols)
    frame.insert(0, "date", dates.strftime("%Y-%m-%d"))
    return frame


def real_wide(n_prices: int = 600) -> pd.DataFrame:
    """The last ``n_prices`` common closes of the index 2 and index 1 (arch.data)."""
    from real_series import index as real_index

    a = real_index(2).load()["Adj Close"].rename("INDEX2")
    b = real_index(1).load()["Adj Close"].rename("INDEX1")
    both = pd.concat([a, b], axis=1).dropna().iloc[-n_prices:]
    frame = both.reset_index()
    frame.columns = ["date", "INDEX2", "INDEX1"]
    frame["date"] = pd.to_datetime(frame["date"]).dt.strftime("%Y-%m-%d")
    return frame


def to_long(wide: pd.DataFrame) -> pd.DataFrame:
    """The same prices as a long table (date, series, price), blanks dropped."""
    long = wide.melt(id_vars="date", var_name="series", value_name="price")
    return long.dropna().reset_index(drop=True)


def write(frame: pd.DataFrame, path: Path) -> Path:
    """Write ``frame`` as CSV, xlsx or Parquet by the file's suffix."""
    suffix = path.suffix.lower()
    if suffix == ".csv":
        frame.to_csv(path, index=False)
    elif suffix == ".parquet":
        frame.to_parquet(path, index=False)
    else:
        frame.to_excel(path, index=False)
    return path
