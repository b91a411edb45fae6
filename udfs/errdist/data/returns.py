"""Prices to returns.

For consecutive prices :math:`p_{i-1}, p_i` the returns are

.. math::

    r_i^{\\log} = \\ln(p_i / p_{i-1}), \\qquad r_i^{\\text{simple}} = p_i / p_{i-1} - 1,

the usual definitions (e.g. Campbell, Lo & MacKinlay (1997) *The Econometrics of Financial
Markets*, section 1.4). The log return is computed as
:math:`\\operatorname{log1p}((p_i - p_{i-1}) / p_{i-1})`, which keeps full relative accuracy for
the small returns of daily data (:math:`\\ln p_i - \\ln p_{i-1}` would cancel).

A missing price (NaN, a blank cell) makes both returns that touch it missing and shifts
nothing else: the result stays aligned with the prices, one row shorter.
"""

from __future__ import annotations

from typing import Any, Literal

import numpy as np

from errdist.errors import DomainError, InputTypeError, InsufficientDataError

__all__ = ["RETURN_KINDS", "returns_from_prices"]

RETURN_KINDS = ("log", "simple")


def returns_from_prices(prices: Any, kind: Literal["log", "simple"] = "log") -> np.ndarray:
    """Returns from a price series, aligned with it and one element shorter.

    Parameters
    ----------
    prices : array_like
        Prices in time order, 1-D (a 2-D input must be a single row or column). NaN marks a
        missing price.
    kind : {"log", "simple"}
        ``"log"``: :math:`\\ln(p_i/p_{i-1})` (default); ``"simple"``: :math:`p_i/p_{i-1} - 1`.

    Returns
    -------
    numpy.ndarray
        float64 array of length ``n - 1``; element ``i`` is the return from price ``i`` to
        price ``i + 1``; NaN where either price is missing.

    Raises
    ------
    InputTypeError
        ``kind`` is not ``"log"`` or ``"simple"``, ``prices`` is not numeric, or is 2-D with
        more than one row and column.
    DomainError
        A price is zero, negative or infinite; the message names its row (1-based).
    InsufficientDataError
        Fewer than two prices.

    Examples
    --------
    >>> returns_from_prices([100.0, 110.0, 99.0], kind="simple")
    array([ 0.1, -0.1])
    """
    if not isinstance(kind, str) or kind.strip().lower() not in RETURN_KINDS:
        raise InputTypeError(f'kind must be "log" or "simple", got {kind!r}')
    kind = kind.strip().lower()  # type: ignore[assignment]
    try:
        arr = np.asarray(prices, dtype=np.float64)
    except (TypeError, ValueError):
        raise InputTypeError("prices must contain only numbers") from None
    if arr.ndim == 2 and 1 in arr.shape:
        arr = arr.ravel()
    elif arr.ndim != 1:
        raise InputTypeError(
            f"prices must be a single row or column, got shape {'x'.join(map(str, arr.shape))}"
        )
    if arr.size < 2:
        raise InsufficientDataError(f"need at least 2 prices, got {arr.size}")
    bad = ~(np.isnan(arr) | ((arr > 0) & np.isfinite(arr)))
    if bad.any():
        row = int(np.flatnonzero(bad)[0])
        raise DomainError(f"prices must be > 0 and finite, got {arr[row]:g} in row {row + 1}")
    prev, curr = arr[:-1], arr[1:]
    simple = (curr - prev) / prev
    if kind == "simple":
        return simple
    return np.log1p(simple)
