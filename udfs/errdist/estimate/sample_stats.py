"""Sample statistics with the spreadsheet's conventions.

The functions mirror the spreadsheet's built-in worksheet functions so that a figure
computed by errdist matches the one a user gets by hand in the same workbook:

=============================  =============  ==========================================
errdist                        spreadsheet    definition
=============================  =============  ==========================================
:func:`sample_mean`            ``AVERAGE``    x̄ = Σx / n
:func:`sample_std`             ``STDEV.S``    s = √(Σ(x−x̄)² / (n−1))
:func:`sample_median`          ``MEDIAN``     middle value / mean of the two middle values
:func:`sample_skewness`        ``SKEW``       G1 = n/((n−1)(n−2)) · Σ((x−x̄)/s)³
:func:`sample_excess_kurtosis` ``KURT``       G2 (see below)
=============================  =============  ==========================================

G1 and G2 are the bias-adjusted sample skewness and excess kurtosis of Joanes & Gill
(1998), "Comparing measures of sample skewness and kurtosis", The Statistician
47(1):183-189, in the algebraic form the spreadsheet documents for KURT:

    G2 = n(n+1) / ((n−1)(n−2)(n−3)) · Σ((x−x̄)/s)⁴ − 3(n−1)² / ((n−2)(n−3)).

Sums are correctly rounded (:func:`math.fsum`), and every formula is evaluated in the
order written above, so a workbook doing the same arithmetic cell by cell agrees to the
last digit or so.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from errdist.errors import DomainError, InputTypeError, InsufficientDataError

__all__ = [
    "clean_sample",
    "sample_excess_kurtosis",
    "sample_mean",
    "sample_median",
    "sample_skewness",
    "sample_std",
]

MIN_POINTS = 4
"""Fewest usable numbers accepted by :func:`clean_sample` by default (KURT needs 4)."""


def _as_float_array(data: Any, name: str) -> np.ndarray:
    """Convert ``data`` to a float64 array; non-numbers raise :class:`InputTypeError`."""
    if isinstance(data, str | bytes):
        raise InputTypeError(f"{name} must contain numbers, got text {data!r}")
    to_numpy = getattr(data, "to_numpy", None)
    try:
        if callable(to_numpy):  # pandas Series / DataFrame, including nullable dtypes
            arr = np.asarray(to_numpy(dtype=float, na_value=np.nan), dtype=np.float64)
        else:
            arr = np.asarray(data, dtype=np.float64)
    except (TypeError, ValueError) as exc:
        raise InputTypeError(f"{name} must contain only numbers ({exc})") from None
    return arr


def clean_sample(
    data: Any, *, name: str = "data", min_count: int = MIN_POINTS
) -> tuple[np.ndarray, int]:
    """Return the finite values of ``data`` and the number of NaN (blank) entries dropped.

    Parameters
    ----------
    data : array_like
        Numbers, 1-D or 2-D (a worksheet range); 2-D input is read in row-major order.
        ``None`` and NaN count as blank cells and are dropped.
    name : str, optional
        Name used in error messages.
    min_count : int, optional
        Fewest usable numbers required (default 4, what KURT needs).

    Returns
    -------
    values : numpy.ndarray
        1-D float64 array of the finite values, in row-major order (a new array).
    n_dropped : int
        How many NaN / blank entries were dropped.

    Raises
    ------
    InputTypeError
        ``data`` holds something that is not a number.
    DomainError
        ``data`` holds +inf or -inf.
    InsufficientDataError
        Fewer than ``min_count`` numbers remain.
    """
    return _clean(data, name, min_count, copy=True)


def _clean(data: Any, name: str, min_count: int, *, copy: bool) -> tuple[np.ndarray, int]:
    """:func:`clean_sample`; with ``copy=False`` the result may share memory with ``data``."""
    arr = _as_float_array(data, name).ravel(order="C")
    nan = np.isnan(arr)
    n_dropped = int(np.count_nonzero(nan))
    if n_dropped:
        values = arr[~nan]
    else:
        values = arr.copy() if copy else arr
    if not np.isfinite(values).all():
        pos = int(np.flatnonzero(np.isinf(arr))[0]) + 1
        raise DomainError(f"{name} must be finite numbers, got {arr[pos - 1]} at position {pos}")
    if values.size < min_count:
        raise InsufficientDataError(
            f"need at least {min_count} numbers in {name}, got {values.size}"
        )
    return values, n_dropped


def binary_exponent(x: np.ndarray) -> int:
    """Binary exponent e with max|x| < 2**e: dividing by 2**e (exact) brings x into [-1, 1]."""
    top = float(np.max(np.abs(x))) if x.size else 0.0
    return math.frexp(top)[1] if top > 0 else 0


def _mean(x: np.ndarray) -> float:
    """Mean, computed on x / 2**e (exact scaling): no overflow of the sum near 1e308."""
    e = binary_exponent(x)
    return math.ldexp(math.fsum(np.ldexp(x, -e).tolist()) / x.size, e)


def _std(x: np.ndarray, mean: float) -> float:
    """STDEV.S computed on x / 2**e (exact scaling), so squares of data near 1e300 do not
    overflow and squares of data near 1e-300 do not underflow to a false "no spread"."""
    e = binary_exponent(x)
    d = np.ldexp(x, -e) - math.ldexp(mean, -e)
    return math.ldexp(math.sqrt(math.fsum((d * d).tolist()) / (x.size - 1)), e)


def _require_spread(x: np.ndarray, s: float, name: str) -> None:
    if s == 0.0:
        raise InsufficientDataError(f"{name} have no spread: all {x.size} values equal {x[0]:g}")


def sample_mean(data: Any) -> float:
    """Arithmetic mean, like the spreadsheet's ``AVERAGE``: x̄ = Σx / n (n ≥ 1)."""
    x, _ = clean_sample(data, min_count=1)
    return _mean(x)


def sample_std(data: Any) -> float:
    """Sample standard deviation, like ``STDEV.S``: s = √(Σ(x−x̄)² / (n−1)) (n ≥ 2)."""
    x, _ = clean_sample(data, min_count=2)
    return _std(x, _mean(x))


def sample_median(data: Any) -> float:
    """Median, like the spreadsheet's ``MEDIAN`` (mean of the two middle values if n even)."""
    x, _ = clean_sample(data, min_count=1)
    return float(np.median(x))


def sample_skewness(data: Any) -> float:
    """Adjusted sample skewness G1, like the spreadsheet's ``SKEW`` (n ≥ 3).

    .. math:: G_1 = \\frac{n}{(n-1)(n-2)} \\sum_i \\left(\\frac{x_i-\\bar x}{s}\\right)^3

    with s the ``STDEV.S`` of the data (Joanes & Gill 1998, G1).

    Raises
    ------
    InsufficientDataError
        Fewer than 3 numbers, or all values equal.
    """
    x, _ = clean_sample(data, min_count=3)
    n = float(x.size)
    m = _mean(x)
    s = _std(x, m)
    _require_spread(x, s, "data")
    z = (x - m) / s
    return n / ((n - 1.0) * (n - 2.0)) * math.fsum((z * z * z).tolist())


def sample_excess_kurtosis(data: Any) -> float:
    """Bias-adjusted sample excess kurtosis G2, like the spreadsheet's ``KURT`` (n ≥ 4).

    .. math:: G_2 = \\frac{n(n+1)}{(n-1)(n-2)(n-3)} \\sum_i
              \\left(\\frac{x_i-\\bar x}{s}\\right)^4 - \\frac{3(n-1)^2}{(n-2)(n-3)}

    with s the ``STDEV.S`` of the data (Joanes & Gill 1998, G2; the spreadsheet
    vendor's KURT help page gives the same formula).

    Raises
    ------
    InsufficientDataError
        Fewer than 4 numbers, or all values equal.
    """
    x, _ = clean_sample(data)
    return _kurt(x)


def _kurt(x: np.ndarray) -> float:
    """KURT of a cleaned 1-D sample (no input checks beyond zero spread)."""
    n = float(x.size)
    m = _mean(x)
    s = _std(x, m)
    _require_spread(x, s, "data")
    z = (x - m) / s
    z2 = z * z
    s4 = math.fsum((z2 * z2).tolist())
    return n * (n + 1.0) / ((n - 1.0) * (n - 2.0) * (n - 3.0)) * s4 - 3.0 * (n - 1.0) ** 2 / (
        (n - 2.0) * (n - 3.0)
    )
