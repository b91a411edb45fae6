"""Chart points for checking a fit by eye: the ECDF-vs-fit chart and the QQ chart.

For the sorted returns ``x_(1) <= ... <= x_(n)`` the table holds

``return``
    the order statistic ``x_(i)``;
``probability``
    its plotting position, the Hazen position ``p_i = (i - 0.5) / n``
    (Hazen, A. (1914) "Storage to be provided in impounding reservoirs for municipal water
    supply", Transactions of the American Society of Civil Engineers 77:1539–1669; it is
    ``(i - a)/(n + 1 - 2a)`` with ``a = 0.5`` in the family of Cunnane, C. (1978)
    "Unbiased plotting positions — a review", J. Hydrology 37:205–222). It is the midpoint of
    the empirical CDF's jump at ``x_(i)``, so it never reaches 0 or 1 and every point has a
    finite fitted quantile;
``fitted_cdf``
    ``F(x_(i))`` under the fitted generalized normal law;
``fitted_quantile``
    ``F⁻¹(p_i)``, the return the fitted law puts at that probability.

ECDF chart: plot (``return``, ``probability``) as points and (``return``, ``fitted_cdf``) as a
line. QQ chart: plot ``fitted_quantile`` (x axis) against ``return`` (y axis) with the 45° line;
points on the line mean the fitted law matches the data at that probability.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
from numpy.typing import ArrayLike, NDArray

from errdist import estimate as _est
from errdist.law import symmetric as _dist

__all__ = ["EMPIRICAL_COLUMNS", "empirical_points", "plotting_positions"]

#: Columns of the table returned by :func:`empirical_points`.
EMPIRICAL_COLUMNS: tuple[str, ...] = ("return", "probability", "fitted_cdf", "fitted_quantile")


def plotting_positions(n: int) -> NDArray[np.float64]:
    """Hazen plotting positions ``(i - 0.5) / n`` for ``i = 1..n`` (Hazen 1914)."""
    return (np.arange(1, n + 1, dtype=float) - 0.5) / n


def empirical_points(data: ArrayLike, loc: float, scale: float, shape: float) -> pd.DataFrame:
    """Points of the ECDF-vs-fit chart and the QQ chart of data against a GN law.

    Parameters
    ----------
    data : array_like
        Returns; NaN dropped (:func:`errdist.estimate.clean_sample`), at least 4 values.
    loc, scale, shape : float
        The fitted generalized normal law.

    Returns
    -------
    pandas.DataFrame
        n rows, ascending in ``return``; columns ``return`` (order statistic x_(i)),
        ``probability`` (Hazen plotting position (i - 0.5)/n), ``fitted_cdf`` (F(x_(i))),
        ``fitted_quantile`` (F⁻¹((i - 0.5)/n)). See the module docstring for how to chart them.
    """
    _dist.check_params(loc, scale, shape)
    x, _ = _est.clean_sample(data, name="data")
    x = np.sort(x)
    p = plotting_positions(x.size)
    # (x - loc)/scale may overflow to ±inf for absurd parameters: the CDF is then exactly 0 or 1
    with np.errstate(over="ignore", divide="ignore"):
        fitted_cdf = np.asarray(_dist.cdf(x, loc, scale, shape), dtype=float)
        fitted_quantile = np.asarray(_dist.ppf(p, loc, scale, shape), dtype=float)
    return pd.DataFrame(
        {
            "return": x,
            "probability": p,
            "fitted_cdf": fitted_cdf,
            "fitted_quantile": fitted_quantile,
        },
        columns=list(EMPIRICAL_COLUMNS),
    )
