"""Each of the law's worksheet functions, called as Excel calls it, against outside references.

Calls go through the replay of xlwings 0.37.8's own conversion code (tests/sheet_harness.py).
References: scipy.stats.gennorm (the same law: beta = shape), mpmath for far tails, pandas for
the spreadsheet sample statistics (Series.skew / Series.kurt are the adjusted G1 / G2 of
Joanes & Gill 1998, which SKEW / KURT compute), and the spreadsheet vendor's KURT help page.
"""

from __future__ import annotations

import math
from typing import Any

import mpmath
import numpy as np
import pandas as pd
import pytest
import scipy
import scipy.stats as st

import errdist
import sheet_harness as h
from errdist.law import symmetric as distribution

X = [-3.0, -0.7, 0.0, 0.4, 2.5]
PARAMS = [(0.0, 1.0, 2.0), (0.01, 0.02, 1.0), (-1.0, 2.5, 0.6), (0.5, 0.3, 7.0)]


@pytest.fixture(scope="module")
def xl() -> Any:
    with h.replay() as r:
        yield r


def one(cells: list[list[Any]]) -> Any:
    assert len(cells) == 1 and len(cells[0]) == 1, cells
    return cells[0][0]


def col(cells: list[list[Any]]) -> list[Any]:
    assert all(len(r) == 1 for r in cells), cells
    return [r[0] for r in cells]


@pytest.mark.parametrize(("loc", "scale", "shape"), PARAMS)
def test_pdf_cdf_inv_match_scipy_and_the_core(xl: Any, loc: float, scale: float, shape: float):
    law = st.gennorm(shape, loc=loc, scale=scale)  # reference library
    xs = [loc + scale * x for x in X]
    pdf = col(xl.cells("ERRDIST_PDF", h.column(xs), loc, scale, shape))
    cdf = col(xl.cells("ERRDIST_CDF", h.column(xs), loc, scale, shape))
    ps = [0.001, 0.05, 0.5, 0.9, 0.999]
    inv = col(xl.cells("ERRDIST_INV", h.column(ps), loc, scale, shape))
    np.testing.assert_allclose(pdf, law.pdf(xs), rtol=1e-12)
    np.testing.assert_allclose(cdf, law.cdf(xs), rtol=1e-12)
    np.testing.assert_allclose(inv, law.ppf(ps), rtol=1e-10, atol=1e-14)
    # through the sheet layer exactly what the core computes (to 1e-12)
    np.testing.assert_allclose(pdf, distribution.pdf(np.array(xs), loc, scale, shape), rtol=1e-12)
    np.testing.assert_allclose(cdf, distribution.cdf(np.array(xs), loc, scale, shape), rtol=1e-12)
    single = one(xl.cells("ERRDIST_CDF", xs[1], loc, scale, shape))
    assert math.isclose(single, distribution.cdf(xs[1], loc, scale, shape), rel_tol=1e-12)


def test_upper_tail_keeps_its_digits(xl: Any) -> None:
    # P(X > 30) for shape 1.5: 0.5 * Q(1/b, 30^b), from mpmath at 30 digits (reference).
    mpmath.mp.dps = 30
    b, x = 1.5, 30.0
    want = float(
        0.5
        * mpmath.gammainc(1 / mpmath.mpf(b), mpmath.mpf(x) ** b, mpmath.inf)
        / mpmath.gamma(1 / mpmath.mpf(b))
    )
    got = one(xl.cells("ERRDIST_CDF", x, 0.0, 1.0, b, True))
    assert want < 1e-70
    assert math.isclose(got, want, rel_tol=1e-10)
    assert one(xl.cells("ERRDIST_CDF", x, 0.0, 1.0, b)) == 1.0  # the lower form rounds


def test_broadcast_column_against_row(xl: Any) -> None:
    xs, shapes = [-1.0, 0.0, 2.0], [1.0, 2.0, 4.0, 8.0]
    got = xl.cells("ERRDIST_PDF", h.column(xs), 0.0, 1.0, h.ComRange([shapes]))
    want = st.gennorm.pdf(np.array(xs)[:, None], np.array(shapes)[None, :])  # reference
    np.testing.assert_allclose(np.array(got, dtype=float), want, rtol=1e-12)


def test_blank_in_a_spill_stays_blank_in_place(xl: Any) -> None:
    got = col(xl.cells("ERRDIST_CDF", h.column([0.1, None, 0.3]), 0.0, 1.0, 2.0))
    assert got[1] is None
    np.testing.assert_allclose([got[0], got[2]], st.gennorm.cdf([0.1, 0.3], 2.0), rtol=1e-12)


def test_out_of_domain_element_shows_in_its_own_cell(xl: Any) -> None:
    got = col(xl.cells("ERRDIST_INV", h.column([0.5, 1.5, 0.9]), 0.0, 1.0, 2.0))
    assert got[1].startswith("#NUM! ")
    assert math.isclose(got[2], st.gennorm.ppf(0.9, 2.0), rel_tol=1e-10)


@pytest.mark.parametrize(
    ("args", "code"),
    [
        ((0.5, 0.0, -1.0, 2.0), "#NUM! scale must be > 0"),
        ((0.5, 0.0, 1.0, 0.0), "#NUM! shape must be > 0"),
        ((0.5, 0.0, 1.0, "two"), "#VALUE! shape is text 'two'"),
        ((0.5, 0.0, h.ErrorValue("#N/A"), 2.0), "#N/A scale is an error value #N/A"),
    ],
)
def test_bad_scalars_give_coded_text(xl: Any, args: tuple, code: str) -> None:
    assert str(one(xl.cells("ERRDIST_PDF", *args))).startswith(code)


@pytest.mark.parametrize("shape", [0.5, 1.0, 1.5, 2.0, 5.0])
def test_variance_and_kurtosis_match_scipy(xl: Any, shape: float) -> None:
    var, kurt = st.gennorm.stats(shape, scale=0.02, moments="vk")  # reference library
    assert math.isclose(one(xl.cells("ERRDIST_VARIANCE", 0.02, shape)), float(var), rel_tol=1e-12)
    assert math.isclose(
        one(xl.cells("ERRDIST_KURT", shape)), float(kurt), rel_tol=1e-10, abs_tol=1e-13
    )


def test_kurtosis_of_normal_and_laplace(xl: Any) -> None:
    # Nadarajah (2005): b = 2 is the normal law (excess kurtosis 0), b = 1 Laplace (3).
    assert abs(one(xl.cells("ERRDIST_KURT", 2.0))) < 1e-13
    assert math.isclose(one(xl.cells("ERRDIST_KURT", 1.0)), 3.0, rel_tol=1e-13)


@pytest.mark.parametrize("shape", [0.4, 1.0, 1.7, 3.0, 12.0])
def test_solve_shape_and_scale_invert_scipy_moments(xl: Any, shape: float) -> None:
    kurt = float(st.gennorm.stats(shape, moments="k"))  # reference library
    assert math.isclose(one(xl.cells("ERRDIST_SOLVE_SHAPE", kurt)), shape, rel_tol=1e-8)
    sd = float(st.gennorm.std(shape, scale=0.013))
    assert math.isclose(one(xl.cells("ERRDIST_SOLVE_SCALE", sd, shape)), 0.013, rel_tol=1e-12)


def test_solve_shape_refuses_kurtosis_at_or_below_the_uniform_limit(xl: Any) -> None:
    # The uniform law's excess kurtosis -1.2 is the family's infimum (Nadarajah 2005).
    assert one(xl.cells("ERRDIST_SOLVE_SHAPE", -1.2)).startswith("#NUM! ")
    got = col(xl.cells("ERRDIST_SOLVE_SHAPE", h.column([0.0, -1.5])))
    assert math.isclose(got[0], 2.0, rel_tol=1e-10) and got[1].startswith("#NUM! ")


def sample(n: int = 400, shape: float = 1.3, seed: int = 7) -> np.ndarray:
    # drawn with the reference library's own generator
    return st.gennorm.rvs(shape, loc=0.0005, scale=0.01, size=n, random_state=seed)


def test_loglik_matches_scipy_sum_and_skips_blanks(xl: Any) -> None:
    x = sample(50)
    cells = [[v] for v in x.tolist()]
    cells.insert(10, [None])
    got = one(xl.cells("ERRDIST_LOGLIK", h.ComRange(cells), 0.0005, 0.01, 1.3))
    want = st.gennorm.logpdf(x, 1.3, loc=0.0005, scale=0.01).sum()  # reference
    assert math.isclose(got, want, rel_tol=1e-12)
    prof = xl.cells("ERRDIST_LOGLIK", h.ComRange(cells), 0.0005, 0.01, h.ComRange([[1.0, 2.0]]))
    want2 = [st.gennorm.logpdf(x, b, loc=0.0005, scale=0.01).sum() for b in (1.0, 2.0)]
    np.testing.assert_allclose(prof[0], want2, rtol=1e-12)


def test_fit_mle_is_at_least_as_likely_as_scipy_fit(xl: Any) -> None:
    x = sample(400)
    loc, scale, shape = xl.cells("ERRDIST_FIT", h.column(x.tolist()))[0]
    ours = st.gennorm.logpdf(x, shape, loc=loc, scale=scale).sum()
    b, m, a = st.gennorm.fit(x)  # reference optimiser
    theirs = st.gennorm.logpdf(x, b, loc=m, scale=a).sum()
    assert ours >= theirs - 1e-7
    assert math.isclose(shape, b, rel_tol=2e-2) and math.isclose(scale, a, rel_tol=2e-2)


def test_fit_header_and_moments_method(xl: Any) -> None:
    x = sample(300, shape=1.0, seed=3)
    got = xl.cells("ERRDIST_FIT", h.column(x.tolist()), "Moments", True)
    assert got[0] == ["loc", "scale", "shape"]
    loc, scale, shape = got[1]
    s = pd.Series(x)
    # moments fit: the law's kurtosis and sd equal the sample's KURT and STDEV.S
    # (scipy.stats.gennorm moments; pandas kurt/std are the spreadsheet's KURT/STDEV.S)
    assert math.isclose(float(st.gennorm.stats(shape, moments="k")), s.kurt(), rel_tol=1e-8)
    assert math.isclose(float(st.gennorm.std(shape, scale=scale)), s.std(), rel_tol=1e-8)


def test_fit_report_statistics_match_pandas(xl: Any) -> None:
    x = sample(120, seed=11)
    cells = [[v] for v in x.tolist()]
    cells[5] = [None]  # one blank inside, skipped and counted
    cells += [[None], [None]]  # trailing blanks (a longer selection) are not counted
    table = xl.cells("ERRDIST_FIT_REPORT", h.ComRange(cells))
    rows = {r[0]: r[1] for r in table}
    used = pd.Series([c[0] for c in cells if c[0] is not None])
    assert all(len(r) == 2 for r in table)
    assert rows["n used"] == 119 and rows["blanks skipped"] == 1
    assert math.isclose(rows["mean"], used.mean(), rel_tol=1e-12)
    assert math.isclose(rows["median"], used.median(), rel_tol=1e-12)
    assert math.isclose(rows["STDEV.S"], used.std(), rel_tol=1e-12)
    assert math.isclose(rows["SKEW"], used.skew(), rel_tol=1e-9)
    assert math.isclose(rows["KURT"], used.kurt(), rel_tol=1e-9)
    ll = st.gennorm.logpdf(used, rows["MLE shape"], rows["MLE loc"], rows["MLE scale"]).sum()
    assert math.isclose(rows["MLE log-likelihood"], ll, rel_tol=1e-10)
    assert math.isclose(rows["MLE AIC"], 2 * 3 - 2 * ll, rel_tol=1e-10)  # Akaike, k = 3
    assert rows["MLE shape at search bound"] is False


def test_fit_report_kurt_help_page_example(xl: Any) -> None:
    # The spreadsheet vendor's KURT help page: 3,4,5,2,3,4,5,6,4,7 -> -0.151799637.
    data = [3, 4, 5, 2, 3, 4, 5, 6, 4, 7]
    rows = {r[0]: r[1] for r in xl.cells("ERRDIST_FIT_REPORT", h.column(data))}
    assert math.isclose(rows["KURT"], -0.151799637, abs_tol=5e-10)


def test_fit_report_keeps_the_table_when_moments_fit_is_impossible(xl: Any) -> None:
    # 0,0,0,1,1,1: KURT = -3.33 (pandas), below the family's infimum -1.2 (Nadarajah 2005).
    data = [0.0, 0.0, 0.0, 1.0, 1.0, 1.0]
    assert pd.Series(data).kurt() < -1.2
    table = xl.cells("ERRDIST_FIT_REPORT", h.column(data))
    rows = {r[0]: r[1] for r in table}
    assert rows["moments shape"].startswith("#NUM! ")
    assert isinstance(rows["MLE shape"], float)
    assert isinstance(rows["mean"], float)


def test_fit_needs_four_points_and_spread(xl: Any) -> None:
    assert one(xl.cells("ERRDIST_FIT", h.column([0.1, 0.2, None, 0.3]))).startswith("#N/A ")
    assert one(xl.cells("ERRDIST_FIT", h.column([0.5] * 10)))[:1] == "#"
    got = one(xl.cells("ERRDIST_FIT", h.column([0.1, "n/a", 0.2, 0.3, 0.4])))
    assert got == "#VALUE! cell 2 of data is text 'n/a'"


def test_returns_match_numpy_and_pandas(xl: Any) -> None:
    prices = [100.0, 101.5, None, 99.0, 99.5, 102.25]
    logs = col(xl.cells("ERRDIST_RETURNS", h.column(prices)))
    simple = col(xl.cells("ERRDIST_RETURNS", h.column(prices), "simple"))
    ref = pd.Series(prices, dtype=float)
    want_simple = ref.pct_change(fill_method=None).iloc[1:].tolist()  # reference: pandas
    want_log = np.log(ref / ref.shift(1)).iloc[1:].tolist()  # reference: numpy log
    assert len(logs) == len(prices) - 1
    assert logs[1] is None and logs[2] is None and simple[1] is None
    for got, want in ((logs, want_log), (simple, want_simple)):
        for g, w in zip(got, want, strict=True):
            assert (g is None) == math.isnan(w)
            if g is not None:
                assert math.isclose(g, w, rel_tol=1e-12)


def test_returns_of_a_row_stay_a_row_and_bad_prices_name_the_row(xl: Any) -> None:
    row = xl.cells("ERRDIST_RETURNS", h.ComRange([[100.0, 110.0, 121.0]]), "simple")
    np.testing.assert_allclose(row, [[0.1, 0.1]], rtol=1e-12)
    got = one(xl.cells("ERRDIST_RETURNS", h.column([100.0, 101.0, 0.0, 99.0])))
    assert got.startswith("#NUM! ") and "row 3" in got


def test_rand_is_reproducible_with_a_seed_and_follows_the_law(xl: Any) -> None:
    a = col(xl.cells("ERRDIST_RAND", 2000, 0.0, 1.0, 1.3, 12345))
    b = col(xl.cells("ERRDIST_RAND", 2000, 0.0, 1.0, 1.3, 12345))
    c = col(xl.cells("ERRDIST_RAND", 2000, 0.0, 1.0, 1.3, 54321))
    assert a == b and a != c and len(a) == 2000
    # Kolmogorov-Smirnov against scipy's gennorm cdf (reference); seeded, so deterministic.
    assert st.kstest(a, st.gennorm(1.3).cdf).pvalue > 0.01
    assert one(xl.cells("ERRDIST_RAND", 2.5, 0.0, 1.0, 1.3)).startswith("#NUM! count")
    assert one(xl.cells("ERRDIST_RAND", 0, 0.0, 1.0, 1.3)).startswith("#NUM! count")


def test_version_names_the_packages_in_use(xl: Any) -> None:
    text = one(xl.cells("ERRDIST_VERSION"))
    assert f"errdist {errdist.__version__}" in text
    assert f"numpy {np.__version__}" in text and f"scipy {scipy.__version__}" in text
    assert "xlwings 0.37.8" in text  # the pinned version (pyproject.toml)
