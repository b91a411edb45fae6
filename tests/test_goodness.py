"""Goodness of fit: EDF statistics and bootstrap p-values, checked against scipy.stats."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import stats

from errdist.checks.goodness import (
    anderson_darling,
    cramer_von_mises,
    edf_statistic,
    goodness_of_fit,
    kolmogorov_smirnov,
)
from errdist.errors import DomainError, InputTypeError, InsufficientDataError
from errdist.estimate import fit

SQRT2 = math.sqrt(2.0)


def _scipy_stat(dist, x, known, statistic):
    """The statistic as scipy.stats.goodness_of_fit computes it for a fully known law."""
    res = stats.goodness_of_fit(
        dist, x, known_params=known, statistic=statistic, n_mc_samples=1, rng=0
    )
    return res.statistic


# ---------------------------------------------------------------- EDF statistics (formulas)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_ks_matches_scipy_kstest(seed: int) -> None:
    # Reference: scipy.stats.kstest (exact same D = max(D+, D-) definition).
    x = np.sort(np.random.default_rng(seed).standard_t(5, size=137))
    ours = kolmogorov_smirnov(stats.norm.cdf(x, 0.1, 1.2))
    ref = stats.kstest(x, stats.norm(0.1, 1.2).cdf).statistic
    assert ours == pytest.approx(ref, rel=1e-13, abs=1e-15)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_cvm_matches_scipy_cramervonmises(seed: int) -> None:
    # Reference: scipy.stats.cramervonmises, W² = 1/(12n) + Σ (u_(i) - (2i-1)/(2n))².
    x = np.sort(np.random.default_rng(seed).laplace(size=91))
    ours = cramer_von_mises(stats.norm.cdf(x, 0.0, 1.3))
    ref = stats.cramervonmises(x, stats.norm(0.0, 1.3).cdf).statistic
    assert ours == pytest.approx(ref, rel=1e-12)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_ad_matches_scipy_goodness_of_fit(seed: int) -> None:
    # Reference: scipy.stats.goodness_of_fit(statistic="ad"), Stephens (1974) A².
    x = np.sort(np.random.default_rng(seed).standard_t(4, size=203))
    ours = anderson_darling(stats.norm.logcdf(x, 0.2, 0.9), stats.norm.logsf(x, 0.2, 0.9))
    ref = _scipy_stat(stats.norm, x, {"loc": 0.2, "scale": 0.9}, "ad")
    assert ours == pytest.approx(ref, rel=1e-12)


def test_ad_known_small_example_by_hand() -> None:
    # A² from the definition with u = (0.1, 0.4, 0.7), n = 3, written out term by term:
    # A² = -3 - (1/3)[1(ln .1 + ln .3) + 3(ln .4 + ln .6) + 5(ln .7 + ln .9)].
    u = np.array([0.1, 0.4, 0.7])
    expected = (
        -3.0
        - (
            (math.log(0.1) + math.log(0.3))
            + 3.0 * (math.log(0.4) + math.log(0.6))
            + 5.0 * (math.log(0.7) + math.log(0.9))
        )
        / 3.0
    )
    assert anderson_darling(np.log(u), np.log1p(-u)) == pytest.approx(expected, rel=1e-14)


@pytest.mark.parametrize("statistic", ["ad", "ks", "cvm"])
@pytest.mark.parametrize("shape", [0.7, 1.0, 1.6, 2.0, 4.0])
def test_edf_statistic_for_gn_matches_scipy_gennorm(statistic: str, shape: float) -> None:
    # Reference: scipy.stats.goodness_of_fit with scipy.stats.gennorm (same law: pdf
    # b/(2aΓ(1/b)) exp(-|x-m|/a)^b) and all parameters known.
    rng = np.random.default_rng(int(shape * 10))
    x = np.sort(rng.standard_t(6, size=160) * 0.01 + 0.0005)
    loc, scale = 0.0004, 0.011
    ours = edf_statistic(x, loc, scale, shape, statistic)
    ref = _scipy_stat(stats.gennorm, x, {"beta": shape, "loc": loc, "scale": scale}, statistic)
    assert ours == pytest.approx(ref, rel=1e-9)


def test_edf_statistic_is_vectorised_over_rows() -> None:
    # Each row must equal scipy's statistic for that row's own law.
    rng = np.random.default_rng(7)
    x = np.sort(rng.normal(size=(3, 40)), axis=1)
    locs, scales, shapes = (
        np.array([0.0, 0.1, -0.2]),
        np.array([1.0, 1.5, 1.2]),
        np.array([1.2, 2.0, 3.0]),
    )
    ours = edf_statistic(x, locs, scales, shapes, "ad")
    for r in range(3):
        ref = _scipy_stat(
            stats.gennorm, x[r], {"beta": shapes[r], "loc": locs[r], "scale": scales[r]}, "ad"
        )
        assert ours[r] == pytest.approx(ref, rel=1e-9)


def test_ad_stays_finite_for_a_far_tail_observation() -> None:
    # An observation 40 σ below the mean: Φ underflows to 0, ln Φ does not. Reference:
    # scipy.stats.goodness_of_fit uses norm.logcdf / norm.logsf for A²; b = 2 is the normal
    # law with σ = a/√2 (DESIGN.md).
    x = np.sort(np.append(np.random.default_rng(3).normal(size=60), -40.0))
    assert stats.norm.cdf(-40.0) == 0.0
    ours = edf_statistic(x, 0.0, SQRT2, 2.0, "ad")
    ref = _scipy_stat(stats.norm, x, {"loc": 0.0, "scale": 1.0}, "ad")
    assert math.isfinite(ours)
    assert ours == pytest.approx(ref, rel=1e-9)


# ---------------------------------------------------------------- p-values


@pytest.mark.parametrize("statistic", ["ad", "ks", "cvm"])
def test_fixed_law_pvalue_agrees_with_scipy_within_monte_carlo_error(statistic: str) -> None:
    # Fully specified law (no refit): both p-values estimate the same P(T >= t_obs).
    # scipy.stats.goodness_of_fit(norm, known loc/scale) vs ours with shape 2, a = σ√2.
    # Each estimate has binomial standard error sqrt(p(1-p)/N); their difference
    # sqrt(2 p(1-p)/N); we allow 4 of those (false alarm about 6e-5).
    n_mc = 999
    x = np.random.default_rng(11).standard_t(7, size=150) * 1.1 + 0.05
    ref = stats.goodness_of_fit(
        stats.norm,
        x,
        known_params={"loc": 0.0, "scale": 1.15},
        statistic=statistic,
        n_mc_samples=n_mc,
        rng=12,
    )
    ours = goodness_of_fit(
        x, loc=0.0, scale=1.15 * SQRT2, shape=2.0, statistic=statistic, samples=n_mc, seed=13
    )
    assert not ours.refit
    assert ours.statistic == pytest.approx(ref.statistic, rel=1e-9)
    p = 0.5 * (ours.pvalue + ref.pvalue)
    se_diff = math.sqrt(2.0 * max(p * (1.0 - p), 0.01 * 0.99) / n_mc)
    assert abs(ours.pvalue - ref.pvalue) <= 4.0 * se_diff
    assert 0.01 < ref.pvalue < 0.99  # the check is informative only away from 0 and 1


def test_estimated_law_statistic_matches_scipy_gennorm_at_the_mle() -> None:
    # With parameters estimated, our A² must be scipy's A² for gennorm at our MLE, and the
    # MLE must be the one of errdist.estimate.fit; the likelihood there must be at least
    # scipy.stats.gennorm.fit's (reference: scipy's own numerical MLE).
    x = np.random.default_rng(21).laplace(size=300) * 0.012
    res = goodness_of_fit(x, samples=19, seed=1)
    f = fit(x)
    assert res.refit and res.n == 300 and res.samples == 19
    assert (res.loc, res.scale, res.shape) == (f.loc, f.scale, f.shape)
    ref = _scipy_stat(
        stats.gennorm, x, {"beta": res.shape, "loc": res.loc, "scale": res.scale}, "ad"
    )
    assert res.statistic == pytest.approx(ref, rel=1e-9)
    sp = stats.gennorm.fit(x)
    ll_ours = stats.gennorm.logpdf(x, res.shape, res.loc, res.scale).sum()
    assert ll_ours >= stats.gennorm.logpdf(x, *sp).sum() - 1e-9 * abs(ll_ours)


def test_pvalue_formula_and_grid() -> None:
    # p = (1 + #{T* >= T}) / (samples + 1) (Davison & Hinkley 1997): on the grid k/(N+1).
    x = np.random.default_rng(5).normal(size=80)
    res = goodness_of_fit(x, loc=0.0, scale=SQRT2, shape=2.0, samples=49, seed=2)
    k = res.pvalue * 50
    assert abs(k - round(k)) < 1e-9 and 1 <= round(k) <= 50


def test_clearly_wrong_law_gets_the_smallest_pvalue() -> None:
    # Strongly skewed data (exponential) are not from any symmetric law: no simulated A*
    # should reach the observed one, so p = 1/(samples + 1). (Power check; reference value
    # from the formula.)
    x = np.random.default_rng(8).exponential(size=400)
    res = goodness_of_fit(x, samples=49, seed=3)
    assert res.pvalue == pytest.approx(1.0 / 50.0)


def test_seed_makes_the_pvalue_reproducible() -> None:
    x = np.random.default_rng(9).standard_t(5, size=120)
    a = goodness_of_fit(x, samples=29, seed=4)
    b = goodness_of_fit(x, samples=29, seed=4)
    assert a == b


# ---------------------------------------------------------------- calibration under the null


def test_fixed_law_rejection_rate_is_nominal() -> None:
    # Data from the law itself, law fully specified: P(p <= 0.05) = 0.05 (the Monte-Carlo
    # p-value is exact-level, Davison & Hinkley 1997). 400 data sets: binomial SE
    # sqrt(0.05·0.95/400) = 0.0109; allow ±3 SE.
    from errdist.law.symmetric import rvs

    rng = np.random.default_rng(31)
    data = rvs((400, 60), 0.0, 1.0, 1.3, seed=rng)
    rejections = sum(
        goodness_of_fit(row, 0.0, 1.0, 1.3, samples=99, seed=rng).pvalue <= 0.05 for row in data
    )
    rate = rejections / 400
    assert abs(rate - 0.05) <= 3 * math.sqrt(0.05 * 0.95 / 400)


def test_refit_rejection_rate_is_nominal_and_naive_tables_are_not() -> None:
    # Parameters estimated: the refit bootstrap keeps P(p <= 0.05) at 0.05 (binomial SE with
    # 200 data sets sqrt(0.05·0.95/200) = 0.0154; allow ±3 SE), while treating the fitted
    # law as known (no refit — what a fixed-law table does) rejects far less often, the effect
    # described by Stephens (1974).
    from errdist.law.symmetric import rvs

    rng = np.random.default_rng(41)
    n_sets = 200
    data = rvs((n_sets, 100), 0.0, 1.0, 1.4, seed=rng)
    refit_rej = naive_rej = 0
    for row in data:
        res = goodness_of_fit(row, samples=99, seed=rng)
        refit_rej += res.pvalue <= 0.05
        naive = goodness_of_fit(row, res.loc, res.scale, res.shape, samples=99, seed=rng)
        naive_rej += naive.pvalue <= 0.05
    se = math.sqrt(0.05 * 0.95 / n_sets)
    assert abs(refit_rej / n_sets - 0.05) <= 3 * se
    assert naive_rej / n_sets <= 0.01


# ---------------------------------------------------------------- bad input


def test_partial_parameters_are_refused() -> None:
    x = np.arange(10.0)
    with pytest.raises(InputTypeError, match="all of loc, scale and shape"):
        goodness_of_fit(x, loc=0.0, shape=2.0)


@pytest.mark.parametrize("bad", ["chi2", "", 3])
def test_unknown_statistic(bad: object) -> None:
    with pytest.raises(InputTypeError, match="statistic must be one of"):
        goodness_of_fit(np.arange(10.0), statistic=bad)  # type: ignore[arg-type]


@pytest.mark.parametrize(
    ("bad", "err"),
    [
        (0, DomainError),
        (2.5, DomainError),
        ("many", InputTypeError),
        (True, InputTypeError),
        (10**6, DomainError),
    ],
)
def test_bad_samples(bad: object, err: type) -> None:
    with pytest.raises(err, match="samples"):
        goodness_of_fit(np.arange(10.0), samples=bad)  # type: ignore[arg-type]


def test_bad_fixed_scale() -> None:
    with pytest.raises(DomainError, match="scale"):
        goodness_of_fit(np.arange(10.0), loc=0.0, scale=-1.0, shape=2.0)


def test_too_few_points() -> None:
    with pytest.raises(InsufficientDataError):
        goodness_of_fit([1.0, 2.0, 3.0])


def test_whole_number_float_samples_accepted() -> None:
    # Worksheet numbers arrive as floats.
    res = goodness_of_fit(np.random.default_rng(1).normal(size=30), 0.0, SQRT2, 2.0, samples=9.0)
    assert res.samples == 9


@pytest.mark.parametrize("statistic", ["ad", "ks", "cvm"])
def test_bootstrap_fast_path_matches_scipy(statistic: str) -> None:
    # The bootstrap's one-evaluation tail path must give scipy's statistic (reference:
    # scipy.stats.goodness_of_fit with gennorm, all parameters known), including a row with
    # an observation so far out that its tail probability underflows.
    from errdist.checks.goodness import _bootstrap_statistic

    rng = np.random.default_rng(17)
    x = np.sort(rng.standard_t(5, size=(4, 90)), axis=1)
    x[3, 0] = -80.0
    locs = np.array([0.0, 0.05, -0.1, 0.0])
    scales = np.array([1.0, 1.3, 0.8, 1.4])
    shapes = np.array([0.8, 1.0, 1.7, 2.0])
    ours = _bootstrap_statistic(x, locs, scales, shapes, statistic)
    for r in range(3):
        ref = _scipy_stat(
            stats.gennorm, x[r], {"beta": shapes[r], "loc": locs[r], "scale": scales[r]}, statistic
        )
        assert ours[r] == pytest.approx(ref, rel=1e-9)
    # row 3 has shape 2: scipy's gennorm.logcdf underflows to -inf at -80, so the reference
    # is scipy's normal law with σ = a/√2 (DESIGN.md), whose logcdf stays finite.
    ref = _scipy_stat(stats.norm, x[3], {"loc": 0.0, "scale": 1.4 / SQRT2}, statistic)
    assert np.isfinite(ours[3])
    assert ours[3] == pytest.approx(ref, rel=1e-9)


def test_law_that_cannot_produce_the_data_is_a_domain_error() -> None:
    # shape 1e308 is the uniform law on [loc - scale, loc + scale] (DESIGN.md: b -> inf);
    # data outside it have probability 0, so A² is infinite: a #NUM! with the reason.
    x = np.random.default_rng(2).normal(size=40)
    with pytest.raises(DomainError, match="zero probability"):
        goodness_of_fit(x, 0.0, 0.5, 1e308, samples=9)


def test_overflowing_law_is_a_domain_error() -> None:
    # (the message comes from goodness_of_fit or, raised earlier, from distribution.rvs)
    with pytest.raises(DomainError, match="overflow|exceed the float range"):
        goodness_of_fit(np.arange(10.0), 0.0, 1e308, 1.0, samples=9, seed=1)


@pytest.mark.parametrize(("shape", "n"), [(0.8, 300), (1.0, 1260), (1.6, 500)])
def test_batched_refits_give_the_same_pvalue_as_one_by_one(
    monkeypatch, shape: float, n: int
) -> None:
    # The bootstrap refits all simulated rows at once (errdist.estimate.mle_batch); with the same seed
    # its p-value must equal that of refitting row by row with the one-sample exact MLE
    # (errdist.estimate.mle._mle_sorted, checked against scipy in tests/test_mle.py): the refits agree
    # to rounding, so every simulated statistic lands on the same side of the observed one.
    import errdist.checks.goodness as gof
    from errdist.estimate.mle import _mle_sorted

    def one_by_one(sim: np.ndarray, hint: float):
        out = np.array([_mle_sorted(r, hint)[:3] for r in sim])
        return out[:, 0], out[:, 1], out[:, 2]

    x = stats.gennorm.rvs(shape, loc=0.001, scale=0.01, size=n, random_state=n)
    batched = goodness_of_fit(x, samples=99, seed=4)
    monkeypatch.setattr(gof, "_refit_rows", one_by_one)
    single = goodness_of_fit(x, samples=99, seed=4)
    assert batched.pvalue == single.pvalue
    assert batched.statistic == single.statistic


@pytest.mark.parametrize("shape", [0.1, 0.3, 1.0, 1.0048, 2.0, 20.0])
def test_lower_gamma_series_matches_mpmath_and_scipy(shape: float) -> None:
    # The bootstrap's power series for P(1/b, |d|^b) (Abramowitz & Stegun 6.5.29) against
    # mpmath.gammainc(regularized=True) at 40 digits and scipy.special.gammainc.
    mpmath = pytest.importorskip("mpmath", reason="mpmath not installed")
    from scipy import special

    from errdist.checks.goodness import _lower_gamma_series

    rng = np.random.default_rng(8)
    d = np.abs(rng.standard_normal((2, 400)) * 3.0)
    d[0, :3] = [0.0, 1e-300, 1e-9]
    z = d**shape
    s = np.full((2, 1), 1.0 / shape)
    skip = z > 2.5 / shape + 1.0
    ours = _lower_gamma_series(s, z, d, skip)
    ref = special.gammainc(np.broadcast_to(s, z.shape), z)
    keep = ~skip
    # atol: at d = 1e-300 scipy gets z = d**b = 0 (underflow) and returns 0, while the
    # series uses z**(1/b) = d and returns d/Γ(1/b + 1), the correct tiny value
    np.testing.assert_allclose(ours[keep], ref[keep], rtol=1e-13, atol=1e-290)
    assert ours[0, 0] == 0.0
    with mpmath.workdps(40):
        for i in np.flatnonzero(keep[1])[::20]:
            exact = mpmath.gammainc(s[1, 0], 0, mpmath.mpf(z[1, i]), regularized=True)
            assert abs(float((ours[1, i] - exact) / exact)) < 1e-14
