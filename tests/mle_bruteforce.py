"""Brute-force reference for the maximum-likelihood fit (used by tests and a verification script).

Independent of errdist's search: the profile log-likelihood of the generalized normal law
(Nadarajah 2005, J. Applied Statistics 32(7):685-694; scale profiled out in closed form,
a^b = (b/n)·Σ|x−m|^b) is maximised

* for b ≤ 1 over EVERY observation as location (Σ|x−m|^b is concave between neighbouring
  observations, DESIGN.md) and a grid of 91 shapes in [0.1, 1], the best candidates then refined
  in b by scipy.optimize.minimize_scalar (bounded);
* for b ≥ 1 over a grid of 121 shapes in [1, 20] with the location the root of
  Σ sign(x−m)|x−m|^(b−1) (64 bisections on the grid, scipy.optimize.brentq in the refinement;
  Σ|x−m|^b is convex), the best grid points then refined in b.

The value is a lower bound of the true maximum (every point evaluated is feasible), so
``fit.loglik < brute − tol`` proves the fit short.
"""

from __future__ import annotations

import math

import numpy as np
from scipy import optimize
from scipy.special import gammaln

SHAPE_MIN, SHAPE_MAX = 0.1, 20.0


def profile(s: np.ndarray | float, n: int, b: np.ndarray | float) -> np.ndarray | float:
    """ℓ(m, b) from S = Σ|x−m|^b with the closed-form scale."""
    b = np.asarray(b, dtype=float)
    return n * (np.log(b) - math.log(2.0) - gammaln(1.0 / b) - np.log(b * s / n) / b - 1.0 / b)


def _smooth_loc(xs: np.ndarray, b: float) -> float:
    if b == 1.0:
        return float(np.median(xs))

    def t(m: float) -> float:
        d = xs - m
        return float(np.sum(np.sign(d) * np.abs(d) ** (b - 1.0)))

    lo, hi = float(xs[0]), float(xs[-1])
    return float(optimize.brentq(t, lo, hi, xtol=1e-15 * (hi - lo + abs(lo)), maxiter=500))


def _smooth_ll(xs: np.ndarray, b: float) -> tuple[float, float]:
    m = _smooth_loc(xs, b)
    return float(profile(np.sum(np.abs(xs - m) ** b), xs.size, b)), m


def _smooth_grid(xs: np.ndarray, grid: np.ndarray) -> np.ndarray:
    """max_m ℓ(m, b) for every b ≥ 1 of ``grid``: plain bisection on the decreasing score."""
    lo = np.full(grid.size, xs[0])
    hi = np.full(grid.size, xs[-1])
    e = (grid - 1.0)[:, None]
    for _ in range(64):
        mid = 0.5 * (lo + hi)
        d = xs[None, :] - mid[:, None]
        t = np.sum(np.sign(d) * np.abs(d) ** e, axis=1)
        lo = np.where(t > 0.0, mid, lo)
        hi = np.where(t > 0.0, hi, mid)
    m = 0.5 * (lo + hi)
    m[grid == 1.0] = np.median(xs)
    s = np.sum(np.abs(xs[None, :] - m[:, None]) ** grid[:, None], axis=1)
    return np.asarray(profile(s, xs.size, grid))


def brute_force(x: np.ndarray, top: int = 4) -> tuple[float, float, float]:
    """(loglik, loc, shape) of the best point found by the exhaustive/grid search."""
    xs = np.sort(np.asarray(x, dtype=float))
    n = xs.size
    best = (-math.inf, math.nan, math.nan)
    # --- b <= 1: every observation is a candidate location
    lg = np.abs(xs[None, :] - xs[:, None])
    with np.errstate(divide="ignore"):
        np.log(lg, out=lg)
    grid = np.geomspace(SHAPE_MIN, 1.0, 91)
    table = np.empty((grid.size, n))
    for k, b in enumerate(grid):
        table[k] = profile(np.exp(lg * b).sum(axis=1), n, b)
    per_loc = table.max(axis=0)
    cands = np.argsort(per_loc)[::-1][:top]
    for j in cands:
        row = lg[j]

        def neg(b: float, row: np.ndarray = row) -> float:
            return -float(profile(np.exp(row * b).sum(), n, b))

        k = int(np.argmax(table[:, j]))
        lo, hi = grid[max(k - 1, 0)], grid[min(k + 1, grid.size - 1)]
        res = optimize.minimize_scalar(
            neg, bounds=(lo, hi), method="bounded", options={"xatol": 1e-12}
        )
        for b, v in ((float(res.x), -float(res.fun)), (float(grid[k]), float(table[k, j]))):
            if v > best[0]:
                best = (v, float(xs[j]), b)
    del lg
    # --- b >= 1: convex in m, exact location per shape
    grid2 = np.geomspace(1.0, SHAPE_MAX, 121)
    vals = _smooth_grid(xs, grid2)
    for k in np.argsort(vals)[::-1][:2]:
        lo, hi = grid2[max(k - 1, 0)], grid2[min(k + 1, grid2.size - 1)]
        res = optimize.minimize_scalar(
            lambda b: -_smooth_ll(xs, b)[0],
            bounds=(lo, hi),
            method="bounded",
            options={"xatol": 1e-12},
        )
        for b in (float(res.x), float(grid2[k])):
            v, m = _smooth_ll(xs, b)
            if v > best[0]:
                best = (v, m, b)
    return best
