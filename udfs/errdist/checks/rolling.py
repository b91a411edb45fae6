r"""Rolling one-day VaR forecasts from a window refitted every day, without look-ahead."""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import ArrayLike, NDArray

from errdist.checks.backtest import _confidence, _count, _no_infinity, _numeric_column
from errdist.errors import InputTypeError, InsufficientDataError
from errdist.estimate.fit import fit
from errdist.estimate.mle import _mle_sorted
from errdist.risk.measures import value_at_risk

__all__ = ["ROLLING_METHODS", "rolling_var"]

ROLLING_METHODS = ("mle", "moments")


def rolling_var(
    returns: ArrayLike, window: int, confidence: float, method: str = "mle"
) -> NDArray[np.float64]:
    r"""One-day VaR forecasts from a rolling fit, aligned with the returns.

    For each day :math:`t \ge w` (0-based) the law is fitted to ``returns[t-w:t]`` only — the
    :math:`w` days *before* :math:`t`, never day :math:`t` or later — and
    ``out[t] = value_at_risk(confidence, loc, scale, shape)``. The first ``window`` positions
    are NaN (no forecast), so the result feeds :func:`backtest` directly together with the
    same returns column.

    Blank / NaN returns inside a window are dropped from that window's fit (the window still
    spans ``window`` positions, so it holds fewer numbers); a window needs at least 4 numbers.
    A NaN return at day :math:`t` does not stop the forecast for day :math:`t`.

    ``method="mle"`` runs the exact maximum-likelihood fit (:func:`errdist.estimate.fit`'s
    engine, which searches both shape regions and does not depend on a start) on each window,
    so every forecast equals ``value_at_risk(confidence, *fit(window))`` exactly — the same
    figures ERRDIST_FIT gives on that window.
    ``"moments"`` uses the spreadsheet-statistics fit.

    Parameters
    ----------
    returns : array_like
        Returns in time order: 1-D, or a one-column / one-row 2-D range.
    window : int
        Number of past days per fit, >= 4 and smaller than the number of returns.
    confidence : float
        VaR confidence in (0, 1).
    method : {"mle", "moments"}, default "mle"

    Returns
    -------
    numpy.ndarray
        Same shape as ``returns``; NaN in the first ``window`` positions.

    Raises
    ------
    InsufficientDataError
        ``window`` not smaller than the number of returns; a window with fewer than 4
        numbers or no spread (the message names the day).
    DomainError
        Bad ``window`` / ``confidence``; ±inf returns; a moments fit impossible (kurtosis
        <= -1.2) in some window.
    InputTypeError
        Text in the returns, an unknown method, a 2-D range with several rows and columns.
    """
    c = _confidence(confidence)
    if not isinstance(method, str) or method.strip().lower() not in ROLLING_METHODS:
        raise InputTypeError(f'method must be "mle" or "moments", got {method!r}')
    method = method.strip().lower()
    in_shape = np.shape(returns)
    if len(in_shape) > 2 or (len(in_shape) == 2 and min(in_shape) > 1):
        raise InputTypeError(
            f"returns must be one column or one row, got a range of shape {in_shape}"
        )
    r = _numeric_column("returns", returns)
    _no_infinity("returns", r)
    w = _count("window", window, 4)
    n = r.size
    if w >= n:
        raise InsufficientDataError(
            f"window ({w}) must be smaller than the number of returns ({n})"
        )
    locs = np.empty(n - w)
    scales = np.empty(n - w)
    shapes = np.empty(n - w)
    finite = ~np.isnan(r)
    for t in range(w, n):
        seg = r[t - w : t]
        if not finite[t - w : t].all():
            seg = seg[finite[t - w : t]]
        if seg.size < 4:
            raise InsufficientDataError(
                f"the {w}-day window before day {t + 1} holds only {seg.size} numbers; "
                "at least 4 are needed"
            )
        if method == "mle":
            xs = np.sort(seg)
            if xs[0] == xs[-1]:
                raise InsufficientDataError(
                    f"the returns in the window before day {t + 1} are all equal: no spread to fit"
                )
            m, a, b, _ = _mle_sorted(xs)
        else:
            try:
                f = fit(seg, "moments")
            except ValueError as exc:
                raise type(exc)(f"window before day {t + 1}: {exc}") from exc
            m, a, b = f.loc, f.scale, f.shape
        k = t - w
        locs[k], scales[k], shapes[k] = m, a, b
    out = np.full(n, math.nan)
    out[w:] = value_at_risk(c, locs, scales, shapes)
    return out.reshape(in_shape) if len(in_shape) == 2 else out
