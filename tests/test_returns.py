"""errdist.data.returns.returns_from_prices against numpy/pandas computations of the textbook formulas.

Log return ln(p_t / p_{t-1}), simple return p_t / p_{t-1} - 1 (Campbell, Lo & MacKinlay 1997,
The Econometrics of Financial Markets, section 1.4).
"""

from __future__ import annotations

import math

import numpy as np
import pandas as pd
import pytest

from errdist import returns_from_prices
from errdist.errors import DomainError, InputTypeError, InsufficientDataError
from real_series import index as real_index


def test_real_index_series_matches_pandas() -> None:
    # Open data shipped in the arch package: index 1 daily closes, 1999-2018.
    close = real_index(1).load()["Adj Close"].to_numpy()[:2000]
    simple = returns_from_prices(close, kind="simple")
    logs = returns_from_prices(close)
    ref = pd.Series(close)
    # pandas forms p1/p0 - 1, which rounds the ratio first: agreement to ~1e-16 absolute.
    np.testing.assert_allclose(simple, ref.pct_change().to_numpy()[1:], rtol=1e-12, atol=2e-16)
    np.testing.assert_allclose(
        logs, np.log(ref / ref.shift(1)).to_numpy()[1:], rtol=1e-10, atol=2e-16
    )


def test_small_log_returns_keep_relative_accuracy() -> None:
    # ln(1 + 1e-12) = 1e-12 - 5e-25 (Taylor series); ln(p1) - ln(p0) would lose ~4 digits.
    p0 = 1000.0
    p1 = p0 * (1 + 1e-12)
    want = math.log1p((p1 - p0) / p0)  # reference: Python's math.log1p on the exact ratio
    got = returns_from_prices([p0, p1])[0]
    assert math.isclose(got, want, rel_tol=1e-15)


def test_missing_price_blanks_both_neighbours_and_shifts_nothing() -> None:
    got = returns_from_prices([100.0, 110.0, np.nan, 121.0, 133.1], kind="simple")
    assert got.shape == (4,)
    assert math.isclose(got[0], 0.1, rel_tol=1e-12) and math.isclose(got[3], 0.1, rel_tol=1e-12)
    assert np.isnan(got[1]) and np.isnan(got[2])


@pytest.mark.parametrize(("prices", "row"), [([100.0, 0.0, 1.0], 2), ([5.0, 6.0, 7.0, -1.0], 4)])
def test_non_positive_price_names_its_row(prices: list[float], row: int) -> None:
    with pytest.raises(DomainError, match=f"row {row}"):
        returns_from_prices(prices)


def test_other_refusals() -> None:
    with pytest.raises(InputTypeError, match='kind must be "log" or "simple"'):
        returns_from_prices([1.0, 2.0], kind="pct")
    with pytest.raises(InsufficientDataError):
        returns_from_prices([1.0])
    with pytest.raises(InputTypeError, match="single row or column"):
        returns_from_prices(np.ones((2, 2)))
    with pytest.raises(DomainError, match="row 2"):
        returns_from_prices([1.0, np.inf])
    assert returns_from_prices(np.array([[1.0], [2.0]]), kind="simple").tolist() == [1.0]
