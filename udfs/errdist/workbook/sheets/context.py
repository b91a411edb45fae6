"""What the sheet modules share while one workbook is laid out.

:class:`Context` carries the price history, the worksheet functions available and the key
cells each sheet publishes for the sheets laid out after it (``ctx.keys["var99"]`` is the
Risk sheet's one-day 99% VaR cell, read by the Guide's key figures, and so on).
:func:`call_entry` runs a catalog function at layout time to learn the size of the table it
spills; :data:`VOLATILE_CELLS` lists the cells whose value legitimately changes between builds.
"""

from __future__ import annotations

import datetime as _dt
from collections.abc import Mapping
from dataclasses import dataclass, field

import numpy as np

__all__ = ["VOLATILE_CELLS", "Context", "call_entry", "catalog_names"]

VOLATILE_CELLS: dict[tuple[str, str], str] = {}
"""Cells whose value legitimately changes between builds, and why (filled by the layout)."""


def catalog_names() -> frozenset[str]:
    """Names of the worksheet functions the catalog holds now."""
    try:
        from errdist.sheet import catalog
    except ImportError:  # pragma: no cover - the catalog ships with the package
        return frozenset()
    entries = getattr(catalog, "CATALOG", None) or getattr(catalog, "ENTRIES", None) or ()
    if isinstance(entries, Mapping):
        return frozenset(str(k).upper() for k in entries)
    return frozenset(str(getattr(e, "name", e)).upper() for e in entries)


def call_entry(name: str, *args: object) -> list[list[object]]:
    """Evaluate catalog function ``name`` on cell arguments; the result as rows of cells."""
    from errdist.sheet import catalog

    entry = catalog.get(name) if hasattr(catalog, "get") else catalog.CATALOG[name]
    out = entry.evaluate(list(args))
    if not isinstance(out, (list, tuple)):
        return [[out]]
    if out and not isinstance(out[0], (list, tuple)):
        return [[v] for v in out]
    return [list(r) for r in out]


@dataclass
class Context:
    """Shared facts of one layout: sizes, key cells and the functions available.

    Attributes
    ----------
    fund : str
        Shown in the titles.
    dates, prices
        The price history, oldest first.
    funcs : frozenset of str
        Worksheet functions the layout may use; sections needing others are left out.
    returns : numpy.ndarray
        The log returns, used only to size the tables catalog functions spill.
    returns_range : str
        Absolute reference of the returns column (set by the Returns sheet).
    keys : dict
        Key cells published by the sheets laid out so far (absolute references or rows).
    """

    fund: str
    dates: list[_dt.datetime]
    prices: np.ndarray
    funcs: frozenset[str]
    returns: np.ndarray = field(default_factory=lambda: np.empty(0))
    returns_range: str = ""
    keys: dict[str, str] = field(default_factory=dict)

    @property
    def n_prices(self) -> int:
        return len(self.prices)

    @property
    def n(self) -> int:
        """Number of returns."""
        return len(self.prices) - 1

    def has(self, *names: str) -> bool:
        return all(name in self.funcs for name in names)
