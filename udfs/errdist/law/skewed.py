r"""The skewed error law: public functions (a two-piece generalized normal).

Location :math:`m` (the mode), scale :math:`a > 0`, shape :math:`b > 0`, skew
:math:`\lambda \in (-1, 1)`:

.. math::

    f(x) = \frac{b}{2 a \Gamma(1/b)}
           \exp\!\left(-\left(\frac{|x-m|}{a\,(1 + \lambda\operatorname{sign}(x-m))}\right)^b\right)

Half-scale :math:`a(1-\lambda)` on the left, :math:`a(1+\lambda)` on the right;
:math:`\Pr(X < m) = (1-\lambda)/2`; :math:`\lambda < 0` is a heavier left (loss) tail and
:math:`\lambda = 0` is exactly the symmetric law (:mod:`errdist`'s ``pdf``, ``cdf``, ...).
Construction: inverse scale factors, Fernández & Steel (1998), JASA 93(441):359-371, in the
bounded parametrisation of Theodossiou's skewed generalized error distribution.

Argument order everywhere: ``(x, loc, scale, shape, skew)`` with ``skew`` defaulting to 0.
Stable public names (used by the conditional-volatility engine): :func:`pdf`, :func:`logpdf`,
:func:`cdf`, :func:`sf`, :func:`logcdf`, :func:`logsf`, :func:`ppf`, :func:`isf`, :func:`rvs`,
:func:`mean`, :func:`variance`, :func:`skewness`, :func:`excess_kurtosis`,
:func:`standardized_params`, :func:`value_at_risk`, :func:`expected_shortfall`,
:func:`fit_skewed` (-> :class:`SkewedFit`). Reached from the top level as ``errdist.skewed``.
"""

from __future__ import annotations

from errdist.law._skewed_core import (
    cdf,
    check_params,
    isf,
    logcdf,
    logpdf,
    logsf,
    pdf,
    ppf,
    rvs,
    sf,
)
from errdist.law._skewed_fit import SKEW_MAX, SkewedFit, fit_skewed
from errdist.law._skewed_moments import (
    excess_kurtosis,
    mean,
    raw_moment_pieces,
    skewness,
    standardized_params,
    variance,
)
from errdist.law._skewed_risk import expected_shortfall, value_at_risk

__all__ = [
    "SKEW_MAX",
    "SkewedFit",
    "cdf",
    "check_params",
    "excess_kurtosis",
    "expected_shortfall",
    "fit_skewed",
    "isf",
    "logcdf",
    "logpdf",
    "logsf",
    "mean",
    "pdf",
    "ppf",
    "raw_moment_pieces",
    "rvs",
    "sf",
    "skewness",
    "standardized_params",
    "value_at_risk",
    "variance",
]
