"""Results beyond the float range are a clear DomainError, not a silent inf with a warning.

Reference for the finite case: scipy.stats.norm (shape 2 is the normal law with
sigma = scale / sqrt(2)).
"""

from __future__ import annotations

import warnings

import numpy as np
import pytest
from scipy import stats

import errdist
from errdist.errors import DomainError


@pytest.mark.parametrize(
    "call",
    [
        lambda: errdist.value_at_risk(0.99, 0.0, 1e308, 2.0),
        lambda: errdist.expected_shortfall(0.99, 0.0, 1e308, 2.0),
        lambda: errdist.value_at_risk(0.99, 0.0, 1.0, 2.0, amount=1e308),
        lambda: errdist.loglik([1.0, 2.0, 3.0, 4.0], 1e308, 1.0, 2.0),
        lambda: errdist.rvs(5, 0.0, 1e308, 0.5, seed=1),
    ],
)
def test_overflow_is_a_domain_error_without_warnings(call) -> None:
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        with pytest.raises(DomainError, match="float range"):
            call()


def test_finite_results_are_unchanged() -> None:
    sigma = 0.01 / np.sqrt(2)
    # scipy.stats.norm: VaR_0.99 = -(mu + sigma * z_0.01)
    assert errdist.value_at_risk(0.99, 0.0, 0.01, 2.0) == pytest.approx(
        -stats.norm.ppf(0.01, 0.0, sigma), rel=1e-12
    )
    x = np.array([-0.01, 0.0, 0.005, 0.02])
    assert errdist.loglik(x, 0.0, 0.01, 2.0) == pytest.approx(
        stats.norm.logpdf(x, 0.0, sigma).sum(), rel=1e-12
    )
