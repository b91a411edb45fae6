"""ERRDIST_GOF, ERRDIST_COMPARE and ERRDIST_EMPIRICAL called as Excel calls them.

Calls go through the replay of xlwings 0.37.8's own conversion code (tests/sheet_harness.py);
results are checked against scipy.stats (gennorm, norm, laplace, t, cauchy, goodness_of_fit)
and statsmodels' plotting positions.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np
import pytest
from scipy import stats

import sheet_harness as h


@pytest.fixture(scope="module")
def xl() -> Any:
    with h.replay() as r:
        yield r


def _returns(n: int = 250, seed: int = 7) -> np.ndarray:
    # simulated, seeded heavy-tailed daily returns (t with 4 degrees of freedom)
    return np.random.default_rng(seed).standard_t(4, size=n) * 0.01 + 0.0003


def test_gof_fixed_law_matches_scipy(xl: Any) -> None:
    # Reference: scipy.stats.goodness_of_fit(norm, known loc/scale): same A²; p-values agree
    # within Monte-Carlo error (binomial SE of the difference sqrt(2p(1-p)/999), 4 SE allowed).
    x = _returns()
    sd = float(np.std(x))
    got = xl.cells("ERRDIST_GOF", h.column(list(x)), 0.0, sd * math.sqrt(2.0), 2.0, "ad", 999, 5)
    table = dict((row[0], row[1]) for row in got)
    ref = stats.goodness_of_fit(
        stats.norm, x, known_params={"loc": 0.0, "scale": sd}, n_mc_samples=999, rng=6
    )
    assert table["statistic"] == "Anderson-Darling A2"
    assert table["value"] == pytest.approx(ref.statistic, rel=1e-9)
    p = max(ref.pvalue, 0.01)
    assert abs(table["p-value"] - ref.pvalue) <= 4 * math.sqrt(2 * p * (1 - p) / 999)
    assert table["refit"] is False
    assert table["samples"] == 999 and table["n"] == x.size


def test_gof_fitted_law_and_partial_parameters(xl: Any) -> None:
    x = _returns(120, 3)
    got = dict(
        (r[0], r[1])
        for r in xl.cells("ERRDIST_GOF", h.column(list(x)), None, None, None, "ks", 49, 1)
    )
    assert got["refit"] is True and got["statistic"] == "Kolmogorov-Smirnov D"
    # the KS distance of the data from the fitted law, by scipy.stats.kstest with gennorm
    ref = stats.kstest(x, stats.gennorm(got["shape"], got["loc"], got["scale"]).cdf).statistic
    assert got["value"] == pytest.approx(ref, rel=1e-9)
    bad = xl.cells("ERRDIST_GOF", h.column(list(x)), 0.0, None, 2.0)
    assert bad[0][0].startswith("#VALUE!") and "all of loc, scale and shape" in bad[0][0]
    bad = xl.cells("ERRDIST_GOF", h.column(list(x)), None, None, None, "ad", 0)
    assert bad[0][0].startswith("#NUM!")
    bad = xl.cells("ERRDIST_GOF", h.column(list(x)), None, None, None, "chi")
    assert bad[0][0].startswith("#VALUE!")


def test_compare_rows_match_scipy(xl: Any) -> None:
    x = _returns(400, 11)
    got = xl.cells("ERRDIST_COMPARE", h.column(list(x)), True)
    assert got[0] == [
        "law",
        "loc",
        "scale",
        "shape_or_df",
        "loglik",
        "aic",
        "bic",
        "ks",
        "var99",
        "at_bound",
    ]
    rows = {r[0]: r for r in got[1:]}
    assert len(rows) == 5
    laws = {
        "normal": lambda m, s, c: stats.norm(m, s),
        "Laplace": lambda m, s, c: stats.laplace(m, s),
        "Student t": lambda m, s, c: stats.t(c, m, s),
        "Cauchy": lambda m, s, c: stats.cauchy(m, s),
        "generalized normal": lambda m, s, c: stats.gennorm(c, m, s),
    }
    for law, make in laws.items():
        _, m, s, c, ll, aic, _bic, ks, var99, at_bound = rows[law]
        assert at_bound is False  # no shape or df at its search bound on these data
        d = make(m, s, c)
        assert ll == pytest.approx(d.logpdf(x).sum(), rel=1e-9)  # scipy.stats log-density
        assert ks == pytest.approx(stats.kstest(x, d.cdf).statistic, rel=1e-9)
        assert var99 == pytest.approx(-d.ppf(0.01), rel=1e-9)
        if law in ("normal", "Laplace", "Cauchy"):
            assert c in ("", None)  # blank cell: no shape parameter
    aics = [r[5] for r in got[1:]]
    assert aics == sorted(aics)
    # the Student t MLE reaches scipy.stats.t.fit's likelihood
    assert rows["Student t"][4] >= stats.t.logpdf(x, *stats.t.fit(x)).sum() - 1e-9 * abs(
        rows["Student t"][4]
    )


def test_empirical_points_match_scipy_and_statsmodels(xl: Any) -> None:
    x = list(_returns(30, 2))
    x[4] = None  # a blank cell is skipped
    got = xl.cells("ERRDIST_EMPIRICAL", h.column(x), 0.0003, 0.009, 1.3, True)
    assert got[0] == ["return", "probability", "fitted_cdf", "fitted_quantile"]
    body = np.array(got[1:], dtype=float)
    xs = np.sort([v for v in x if v is not None])
    gofplots = pytest.importorskip("statsmodels.graphics.gofplots")
    p = gofplots.plotting_pos(xs.size, 0.5)  # Hazen (i - 0.5)/n
    law = stats.gennorm(1.3, 0.0003, 0.009)
    np.testing.assert_allclose(body[:, 0], xs)
    np.testing.assert_allclose(body[:, 1], p, rtol=1e-14)
    np.testing.assert_allclose(body[:, 2], law.cdf(xs), rtol=1e-10)
    np.testing.assert_allclose(body[:, 3], law.ppf(p), rtol=1e-10)
    bad = xl.cells("ERRDIST_EMPIRICAL", h.column(x), 0.0, -1.0, 1.3)
    assert bad[0][0].startswith("#NUM!") and "scale" in bad[0][0]
