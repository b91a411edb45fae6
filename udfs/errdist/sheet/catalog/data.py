"""Catalog entries of data preparation: returns from prices."""

from __future__ import annotations

import numpy as np

from errdist.data import returns
from errdist.sheet.cells import SheetError
from errdist.sheet.entry import Entry, data_range, text

__all__ = ["ENTRIES"]

_EXAMPLE_PRICES = [[100.0], [101.2], [None], [99.7], [100.4], [102.9]]


def _returns(prices: np.ndarray, kind: str) -> np.ndarray:
    rows, cols = prices.shape
    if rows > 1 and cols > 1:
        raise SheetError("#VALUE!", f"prices must be a single row or column, got {rows}x{cols}")
    r = returns.returns_from_prices(prices.ravel(), kind=kind)  # type: ignore[arg-type]
    return r.reshape(-1, 1) if cols == 1 else r.reshape(1, -1)


ENTRIES: tuple[Entry, ...] = (
    Entry(
        name="ERRDIST_RETURNS",
        core="errdist.data.returns:returns_from_prices",
        call=_returns,
        params=(
            data_range(
                "prices",
                "A column (or row) of prices > 0 in time order. A blank price leaves both "
                "returns that touch it blank.",
                example=_EXAMPLE_PRICES,
            ),
            text(
                "kind",
                '"log" (default): ln(p_t / p_t-1); "simple": p_t / p_t-1 - 1.',
                choices=("log", "simple"),
                default="log",
            ),
        ),
        result="column",
        summary="Returns from a column of prices, one row shorter and aligned with it; log "
        'returns unless kind is "simple".',
    ),
)
"""This subject's worksheet functions, in catalog order."""
