"""Repeated prices: runs of the same price on consecutive dates (a stale NAV).

A price that was not updated - a fund administrator's NAV carried forward over a holiday or a
missed feed - repeats the day before exactly, and every repeat is a zero return. Zero returns
pile up at the centre of the sample, so the fitted law gets a sharper peak and a smaller shape
(and the volatility looks lower than it was). They are not always wrong: a price on a coarse
tick can stay put for a day. So a prices file is never refused for them:
:func:`stale_warning` says how many prices repeat and on which rows, and the data are used as
given.

A run counts from :data:`STALE_RUN` identical prices in a row (two zero returns running):
common practice, no source - one repeat is often a tick, three equal closes rarely are.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path

__all__ = ["STALE_RUN", "StalePricesWarning", "StaleRun", "stale_runs", "stale_warning"]

STALE_RUN = 3
"""Fewest identical prices on consecutive rows that make a run worth a warning."""
SHOWN_RUNS = 5
"""Runs named in the warning (the count covers them all)."""


class StalePricesWarning(UserWarning):
    """Prices repeat unchanged over several consecutive dates (possibly stale)."""


@dataclass(frozen=True)
class StaleRun:
    """One run of identical prices: its first and last file rows, the price and its length."""

    first_row: int
    last_row: int
    price: float
    length: int


def stale_runs(
    prices: Sequence[float], rows: Sequence[int], min_run: int = STALE_RUN
) -> list[StaleRun]:
    """Runs of at least ``min_run`` identical consecutive prices (oldest first order).

    Parameters
    ----------
    prices : sequence of float
        The prices in date order.
    rows : sequence of int
        The file row of each price (same length).
    min_run : int
        Shortest run reported (>= 2).

    Returns
    -------
    list of StaleRun
        In date order.
    """
    if len(prices) != len(rows):
        raise ValueError("prices and rows must have the same length")
    if min_run < 2:
        raise ValueError(f"min_run must be >= 2, got {min_run}")
    out: list[StaleRun] = []
    start = 0
    for i in range(1, len(prices) + 1):
        if i < len(prices) and prices[i] == prices[start]:
            continue
        length = i - start
        if length >= min_run:
            out.append(StaleRun(rows[start], rows[i - 1], float(prices[start]), length))
        start = i
    return out


def stale_warning(prices: Sequence[float], rows: Sequence[int], source: str | Path) -> str:
    """The warning about repeated prices in a prices file, or ``""`` when there are none.

    It names the first :data:`SHOWN_RUNS` runs by their file rows and counts the repeated
    prices (each price of a run after its first: the zero returns they make).
    """
    runs = stale_runs(prices, rows)
    if not runs:
        return ""
    repeats = sum(r.length - 1 for r in runs)
    shown = ", ".join(
        f"rows {min(r.first_row, r.last_row)}-{max(r.first_row, r.last_row)} "
        f"({r.length} x {r.price:g})"
        for r in runs[:SHOWN_RUNS]
    )
    more = f" and {len(runs) - SHOWN_RUNS} more runs" if len(runs) > SHOWN_RUNS else ""
    return (
        f"{source}: {repeats} price{'s' if repeats != 1 else ''} repeat the one before "
        f"unchanged, in {len(runs)} run{'s' if len(runs) != 1 else ''} of {STALE_RUN} or more "
        f"equal prices: {shown}{more}. Stale prices (a NAV not updated) give zero returns, "
        "which sharpen the fitted peak and understate volatility; check them with the source. "
        "The prices were used as given."
    )
