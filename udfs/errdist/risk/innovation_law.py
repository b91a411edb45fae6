r"""The innovation law of the conditional models: the two-piece (skewed) error law.

Construction (Fernández & Steel 1998, inverse scale factors applied to the error law, with
the bounded skew :math:`\lambda \in (-1, 1)`): mode :math:`m`, scale :math:`a > 0`, shape
:math:`b > 0`,

.. math::

    f(x) = \frac{b}{2a\Gamma(1/b)}
           \exp\left[-\left(\frac{|x-m|}{a\,(1+\lambda\,\mathrm{sign}(x-m))}\right)^b\right].

The left piece has scale :math:`a(1-\lambda)` and probability :math:`(1-\lambda)/2`, the right
piece scale :math:`a(1+\lambda)` and probability :math:`(1+\lambda)/2`; :math:`\lambda < 0`
puts more weight and a longer tail on the loss side. :math:`\lambda = 0` is the symmetric error
law of :mod:`errdist.law.symmetric`. With :math:`r_k = \Gamma(k/b)/\Gamma(1/b)`:

.. math::

    E[X] - m = 2\lambda a\,r_2, \qquad
    E[(X-m)^2] = a^2 r_3\,(1 + 3\lambda^2),

so the law with mean 0 and variance 1 (the *standardized* law, used as the innovation of a
volatility model :math:`r_t = \mu + \sigma_t z_t`) has

.. math::

    a = \left[r_3(1+3\lambda^2) - 4\lambda^2 r_2^2\right]^{-1/2}, \qquad m = -2\lambda a r_2.

Tails (through the regularized upper incomplete gamma :math:`Q`, never :math:`\tfrac12 -
\tfrac12 P`): for :math:`x \le m`, :math:`F(x) = \frac{1-\lambda}{2}\,Q\!\left(\frac1b,
\left(\frac{m-x}{a(1-\lambda)}\right)^b\right)`, and the lower partial mean

.. math::

    E[X;\ X \le q] = m\,F(q) - \frac{a(1-\lambda)^2 r_2}{2}\,Q\!\left(\frac2b, z\right),
    \qquad z = \left(\frac{m-q}{a(1-\lambda)}\right)^b,

(substitute :math:`w = (v/s)^b` in :math:`\int_t^\infty v\,e^{-(v/s)^b}dv =
\frac{s^2}{b}\Gamma(2/b)Q(2/b,(t/s)^b)`), from which VaR and ES follow in closed form.

This module is a thin layer over :mod:`errdist.law.skewed` (the one implementation of the
law): each function standardizes once with :func:`errdist.law.skewed.standardized_params` and
calls that module's ``logpdf``, ``cdf``, ``ppf``, ``lower_tail`` or ``rvs``. It keeps the
names the conditional models use (parameters ``shape``, ``skew`` of the standardized law); a
forecast law in return units is :math:`\mu + \sigma Z`.

Source: Fernández, C. & Steel, M.F.J. (1998) "On Bayesian modeling of fat tails and skewness",
J. American Statistical Association 93(441):359-371.
"""

from __future__ import annotations

import functools

import numpy as np
from numpy.typing import ArrayLike, NDArray

from errdist.law import skewed as _law

__all__ = [
    "SHAPE_BOUNDS",
    "SKEW_BOUNDS",
    "lower_tail",
    "rvs",
    "standardized_cdf",
    "standardized_logpdf",
    "standardized_params",
    "standardized_ppf",
]

#: Shapes the conditional models accept (real index residuals give 0.7-1.5; arch's own
#: GeneralizedError stops at 1.01, this law does not).
SHAPE_BOUNDS = (0.3, 50.0)
#: Skews the conditional models accept (the law needs |skew| < 1).
SKEW_BOUNDS = (-0.99, 0.99)

Float = float | NDArray[np.float64]


def _scalar(v: Float) -> Float:
    """A 0-d array as a float (the law's scalar fast paths take plain floats)."""
    return float(v) if isinstance(v, np.ndarray) and v.ndim == 0 else v


@functools.lru_cache(maxsize=16)
def _params_of_floats(shape: float, skew: float) -> tuple[float, float]:
    """:func:`errdist.law.skewed.standardized_params` remembered for recent float pairs: in an
    ``arch`` fit most likelihood calls (the numerical gradient's steps in the volatility
    parameters) repeat the law's shape and skew."""
    return _law.standardized_params(shape, skew)  # type: ignore[return-value]


def standardized_params(shape: Float, skew: Float) -> tuple[Float, Float]:
    r"""Mode and scale of the law with mean 0 and variance 1.

    .. math::

        a = \left[r_3(1+3\lambda^2) - 4\lambda^2 r_2^2\right]^{-1/2}, \quad m = -2\lambda a r_2.

    Parameters
    ----------
    shape : float or ndarray
        :math:`b > 0`.
    skew : float or ndarray
        :math:`\lambda \in (-1, 1)`.

    Returns
    -------
    (mode, scale)
        :func:`errdist.law.skewed.standardized_params`.
    """
    return _law.standardized_params(_scalar(shape), _scalar(skew))


def standardized_logpdf(z: ArrayLike, shape: float, skew: float) -> NDArray[np.float64]:
    r"""Log density of the standardized law at ``z``.

    :math:`\ln b - \ln 2 - \ln a - \ln\Gamma(1/b) - (|z-m|/(a(1+\lambda\,\mathrm{sign}(z-m))))^b`
    (:func:`errdist.law.skewed.logpdf`; scalar ``shape``/``skew`` with a float array ``z``
    take that function's fast path, which ``arch``'s likelihood loop relies on).
    """
    shape, skew = _scalar(shape), _scalar(skew)
    m, a = (
        _params_of_floats(shape, skew)
        if type(shape) is type(skew) is float
        else (_law.standardized_params(shape, skew))
    )
    if not isinstance(z, np.ndarray) or z.dtype != np.float64:
        z = np.asarray(z, dtype=float)
    return np.asarray(_law.logpdf(z, m, a, shape, skew))


def standardized_cdf(z: ArrayLike, shape: Float, skew: Float) -> NDArray[np.float64]:
    r"""Distribution function of the standardized law (tails through :math:`Q`).

    :math:`F(z) = \frac{1-\lambda}{2} Q(1/b, (\frac{m-z}{a(1-\lambda)})^b)` for
    :math:`z < m`, :math:`1 - \frac{1+\lambda}{2} Q(1/b, (\frac{z-m}{a(1+\lambda)})^b)`
    otherwise (:func:`errdist.law.skewed.cdf`).
    """
    shape, skew = _scalar(shape), _scalar(skew)
    m, a = _law.standardized_params(shape, skew)
    return np.asarray(_law.cdf(np.asarray(z, dtype=float), m, a, shape, skew))


def standardized_ppf(u: Float, shape: Float, skew: Float) -> Float:
    r"""Quantile of the standardized law (:func:`errdist.law.skewed.ppf`).

    For :math:`u \le (1-\lambda)/2`: :math:`m - a(1-\lambda)\,[Q^{-1}(1/b,\ 2u/(1-\lambda))]^{1/b}`;
    otherwise :math:`m + a(1+\lambda)\,[Q^{-1}(1/b,\ 2(1-u)/(1+\lambda))]^{1/b}`.
    """
    shape, skew = _scalar(shape), _scalar(skew)
    m, a = _law.standardized_params(shape, skew)
    return _law.ppf(_scalar(np.asarray(u, dtype=float)), m, a, shape, skew)


def lower_tail(u: Float, shape: Float, skew: Float) -> tuple[Float, Float]:
    r"""Quantile and lower tail mean of the standardized law at probability ``u``.

    Returns ``(q, e)`` with :math:`q = F^{-1}(u)` and :math:`e = E[Z \mid Z \le q]`, so the
    VaR at confidence :math:`c = 1-u` of :math:`\mu + \sigma Z` is :math:`-(\mu + \sigma q)`
    and its Expected Shortfall :math:`-(\mu + \sigma e)` (closed form in
    :func:`errdist.law.skewed.lower_tail`).
    """
    shape, skew = _scalar(shape), _scalar(skew)
    m, a = _law.standardized_params(shape, skew)
    return _law.lower_tail(u, m, a, shape, skew)


def rvs(
    shape: Float, skew: Float, size: int | tuple[int, ...], rng: np.random.Generator
) -> NDArray[np.float64]:
    r"""Draws of the standardized law (:func:`errdist.law.skewed.rvs`, drawing from ``rng``).

    ``shape``/``skew`` broadcast against ``size``.
    """
    shape, skew = _scalar(shape), _scalar(skew)
    m, a = _law.standardized_params(shape, skew)
    return np.asarray(_law.rvs(size, m, a, shape, skew, seed=rng))
