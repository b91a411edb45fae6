"""Exact maximum-likelihood fits of the generalized normal law for many samples at once.

The bootstrap of :mod:`errdist.checks.goodness` refits hundreds of simulated samples of the same
size. Each row is fitted by :func:`errdist.estimate.mle._mle_sorted`, the engine of
:func:`errdist.estimate.fit`, so every refit equals the one-row fit exactly (same search, same
floating-point path).

An earlier version ran the search on all rows together with masks (a batched joint Newton and
alternation, rows it could not settle refitted one by one). It followed a single region of the
shape from a common start and fell short of the one-row fit on 65 of 32,000 small rows (by up to
1.67 log-likelihood units): the one-row fit now searches both shape regions (b ≤ 1 and b ≥ 1, see
:mod:`errdist.estimate.mle`), and equality with it is worth more than the 1.2–1.8× the batched
search saved.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import NDArray

from errdist.estimate.mle import _mle_sorted

__all__ = ["mle_sorted_rows"]

FloatArray = NDArray[np.float64]


def mle_sorted_rows(
    xs: FloatArray, start_shape: float | None = None
) -> tuple[FloatArray, FloatArray, FloatArray, FloatArray]:
    """Maximum-likelihood (loc, scale, shape, loglik) of every row of sorted samples.

    Parameters
    ----------
    xs : ndarray, shape (rows, n)
        Finite samples, each row sorted ascending and not constant (no checks: internal
        entry point, like :func:`errdist.estimate.mle._mle_sorted`).
    start_shape : float or None
        Accepted for compatibility; the fit does not depend on a start.

    Returns
    -------
    loc, scale, shape, loglik : ndarray, shape (rows,)
        For every row exactly ``_mle_sorted(row)``.
    """
    xs = np.ascontiguousarray(xs, dtype=float)
    out = np.empty((4, xs.shape[0]))
    for r in range(xs.shape[0]):
        out[:, r] = _mle_sorted(xs[r], start_shape)
    return out[0], out[1], out[2], out[3]
