"""Real daily index closes for tests and benchmarks: open data shipped inside the `arch`
package (offline, no download).

The `arch.data` datasets that hold an adjusted daily close ("Adj Close", OHLCV layout) are two
US equity index series, 1999-2018, 5,031 days each. They are found by that layout, not by
name, and called **index 1** and **index 2** in the order of the package's module list
(alphabetical); docs and notes use the same labels.
"""

from __future__ import annotations

import importlib
import pkgutil
from functools import cache
from typing import Any

import numpy as np
import pandas as pd


@cache
def _modules() -> tuple[Any, ...]:
    try:
        import arch.data as data
    except ImportError:
        return ()
    found = []
    for info in pkgutil.iter_modules(data.__path__):
        try:
            mod = importlib.import_module(f"arch.data.{info.name}")
            frame = mod.load()
        except Exception:  # noqa: BLE001 - helper modules without a dataset
            continue
        if isinstance(frame, pd.DataFrame) and "Adj Close" in frame.columns:
            found.append(mod)
    return tuple(found)


def available() -> bool:
    """True when `arch` and its two daily index datasets are installed."""
    return len(_modules()) >= 2


def index(k: int) -> Any:
    """The dataset module of index ``k`` (1 or 2): ``index(1).load()`` gives its OHLCV frame.

    Skips the calling test (pytest) when `arch` is not installed."""
    if not available():
        import pytest

        pytest.skip(
            "the arch package (its daily index datasets) is not installed",
            allow_module_level=True,
        )
    return _modules()[k - 1]


def closes(k: int) -> pd.Series:
    """Adjusted daily closes of index ``k``, oldest first."""
    return index(k).load()["Adj Close"]


def log_returns(k: int) -> np.ndarray:
    """Daily log returns of index ``k``."""
    return np.diff(np.log(closes(k).to_numpy(dtype=float)))


#: The label of each index as used in docs, tables and test ids.
LABELS = {1: "index 1", 2: "index 2"}
