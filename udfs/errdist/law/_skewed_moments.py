r"""Moments of the skewed error law in closed form (internal; public via
:mod:`errdist.law.skewed`).

With :math:`Y` the standard skewed law (m = 0, a = 1) and
:math:`g_k = \Gamma((k+1)/b)/\Gamma(1/b) = E|Y_0|^k` of the symmetric standard law, each side
contributes :math:`\int_0^\infty y^k \tfrac{b}{2\Gamma(1/b)} e^{-(y/s)^b} dy
= s^{k+1} g_k / 2` with :math:`s = 1 \pm \lambda`, so

.. math::

    E[Y^k] = g_k\,\frac{(1+\lambda)^{k+1} + (-1)^k (1-\lambda)^{k+1}}{2}:
    \quad E Y = 2\lambda g_1,\ E Y^2 = g_2(1+3\lambda^2),\ E Y^3 = 4\lambda(1+\lambda^2) g_3,\
    E Y^4 = g_4(1 + 10\lambda^2 + 5\lambda^4).

Central moments follow by the binomial expansion, written in powers of :math:`\lambda` so no
large terms cancel. At skew 0 variance and kurtosis are the symmetric law's own functions.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray
from scipy.special import gammaln

from errdist.law import moments as _sym_moments
from errdist.law._skewed_core import FloatOrArray, _all_zero, _arrays, _out


def _g(k: int, b: NDArray[np.float64]) -> NDArray[np.float64]:
    r""":math:`g_k = \Gamma((k+1)/b)/\Gamma(1/b) = E|Y_0|^k` of the symmetric standard law."""
    return np.exp(gammaln((k + 1.0) / b) - gammaln(1.0 / b))


def raw_moment_pieces(k: int, shape: ArrayLike, skew: ArrayLike) -> FloatOrArray:
    r""":math:`E[Y^k]` of the standard skewed law (m = 0, a = 1).

    .. math::

        E[Y^k] = \frac{\Gamma((k+1)/b)}{\Gamma(1/b)}\cdot
                 \frac{(1+\lambda)^{k+1} + (-1)^k (1-\lambda)^{k+1}}{2}

    (each side: :math:`\int_0^\infty y^k \tfrac{b}{2\Gamma(1/b)} e^{-(y/s)^b} dy
    = s^{k+1}\Gamma((k+1)/b)/(2\Gamma(1/b))` with :math:`s = 1\pm\lambda`).
    """
    _, _, b, lam = _arrays(0.0, 1.0, shape, skew)
    sgn = -1.0 if k % 2 else 1.0
    with np.errstate(over="ignore"):
        return _out(_g(k, b) * 0.5 * ((1.0 + lam) ** (k + 1) + sgn * (1.0 - lam) ** (k + 1)))


def mean(loc: ArrayLike, scale: ArrayLike, shape: ArrayLike, skew: ArrayLike = 0.0) -> FloatOrArray:
    r"""Mean :math:`m + 2\lambda a\,\Gamma(2/b)/\Gamma(1/b)` (``loc`` exactly at skew 0)."""
    m, a, b, lam = _arrays(loc, scale, shape, skew)
    with np.errstate(over="ignore"):
        return _out(m + 2.0 * lam * a * _g(1, b))


def _var1(b: NDArray[np.float64], lam: NDArray[np.float64]) -> NDArray[np.float64]:
    r"""Variance of the standard skewed law: :math:`g_2(1+3\lambda^2) - 4\lambda^2 g_1^2`."""
    g1, g2 = _g(1, b), _g(2, b)
    return g2 + lam * lam * (3.0 * g2 - 4.0 * g1 * g1)


def variance(scale: ArrayLike, shape: ArrayLike, skew: ArrayLike = 0.0) -> FloatOrArray:
    r"""Variance of the skewed error law.

    .. math::

        \operatorname{Var} X = a^2\left[g_2(1 + 3\lambda^2) - 4\lambda^2 g_1^2\right],
        \qquad g_k = \Gamma((k+1)/b)/\Gamma(1/b)

    from :math:`E[Y] = 2\lambda g_1`, :math:`E[Y^2] = g_2(1+3\lambda^2)`
    (:func:`raw_moment_pieces`). Skew 0: the symmetric :func:`errdist.variance`.
    """
    _, a, b, lam = _arrays(0.0, scale, shape, skew)
    if _all_zero(lam):
        return _sym_moments.variance(a if a.ndim else float(a), b if b.ndim else float(b))
    with np.errstate(over="ignore", invalid="ignore"):
        return _out(a * a * _var1(b, lam))


def skewness(shape: ArrayLike, skew: ArrayLike = 0.0) -> FloatOrArray:
    r"""Skewness :math:`\mu_3/\sigma^3` (free of loc and scale).

    .. math::

        \mu_3 = \lambda\left[4(1+\lambda^2) g_3 - 6(1+3\lambda^2) g_1 g_2 + 16\lambda^2 g_1^3\right]

    (the central third moment from the raw moments of :func:`raw_moment_pieces`). Its sign
    is the sign of :math:`\lambda`; 0 at skew 0.
    """
    _, _, b, lam = _arrays(0.0, 1.0, shape, skew)
    with np.errstate(over="ignore", invalid="ignore"):
        g1, g2, g3 = _g(1, b), _g(2, b), _g(3, b)
        l2 = lam * lam
        mu3 = lam * (4.0 * (1.0 + l2) * g3 - 6.0 * (1.0 + 3.0 * l2) * g1 * g2 + 16.0 * l2 * g1**3)
        return _out(mu3 / _var1(b, lam) ** 1.5)


def excess_kurtosis(shape: ArrayLike, skew: ArrayLike = 0.0) -> FloatOrArray:
    r"""Excess kurtosis :math:`\mu_4/\sigma^4 - 3`.

    .. math::

        \mu_4 = g_4 + \lambda^2(10 g_4 - 32 g_1 g_3 + 24 g_1^2 g_2)
                + \lambda^4(5 g_4 - 32 g_1 g_3 + 72 g_1^2 g_2 - 48 g_1^4)

    (central fourth moment, expanded in :math:`\lambda` so no large terms cancel).
    Skew 0: the symmetric :func:`errdist.excess_kurtosis`.
    """
    _, _, b, lam = _arrays(0.0, 1.0, shape, skew)
    if _all_zero(lam):
        return _sym_moments.excess_kurtosis(b if b.ndim else float(b))
    with np.errstate(over="ignore", invalid="ignore"):
        g1, g2, g3, g4 = _g(1, b), _g(2, b), _g(3, b), _g(4, b)
        l2 = lam * lam
        mu4 = (
            g4
            + l2 * (10.0 * g4 - 32.0 * g1 * g3 + 24.0 * g1 * g1 * g2)
            + l2 * l2 * (5.0 * g4 - 32.0 * g1 * g3 + 72.0 * g1 * g1 * g2 - 48.0 * g1**4)
        )
        v = _var1(b, lam)
        return _out(mu4 / (v * v) - 3.0)


def standardized_params(
    shape: ArrayLike, skew: ArrayLike = 0.0
) -> tuple[FloatOrArray, FloatOrArray]:
    r"""(loc, scale) giving the skewed law mean 0 and variance 1, for innovation laws.

    .. math::

        a = \left[g_2(1+3\lambda^2) - 4\lambda^2 g_1^2\right]^{-1/2}, \qquad
        m = -2\lambda a\, g_1

    so :math:`Z = m + aY` has :math:`E Z = 0`, :math:`\operatorname{Var} Z = 1`.
    Skew 0: ``(0.0, (Γ(1/b)/Γ(3/b))**0.5)``.
    """
    _, _, b, lam = _arrays(0.0, 1.0, shape, skew)
    with np.errstate(over="ignore", invalid="ignore"):
        a = 1.0 / np.sqrt(_var1(b, lam))
        m = -2.0 * lam * a * _g(1, b)
        m = m + 0.0  # -0.0 -> 0.0
    return _out(m), _out(a)
