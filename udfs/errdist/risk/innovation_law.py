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

This module works on the standardized law only (parameters ``shape``, ``skew``); a forecast
law in return units is :math:`\mu + \sigma Z`. It is the math the conditional models need;
the full skewed law with fitting lives in :mod:`errdist.law.skewed` when present.

Source: Fernández, C. & Steel, M.F.J. (1998) "On Bayesian modeling of fat tails and skewness",
J. American Statistical Association 93(441):359-371.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray
from scipy import special as sc

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


def _ratios(shape: Float) -> tuple[Float, Float]:
    """:math:`r_2 = \\Gamma(2/b)/\\Gamma(1/b)` and :math:`r_3 = \\Gamma(3/b)/\\Gamma(1/b)`."""
    g1 = sc.gammaln(1.0 / shape)
    return np.exp(sc.gammaln(2.0 / shape) - g1), np.exp(sc.gammaln(3.0 / shape) - g1)


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
    """
    r2, r3 = _ratios(shape)
    lam2 = skew * skew
    scale = 1.0 / np.sqrt(r3 * (1.0 + 3.0 * lam2) - 4.0 * lam2 * r2 * r2)
    return -2.0 * skew * scale * r2, scale


def standardized_logpdf(z: ArrayLike, shape: float, skew: float) -> NDArray[np.float64]:
    r"""Log density of the standardized law at ``z``.

    :math:`\ln b - \ln 2 - \ln a - \ln\Gamma(1/b) - (|z-m|/(a(1+\lambda\,\mathrm{sign}(z-m))))^b`.
    """
    m, a = standardized_params(shape, skew)
    z = np.asarray(z, dtype=float)
    d = z - m
    s = a * np.where(d < 0.0, 1.0 - skew, 1.0 + skew)
    const = np.log(shape) - np.log(2.0) - np.log(a) - sc.gammaln(1.0 / shape)
    return const - (np.abs(d) / s) ** shape


def standardized_cdf(z: ArrayLike, shape: Float, skew: Float) -> NDArray[np.float64]:
    r"""Distribution function of the standardized law (tails through :math:`Q`).

    :math:`F(z) = \frac{1-\lambda}{2} Q(1/b, (\frac{m-z}{a(1-\lambda)})^b)` for
    :math:`z < m`, :math:`1 - \frac{1+\lambda}{2} Q(1/b, (\frac{z-m}{a(1+\lambda)})^b)`
    otherwise.
    """
    z = np.asarray(z, dtype=float)
    shape = np.asarray(shape, dtype=float)
    skew = np.asarray(skew, dtype=float)
    m, a = standardized_params(shape, skew)
    d = z - m
    left = d < 0
    s = a * np.where(left, 1.0 - skew, 1.0 + skew)
    tail = sc.gammaincc(1.0 / shape, (np.abs(d) / s) ** shape)
    return np.where(left, 0.5 * (1.0 - skew) * tail, 1.0 - 0.5 * (1.0 + skew) * tail)


def standardized_ppf(u: Float, shape: Float, skew: Float) -> Float:
    r"""Quantile of the standardized law.

    For :math:`u \le (1-\lambda)/2`: :math:`m - a(1-\lambda)\,[Q^{-1}(1/b,\ 2u/(1-\lambda))]^{1/b}`;
    otherwise :math:`m + a(1+\lambda)\,[Q^{-1}(1/b,\ 2(1-u)/(1+\lambda))]^{1/b}`.
    """
    u = np.asarray(u, dtype=float)
    shape = np.asarray(shape, dtype=float)
    skew = np.asarray(skew, dtype=float)
    m, a = standardized_params(shape, skew)
    wl = 0.5 * (1.0 - skew)
    lower = u <= wl
    with np.errstate(divide="ignore", invalid="ignore"):
        pl = np.clip(np.where(lower, u / wl, 1.0), 0.0, 1.0)
        pr = np.clip(np.where(lower, 1.0, (1.0 - u) / (1.0 - wl)), 0.0, 1.0)
        zl = m - a * (1.0 - skew) * sc.gammainccinv(1.0 / shape, pl) ** (1.0 / shape)
        zr = m + a * (1.0 + skew) * sc.gammainccinv(1.0 / shape, pr) ** (1.0 / shape)
    out = np.where(lower, zl, zr)
    return float(out) if out.ndim == 0 else out


def lower_tail(u: Float, shape: Float, skew: Float) -> tuple[Float, Float]:
    r"""Quantile and lower tail mean of the standardized law at probability ``u``.

    Returns ``(q, e)`` with :math:`q = F^{-1}(u)` and :math:`e = E[Z \mid Z \le q]`, so the
    VaR at confidence :math:`c = 1-u` of :math:`\mu + \sigma Z` is :math:`-(\mu + \sigma q)`
    and its Expected Shortfall :math:`-(\mu + \sigma e)` (formulas in the module docstring;
    for :math:`q > m` the upper partial mean is subtracted from the mean 0).
    """
    u = np.asarray(u, dtype=float)
    shape = np.asarray(shape, dtype=float)
    skew = np.asarray(skew, dtype=float)
    q = np.asarray(standardized_ppf(u, shape, skew))
    m, a = standardized_params(shape, skew)
    r2, _ = _ratios(shape)
    below = q <= m
    sl = a * (1.0 - skew)
    sr = a * (1.0 + skew)
    zl = (np.maximum(m - q, 0.0) / sl) ** shape
    zr = (np.maximum(q - m, 0.0) / sr) ** shape
    partial_low = m * u - 0.5 * sl * (1.0 - skew) * r2 * sc.gammaincc(2.0 / shape, zl)
    # E[Z; Z > q] for q > m; the mean of Z is 0.
    partial_high = m * (1.0 - u) + 0.5 * sr * (1.0 + skew) * r2 * sc.gammaincc(2.0 / shape, zr)
    e = np.where(below, partial_low, -partial_high) / u
    if q.ndim == 0:
        return float(q), float(e)
    return q, e


def rvs(
    shape: Float, skew: Float, size: int | tuple[int, ...], rng: np.random.Generator
) -> NDArray[np.float64]:
    r"""Draws of the standardized law.

    A piece is chosen (left with probability :math:`(1-\lambda)/2`), then
    :math:`|Z - m| = s\,G^{1/b}` with :math:`G \sim \mathrm{Gamma}(1/b)` and :math:`s` the
    piece's scale (the error law's magnitude is a gamma variable to the power :math:`1/b`).
    ``shape``/``skew`` broadcast against ``size``.
    """
    shape = np.broadcast_to(np.asarray(shape, dtype=float), size)
    skew = np.broadcast_to(np.asarray(skew, dtype=float), size)
    m, a = standardized_params(shape, skew)
    g = rng.standard_gamma(1.0 / shape) ** (1.0 / shape)
    left = rng.random(size) < 0.5 * (1.0 - skew)
    return m + np.where(left, -a * (1.0 - skew), a * (1.0 + skew)) * g
