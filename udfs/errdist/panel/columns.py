"""The panel in a worksheet: fit every column of a block of returns (ERRDIST_PANEL's core).

For the analyst with a few dozen series side by side in one sheet: each column is one series;
blank cells are skipped. Per column: the fit (:func:`errdist.fit`), then the one-day VaR and
Expected Shortfall of the fitted law at ``confidence`` (:func:`errdist.value_at_risk`,
:func:`errdist.expected_shortfall`) — the same figures ``errdist panel`` writes for the
series. A column that cannot be fitted keeps its row, with the reason.
"""

from __future__ import annotations

from typing import Any

import numpy as np
import pandas as pd

import errdist
from errdist.errors import InputTypeError

__all__ = ["COLUMNS", "fit_columns"]

COLUMNS = ("n", "loc", "scale", "shape", "var", "es", "error")
"""Columns of :func:`fit_columns`' result."""


def fit_columns(
    data: Any, confidence: float = 0.99, method: str = "mle", horizon: float = 1
) -> pd.DataFrame:
    """Fit the error law to each column of ``data``; VaR and ES of each fitted law.

    .. math::

        \\mathrm{VaR}_c = -q_{1-c}, \\qquad \\mathrm{ES}_c = -E[X \\mid X \\le q_{1-c}]

    for the fitted law of each column (formulas in :mod:`errdist.risk`).

    Parameters
    ----------
    data : array_like
        2-D, one series per column (a 1-D input is one column); NaN (blank) is skipped.
    confidence : float
        VaR / ES confidence in (0, 1).
    method : {"mle", "moments"}
        Fit method (:func:`errdist.fit`).
    horizon : float
        Days, square-root rule (:func:`errdist.value_at_risk`).

    Returns
    -------
    pandas.DataFrame
        One row per column, :data:`COLUMNS`: ``n`` numbers used, ``loc``, ``scale``,
        ``shape``, ``var``, ``es`` (positive losses), and ``error`` — the exception of a
        column that could not be fitted (its numbers are NaN), else None.

    Raises
    ------
    InputTypeError
        ``data`` is not 1-D or 2-D numbers.
    DomainError
        ``confidence`` or ``horizon`` out of range (before any fit).
    """
    try:
        x = np.asarray(data, dtype=np.float64)
    except (TypeError, ValueError):
        raise InputTypeError("data must contain only numbers") from None
    if x.ndim == 1:
        x = x.reshape(-1, 1)
    if x.ndim != 2 or x.size == 0:
        raise InputTypeError("data must be a range of rows and columns")
    errdist.value_at_risk(confidence, 0.0, 1.0, 2.0, horizon)  # checks the arguments once
    rows: list[dict[str, Any]] = []
    for j in range(x.shape[1]):
        col = x[:, j]
        n = int(np.count_nonzero(~np.isnan(col)))
        row: dict[str, Any] = dict.fromkeys(COLUMNS, np.nan)
        row.update(n=n, error=None)
        try:
            f = errdist.fit(col, method=method)  # type: ignore[arg-type]
            law = (f.loc, f.scale, f.shape)
            row.update(
                loc=f.loc,
                scale=f.scale,
                shape=f.shape,
                var=float(errdist.value_at_risk(confidence, *law, horizon)),
                es=float(errdist.expected_shortfall(confidence, *law, horizon)),
            )
        except ValueError as exc:
            row["error"] = type(exc)(f"column {j + 1}: {exc}")
        rows.append(row)
    return pd.DataFrame(rows, columns=list(COLUMNS))
