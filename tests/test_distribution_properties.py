"""Property tests (hypothesis) for errdist.law.symmetric.

Properties of any continuous distribution function (common practice, no source): F + S = 1,
F non-decreasing, quantile(F(x)) = x where F is not flat in double precision, and the symmetry
of the generalized normal law about its location (Nadarajah 2005, J. Applied Statistics
32(7):685-694, eq. 1).
"""

from __future__ import annotations

import math

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import stats

import errdist.law as D

shapes = st.floats(min_value=0.3, max_value=10.0)
locs = st.floats(min_value=-1e3, max_value=1e3)
scales = st.floats(min_value=1e-3, max_value=1e3)
offsets = st.floats(min_value=-30.0, max_value=30.0)  # in scales

SETTINGS = settings(max_examples=150, deadline=None)


@SETTINGS
@given(offsets, locs, scales, shapes)
def test_cdf_plus_sf_is_one(k: float, loc: float, scale: float, shape: float) -> None:
    x = loc + k * scale
    assert math.isclose(
        D.cdf(x, loc, scale, shape) + D.sf(x, loc, scale, shape), 1.0, rel_tol=1e-15
    )


@SETTINGS
@given(offsets, scales, shapes)
def test_symmetry_about_loc(k: float, scale: float, shape: float) -> None:
    # F(m - t) = S(m + t): the density depends on |x - m| only (Nadarajah 2005, eq. 1).
    # loc = 0 so that m - t and m + t are both exact and the identity must hold bit for bit.
    t = abs(k) * scale
    assert D.cdf(-t, 0.0, scale, shape) == D.sf(t, 0.0, scale, shape)
    assert D.logcdf(-t, 0.0, scale, shape) == D.logsf(t, 0.0, scale, shape)


@SETTINGS
@given(st.lists(offsets, min_size=2, max_size=30), locs, scales, shapes)
def test_cdf_monotone(ks: list[float], loc: float, scale: float, shape: float) -> None:
    x = np.sort(loc + np.asarray(ks) * scale)
    f = D.cdf(x, loc, scale, shape)
    assert np.all(np.diff(f) >= 0.0)
    assert np.all((f >= 0.0) & (f <= 1.0))
    s = D.sf(x, loc, scale, shape)
    assert np.all(np.diff(s) <= 0.0)


@SETTINGS
@given(st.floats(min_value=-20.0, max_value=20.0), shapes)
def test_ppf_cdf_round_trip(k: float, shape: float) -> None:
    # x -> F(x) -> F^-1 recovers x wherever F(x) carries information about x: in the lower
    # tail F = 1/2 Q keeps full relative precision; on the upper side only while 1 - F is not
    # rounded away, so use isf(sf(x)) there (same identity with the tail taken exactly).
    loc, scale = 0.3, 2.0
    x = loc + k * scale
    if k <= 0:
        p = D.cdf(x, loc, scale, shape)
        back = D.ppf(p, loc, scale, shape)
    else:
        p = D.sf(x, loc, scale, shape)
        back = D.isf(p, loc, scale, shape)
    if p < 1e-300:  # F underflowed: nothing left to invert
        return
    # conditioning of the inverse: |dx/dp| * p / |x| = p / (f(x) |x|)
    f = D.pdf(x, loc, scale, shape)
    cond = p / (f * max(abs(x - loc), scale)) if f > 0 else 1.0
    assert abs(back - x) <= 1e-13 * (1.0 + cond) * max(abs(x - loc), scale) + 1e-12 * abs(loc)


@SETTINGS
@given(st.floats(min_value=1e-300, max_value=1.0), shapes)
def test_cdf_ppf_round_trip(p: float, shape: float) -> None:
    x = D.ppf(p, 0.0, 1.0, shape)
    if math.isinf(x):
        assert p == 1.0
        return
    assert math.isclose(D.cdf(x, 0.0, 1.0, shape), p, rel_tol=1e-12)


@SETTINGS
@given(st.floats(min_value=1e-200, max_value=0.5), shapes)
def test_isf_is_reflected_ppf_and_matches_scipy(p: float, shape: float) -> None:
    # scipy.stats.gennorm.isf as the outside reference (accurate: it inverts Q on p directly).
    assert D.isf(p, 0.0, 1.0, shape) == -D.ppf(p, 0.0, 1.0, shape)
    ref = float(stats.gennorm.isf(p, shape))
    assert math.isclose(D.isf(p, 0.0, 1.0, shape), ref, rel_tol=1e-12, abs_tol=1e-300)
