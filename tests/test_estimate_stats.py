"""Sample statistics with spreadsheet conventions, checked against outside references."""

from __future__ import annotations

import math

import numpy as np
import pandas as pd
import pytest
from scipy import stats

from errdist.errors import DomainError, InputTypeError, InsufficientDataError
from errdist.estimate import (
    clean_sample,
    sample_excess_kurtosis,
    sample_mean,
    sample_median,
    sample_skewness,
    sample_std,
)

KURT_HELP_DATA = [3, 4, 5, 2, 3, 4, 5, 6, 4, 7]


def test_kurt_vendor_help_example() -> None:
    # Source: the spreadsheet vendor's KURT help page (quoted in DESIGN.md):
    # KURT(3,4,5,2,3,4,5,6,4,7) = -0.151799637
    assert sample_excess_kurtosis(KURT_HELP_DATA) == pytest.approx(-0.151799637, abs=5e-10)


@pytest.mark.parametrize("seed", [0, 1, 2])
@pytest.mark.parametrize("n", [4, 7, 50, 1000])
def test_agrees_with_pandas_and_scipy(seed: int, n: int) -> None:
    x = np.random.default_rng(seed).standard_t(4, size=n) * 0.02 + 0.001
    s = pd.Series(x)
    # Reference: pandas Series.kurt/.skew/.std (bias-adjusted G2, G1, n-1 denominator)
    assert sample_excess_kurtosis(x) == pytest.approx(s.kurt(), rel=1e-12, abs=1e-12)
    assert sample_skewness(x) == pytest.approx(s.skew(), rel=1e-12, abs=1e-12)
    assert sample_std(x) == pytest.approx(s.std(), rel=1e-12)
    assert sample_mean(x) == pytest.approx(s.mean(), rel=1e-12, abs=1e-15)
    assert sample_median(x) == s.median()
    # Reference: scipy.stats.kurtosis / skew with bias=False
    assert sample_excess_kurtosis(x) == pytest.approx(
        stats.kurtosis(x, bias=False), rel=1e-12, abs=1e-12
    )
    assert sample_skewness(x) == pytest.approx(stats.skew(x, bias=False), rel=1e-12, abs=1e-12)


def test_joanes_gill_formulas() -> None:
    # Reference: Joanes & Gill (1998), The Statistician 47(1):183-189:
    # g1 = m3/m2^1.5, G1 = g1*sqrt(n(n-1))/(n-2); g2 = m4/m2^2 - 3,
    # G2 = ((n+1) g2 + 6)(n-1)/((n-2)(n-3))   (central moments m_r with divisor n)
    x = np.random.default_rng(42).laplace(size=37)
    n = x.size
    d = x - x.mean()
    m2, m3, m4 = (d**2).mean(), (d**3).mean(), (d**4).mean()
    g1 = m3 / m2**1.5
    g2 = m4 / m2**2 - 3
    big_g1 = g1 * math.sqrt(n * (n - 1)) / (n - 2)
    big_g2 = ((n + 1) * g2 + 6) * (n - 1) / ((n - 2) * (n - 3))
    assert sample_skewness(x) == pytest.approx(big_g1, rel=1e-12)
    assert sample_excess_kurtosis(x) == pytest.approx(big_g2, rel=1e-12)


def test_median_even_and_odd() -> None:
    # Spreadsheet MEDIAN: mean of the two middle values when n is even (common practice, no source)
    assert sample_median([5, 1, 3, 2]) == 2.5
    assert sample_median([5, 1, 3]) == 3.0


def test_clean_sample_drops_nan_row_major() -> None:
    data = [[1.0, np.nan, 3.0], [None, 5.0, 6.0], [7.0, 8.0, np.nan]]
    x, dropped = clean_sample(data)
    assert x.tolist() == [1.0, 3.0, 5.0, 6.0, 7.0, 8.0]
    assert dropped == 3
    assert x.dtype == np.float64


def test_clean_sample_pandas_nullable() -> None:
    s = pd.Series([1.0, None, 2.0, 3.0, 4.0], dtype="Float64")
    x, dropped = clean_sample(s)
    assert x.tolist() == [1.0, 2.0, 3.0, 4.0]
    assert dropped == 1


def test_clean_sample_errors() -> None:
    with pytest.raises(InsufficientDataError, match=r"^need at least 4 numbers in data, got 3$"):
        clean_sample([1.0, 2.0, np.nan, 3.0])
    with pytest.raises(InsufficientDataError, match="in returns, got 2"):
        clean_sample([1.0, 2.0], name="returns")
    with pytest.raises(DomainError, match="finite"):
        clean_sample([1.0, 2.0, np.inf, 3.0, 4.0])
    with pytest.raises(DomainError, match="position 1"):
        clean_sample([-np.inf, 2.0, 3.0, 4.0])
    with pytest.raises(InputTypeError, match="numbers"):
        clean_sample([1.0, "abc", 3.0, 4.0])
    with pytest.raises(InputTypeError, match="text"):
        clean_sample("1,2,3,4")


def test_zero_spread_is_insufficient() -> None:
    with pytest.raises(InsufficientDataError, match="no spread"):
        sample_excess_kurtosis([2.0] * 6)
    with pytest.raises(InsufficientDataError, match="no spread"):
        sample_skewness([2.0] * 6)
    assert sample_std([2.0] * 6) == 0.0  # STDEV.S of equal values is 0 (common practice)


def test_minimum_counts_follow_spreadsheet() -> None:
    # KURT needs 4 values, SKEW 3, STDEV.S 2 (spreadsheet help pages; from memory)
    with pytest.raises(InsufficientDataError):
        sample_excess_kurtosis([1.0, 2.0, 4.0])
    assert sample_skewness([1.0, 2.0, 4.0]) == pytest.approx(
        stats.skew([1.0, 2.0, 4.0], bias=False), rel=1e-12
    )
    with pytest.raises(InsufficientDataError):
        sample_std([1.0])
