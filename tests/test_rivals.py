"""Rival laws and the comparison table, checked against scipy.stats."""

from __future__ import annotations

import math
from typing import Any

import numpy as np
import pandas as pd
import pytest
from scipy import stats

from errdist.checks.rivals import (
    COLUMNS,
    compare,
    fit_cauchy,
    fit_laplace,
    fit_normal,
    fit_student_t,
)
from errdist.errors import InputTypeError, InsufficientDataError
from real_series import index as real_index


def _index1_returns() -> np.ndarray:
    # Real daily index series shipped inside the arch package (offline), log returns of the
    # adjusted close.
    prices = real_index(1).load()["Adj Close"].to_numpy(dtype=float)
    return np.diff(np.log(prices))


def _samples() -> dict[str, np.ndarray]:
    rng = np.random.default_rng(2026)
    return {
        "t3": rng.standard_t(3, size=500) * 0.01,
        "normal": rng.normal(0.001, 0.02, size=300),
        "cauchy": stats.cauchy.rvs(size=200, random_state=rng),
        "laplace": rng.laplace(size=50),
        "gn_0.8": stats.gennorm.rvs(0.8, size=400, random_state=rng),
    }


def _datasets() -> list[tuple[str, np.ndarray]]:
    r = _index1_returns()
    return [("index1", r), ("index1_last_1260", r[-1260:]), *_samples().items()]


DATASETS = _datasets()
IDS = [name for name, _ in DATASETS]


@pytest.mark.parametrize(
    ("fit", "law"),
    [
        # Reference: scipy.stats.norm.fit (closed-form MLE: mean, divisor-n sd).
        pytest.param(fit_normal, stats.norm, id="normal"),
        # Reference: scipy.stats.laplace.fit (closed-form MLE: median, mean absolute deviation).
        pytest.param(fit_laplace, stats.laplace, id="laplace"),
    ],
)
@pytest.mark.parametrize(("name", "x"), DATASETS, ids=IDS)
def test_closed_form_is_scipys_mle(fit: Any, law: Any, name: str, x: np.ndarray) -> None:
    f = fit(x)
    loc, scale = law.fit(x)
    assert f.loc == pytest.approx(loc, rel=1e-12, abs=1e-15)
    assert f.scale == pytest.approx(scale, rel=1e-12)
    assert f.loglik == pytest.approx(law.logpdf(x, loc, scale).sum(), rel=1e-12)


@pytest.mark.parametrize(("name", "x"), DATASETS, ids=IDS)
def test_student_t_reaches_scipys_likelihood(name: str, x: np.ndarray) -> None:
    # Reference: scipy.stats.t.fit; both parameter sets evaluated with scipy.stats.t.logpdf.
    # "At least as high" up to 1e-10 relative (rounding of a sum of n logs).
    f = fit_student_t(x)
    ll_ours = stats.t.logpdf(x, f.shape_or_df, f.loc, f.scale).sum()
    ll_scipy = stats.t.logpdf(x, *stats.t.fit(x)).sum()
    assert ll_ours >= ll_scipy - 1e-10 * abs(ll_scipy)
    assert f.loglik == pytest.approx(ll_ours, rel=1e-10)
    assert f.k == 3


@pytest.mark.parametrize(("name", "x"), DATASETS, ids=IDS)
def test_cauchy_reaches_scipys_likelihood(name: str, x: np.ndarray) -> None:
    # Reference: scipy.stats.cauchy.fit, evaluated with scipy.stats.cauchy.logpdf.
    f = fit_cauchy(x)
    ll_ours = stats.cauchy.logpdf(x, f.loc, f.scale).sum()
    ll_scipy = stats.cauchy.logpdf(x, *stats.cauchy.fit(x)).sum()
    assert ll_ours >= ll_scipy - 1e-10 * abs(ll_scipy)
    assert f.loglik == pytest.approx(ll_ours, rel=1e-10)


def test_student_t_recovers_known_degrees_of_freedom() -> None:
    # Large sample from t(4): the MLE of ν is within a few standard errors of 4
    # (consistency of the MLE; asymptotic SE of ν-hat at ν=4, n=20000 is about 0.15).
    x = np.random.default_rng(3).standard_t(4, size=20_000)
    assert fit_student_t(x).shape_or_df == pytest.approx(4.0, abs=0.6)


def _law_values(row: pd.Series, x: np.ndarray) -> tuple[float, float, float, int]:
    """(loglik, KS, 99% VaR, k) of one table row, computed with scipy.stats."""
    law, m, s, c = row["law"], row["loc"], row["scale"], row["shape_or_df"]
    dist, k = {
        "generalized normal": (stats.gennorm(c, m, s), 3),
        "normal": (stats.norm(m, s), 2),
        "Laplace": (stats.laplace(m, s), 2),
        "Student t": (stats.t(c, m, s), 3),
        "Cauchy": (stats.cauchy(m, s), 2),
    }[law]
    ll = dist.logpdf(x).sum()
    ks = stats.kstest(x, dist.cdf).statistic
    return ll, ks, -dist.ppf(0.01), k


@pytest.mark.parametrize(("name", "x"), DATASETS[:3], ids=IDS[:3])
def test_compare_table_against_scipy(name: str, x: np.ndarray) -> None:
    # Every column recomputed with scipy.stats from the row's parameters; AIC/BIC from their
    # definitions (Akaike 1974: 2k - 2 ln L; Schwarz 1978: k ln n - 2 ln L) with the
    # parameter counts normal 2, Laplace 2, Student t 3, Cauchy 2, GN 3.
    table = compare(x)
    n = x.size
    assert list(table.columns) == list(COLUMNS)
    assert sorted(table["law"]) == sorted(
        ["generalized normal", "normal", "Laplace", "Student t", "Cauchy"]
    )
    assert table["aic"].is_monotonic_increasing
    for _, row in table.iterrows():
        ll, ks, var99, k = _law_values(row, x)
        assert row["loglik"] == pytest.approx(ll, rel=1e-9)
        assert row["aic"] == pytest.approx(2 * k - 2 * ll, rel=1e-9)
        assert row["bic"] == pytest.approx(k * math.log(n) - 2 * ll, rel=1e-9)
        assert row["ks"] == pytest.approx(ks, rel=1e-9)
        assert row["var99"] == pytest.approx(var99, rel=1e-9)
        if row["law"] in ("normal", "Laplace", "Cauchy"):
            assert math.isnan(row["shape_or_df"])
    gn = table.set_index("law").loc["generalized normal"]
    # the GN MLE reaches at least scipy.stats.gennorm.fit's likelihood
    ll_scipy = stats.gennorm.logpdf(x, *stats.gennorm.fit(x)).sum()
    assert gn["loglik"] >= ll_scipy - 1e-9 * abs(ll_scipy)


def test_compare_prefers_heavy_tails_on_the_index_series() -> None:
    # Daily index returns are heavy-tailed (common practice, no source): the normal law
    # must not win; by AIC the normal is worse than the t law fitted by scipy.stats.t.fit.
    x = _index1_returns()
    table = compare(x).set_index("law")
    assert table["aic"].idxmin() != "normal"
    ll_t_scipy = stats.t.logpdf(x, *stats.t.fit(x)).sum()
    assert table.loc["normal", "aic"] > 2 * 3 - 2 * ll_t_scipy


def test_compare_drops_blanks() -> None:
    x = np.random.default_rng(4).normal(size=60)
    with_nan = np.insert(x, [5, 20], np.nan)
    pd.testing.assert_frame_equal(compare(with_nan), compare(x))


def test_compare_constant_data() -> None:
    with pytest.raises((InsufficientDataError,)):
        compare([0.01] * 10)


def test_compare_text_in_data() -> None:
    with pytest.raises(InputTypeError):
        compare([0.01, 0.02, "x", 0.03, 0.0])


def test_compare_flags_parameters_at_their_bounds() -> None:
    # Uniform data: the uniform law is the error law's limit as the shape grows without bound
    # (Nadarajah 2005) and the Student t's as the degrees of freedom do, so both searches must
    # stop at their upper bounds and say so; the two-parameter laws have no such bound.
    x = np.random.default_rng(5).uniform(-1.0, 1.0, 2000)
    table = compare(x).set_index("law")
    assert bool(table.loc["generalized normal", "at_bound"]) is True
    assert bool(table.loc["Student t", "at_bound"]) is True
    assert not table.loc[["normal", "Laplace", "Cauchy"], "at_bound"].any()
