"""Smoke test: the package imports and reports a version."""

import errdist


def test_version_is_a_string() -> None:
    assert isinstance(errdist.__version__, str)
    assert errdist.__version__.count(".") == 2


def test_public_api_names_resolve() -> None:
    for name in errdist.__all__:
        assert hasattr(errdist, name), name


def test_skewed_namespace_names() -> None:
    # the conditional-volatility engine relies on these names: keep them stable
    stable = (
        "pdf logpdf cdf sf logcdf logsf ppf isf rvs mean variance skewness excess_kurtosis "
        "standardized_params value_at_risk expected_shortfall fit_skewed"
    ).split()
    assert "skewed" in errdist.__all__
    for name in stable:
        assert name in errdist.skewed.__all__, name
        assert callable(getattr(errdist.skewed, name)), name
    # existing top-level names are not shadowed by the skewed law
    assert errdist.cdf.__module__ != errdist.skewed.cdf.__module__
