"""Batched exact MLE (errdist.estimate.mle_batch) checked row by row against scipy and the one-row fit.

The batched refits must equal the one-row exact fit errdist.estimate.mle._mle_sorted on every
row; the log-likelihood is recomputed with scipy.stats.gennorm.logpdf (the reference), and small
rows are compared with an independent brute-force search (tests/mle_bruteforce.py).
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy import stats

from errdist.estimate.mle import SHAPE_MAX, SHAPE_MIN, _mle_sorted
from errdist.estimate.mle_batch import mle_sorted_rows
from mle_bruteforce import brute_force

SHAPES = [0.3, 0.7, 0.95, 1.0, 1.05, 1.5, 2.0, 5.0]


def _rows(shape: float, n: int, rows: int, seed: int) -> np.ndarray:
    # simulated with scipy (reference sampler of the same law: gennorm(beta=shape))
    x = stats.gennorm.rvs(shape, loc=0.0004, scale=0.01, size=(rows, n), random_state=seed)
    return np.sort(x, axis=1)


def _check_rows(x: np.ndarray, start: float | None) -> tuple[np.ndarray, ...]:
    loc, scale, shape, ll = mle_sorted_rows(x, start)
    one = np.array([_mle_sorted(r, start) for r in x])
    # Reference log-likelihood: scipy.stats.gennorm.logpdf (beta, loc, scale) at our estimate
    ref_ll = stats.gennorm.logpdf(x, shape[:, None], loc[:, None], scale[:, None]).sum(axis=1)
    np.testing.assert_allclose(ll, ref_ll, rtol=1e-10, atol=1e-8)
    # the batched refit IS the one-row fit on every row (exact equality)
    np.testing.assert_array_equal(np.column_stack([loc, scale, shape, ll]), one)
    assert np.all((shape >= SHAPE_MIN) & (shape <= SHAPE_MAX))
    rough = shape <= 1.0
    # for b <= 1 the location is an observation (S_b concave between observations)
    assert all(loc[r] in x[r] for r in np.flatnonzero(rough))
    return loc, scale, shape, ll, one


@pytest.mark.parametrize("shape", SHAPES)
@pytest.mark.parametrize(("n", "rows"), [(50, 120), (250, 60), (1260, 60)])
def test_batched_mle_never_below_the_one_row_fit(shape: float, n: int, rows: int) -> None:
    # 8 shapes x 240 rows = 1,920 rows, warm-started at the simulated shape as the bootstrap
    x = _rows(shape, n, rows, seed=int(shape * 1000) + n)
    _check_rows(x, shape)


@pytest.mark.parametrize("start", [0.9, 1.0, 1.02, 1.2])
def test_batched_mle_from_starts_around_one(start: float) -> None:
    # Starts near b = 1, where the joint Newton gives up and the alternation takes over
    # (both sides of the switch from the discrete to the smooth location search).
    x = _rows(1.0, 1260, 80, seed=int(start * 100))
    _check_rows(x, start)


def test_rows_at_the_shape_bounds() -> None:
    # Short near-uniform rows send the shape to SHAPE_MAX (a flagged bound).
    rng = np.random.default_rng(5)
    x = np.sort(rng.uniform(-1.0, 1.0, size=(40, 12)), axis=1)
    loc, scale, shape, ll, one = _check_rows(x, 5.0)
    at_max = shape == SHAPE_MAX
    assert np.any(at_max)
    # Reference for a bound fit: scipy's generic fit does not do better (it is not bounded
    # and may go beyond SHAPE_MAX, so only the bounded rows are compared by likelihood).
    r = int(np.flatnonzero(at_max)[0])
    b, m, a = stats.gennorm.fit(x[r], 20.0, loc=loc[r], scale=scale[r])
    if b <= SHAPE_MAX:
        assert ll[r] >= stats.gennorm.logpdf(x[r], b, m, a).sum() - 1e-9


@pytest.mark.parametrize("shape", [0.8, 1.0, 1.2])
def test_small_rows_against_brute_force(shape: float) -> None:
    # Small bootstrap rows (n = 30) near b = 1, where a single-region search used to stop
    # at the lower of two maxima: every row against the brute-force search of
    # tests/mle_bruteforce.py (every observation as location for b <= 1, dense shape grid
    # with the exact convex location for b >= 1; independent of errdist's search).
    x = _rows(shape, 30, 40, seed=int(shape * 77))
    _, _, _, ll, _ = _check_rows(x, shape)
    for r in range(x.shape[0]):
        best = brute_force(x[r])[0]
        assert ll[r] >= best - 1e-9 * abs(best), f"row {r}: short by {best - ll[r]:.3g}"


def test_heavy_tailed_rows_near_the_lower_bound() -> None:
    # Very heavy tails (shape 0.15 simulated, start 0.1): some rows end at SHAPE_MIN.
    x = _rows(0.15, 250, 30, seed=3)
    _check_rows(x, 0.1)


def test_moment_start_and_scipy_generic_fit() -> None:
    # start_shape None: every row from its own moment estimate (one-row fit per row).
    x = _rows(1.3, 300, 6, seed=9)
    loc, scale, shape, ll, _ = _check_rows(x, None)
    for r in range(3):
        # Reference: scipy.stats.gennorm.fit (generic numerical MLE) is never better
        b, m, a = stats.gennorm.fit(x[r])
        assert ll[r] >= stats.gennorm.logpdf(x[r], b, m, a).sum() - 1e-9


def test_exact_ties_with_the_location_are_handled() -> None:
    # Rounded data (many ties, the median an observation repeated): every step of the
    # batched search must cope with x == m, and the result still be the MLE.
    x = np.sort(np.round(_rows(1.1, 1260, 20, seed=4) * 2000.0) / 2000.0, axis=1)
    _check_rows(x, 1.1)
