r"""Value at Risk and Expected Shortfall of the skewed error law (closed form).

Returns :math:`X = m + aY` follow the skewed law (mode :math:`m`, scale :math:`a`, shape
:math:`b`, skew :math:`\lambda`). At confidence :math:`c` the lower-tail probability is
:math:`u = 1 - c`; with :math:`q = F^{-1}(u) = m + a t`,

.. math::

    \mathrm{VaR}_c = -q, \qquad \mathrm{ES}_c = -E[X \mid X \le q] = -m - \frac{a}{u} E[Y; Y \le t].

Tail mean in closed form. Left of the mode (:math:`t \le 0`, the usual case
:math:`u < (1-\lambda)/2`), with :math:`s = 1-\lambda` and :math:`z = (|t|/s)^b`, the
substitution :math:`w = (v/s)^b` in :math:`\int_{|t|}^\infty v\,e^{-(v/s)^b}dv` gives

.. math::

    E[Y; Y \le t] = -\frac{s^2}{2}\,\frac{\Gamma(2/b)}{\Gamma(1/b)}\,Q(2/b, z),
    \qquad u = \frac{s}{2}\,Q(1/b, z),

so :math:`\mathrm{ES}_c = a\,s^2 g_1 Q(2/b, z)/(2u) - m` with :math:`g_1 = \Gamma(2/b)/\Gamma(1/b)`
(the symmetric law's formula with the left half-scale; :math:`\lambda = 0` is
:func:`errdist.expected_shortfall`). Right of the mode, :math:`E[Y; Y \le t] = E[Y] - E[Y; Y > t]
= 2\lambda g_1 - \tfrac{s_R^2}{2} g_1 Q(2/b, z_R)` with :math:`s_R = 1+\lambda`.
Check: :math:`b = 1` (asymmetric Laplace) gives :math:`\mathrm{ES} = \mathrm{VaR} + a(1-\lambda)`.

Horizon ``h`` (days): square-root-of-time scaling around the *mean* :math:`\mu` (the mode is
not the mean once :math:`\lambda \ne 0`): :math:`q_h = h\mu + \sqrt h\,(q - \mu)`, likewise for
the tail mean (common practice, no source; i.i.d. returns assumed). Skew 0 routes to the
symmetric law's functions (where :math:`\mu = m`), so the figures are identical.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray
from scipy.special import gammaincc, gammaln

from errdist._validate import as_float_array, raise_first
from errdist._validate import fmt_number as _fmt
from errdist.errors import DomainError, InputTypeError
from errdist.law import _skewed_core as _core
from errdist.risk import expected_shortfall as _sym_es
from errdist.risk import value_at_risk as _sym_var

FloatOrArray = float | NDArray[np.float64]


def _check(confidence: Any, horizon: Any, amount: Any) -> tuple[NDArray[np.float64], float, Any]:
    c = as_float_array("confidence", confidence, strict=False)
    bad = ~((c > 0.0) & (c < 1.0))
    if np.any(bad):
        raise_first("confidence", c, bad, "a fraction in (0, 1) such as 0.99")
    if isinstance(horizon, (str, bytes, bool)):
        raise InputTypeError(f"horizon must be a number of days, got {horizon!r}")
    h_arr = as_float_array("horizon", horizon, strict=False)
    if h_arr.ndim != 0:
        raise InputTypeError("horizon must be a single number of days, got an array")
    h = float(h_arr)
    if not (math.isfinite(h) and h >= 1.0):
        raise DomainError(f"horizon must be >= 1 day, got {_fmt(h)}")
    amt = None
    if amount is not None:
        amt = as_float_array("amount", amount, strict=False)
        bad = ~(np.isfinite(amt) & (amt > 0.0))
        if np.any(bad):
            raise_first("amount", amt, bad, "> 0 (a position value)")
    return c, h, amt


def _risk(
    confidence: Any, loc: Any, scale: Any, shape: Any, skew: Any, horizon: Any, amount: Any
) -> tuple[NDArray[np.float64], NDArray[np.float64], bool]:
    c, h, amt = _check(confidence, horizon, amount)
    m, a, b, lam = _core._arrays(loc, scale, shape, skew)
    arrays = [c, m, a, b, lam] + ([amt] if amt is not None else [])
    scalar = all(x.ndim == 0 for x in arrays)
    c, m, a, b, lam = np.broadcast_arrays(c, m, a, b, lam)
    u = 1.0 - c
    with np.errstate(over="ignore", invalid="ignore", divide="ignore"):
        t = np.asarray(_core.ppf(u, 0.0, 1.0, b, lam), dtype=np.float64)
        g1 = np.exp(gammaln(2.0 / b) - gammaln(1.0 / b))
        left = t <= 0.0
        s = np.where(left, 1.0 - lam, 1.0 + lam)
        z = (np.abs(t) / s) ** b
        piece = 0.5 * s * s * g1 * gammaincc(2.0 / b, z)
        tail_sum = np.where(left, -piece, 2.0 * lam * g1 - piece)  # E[Y; Y <= t]
        e = tail_sum / u
        mu = 2.0 * lam * g1  # mean of Y
        root = math.sqrt(h)
        q = h * (m + a * mu) + root * a * (t - mu)
        tail = h * (m + a * mu) + root * a * (e - mu)
        var, es = -q, -tail
        if amt is not None:
            var, es = var * amt, es * amt
    if not (np.all(np.isfinite(var)) and np.all(np.isfinite(es))):
        raise DomainError(
            "VaR or Expected Shortfall exceeds the float range: loc, scale, horizon or "
            "amount is too large"
        )
    return np.asarray(var, dtype=np.float64), np.asarray(es, dtype=np.float64), scalar


def _out(arr: NDArray[np.float64], scalar: bool) -> FloatOrArray:
    return float(arr.reshape(-1)[0]) if scalar else arr


def value_at_risk(
    confidence: ArrayLike,
    loc: ArrayLike,
    scale: ArrayLike,
    shape: ArrayLike,
    skew: ArrayLike = 0.0,
    horizon: float = 1,
    amount: ArrayLike | None = None,
) -> FloatOrArray:
    r"""Value at Risk of the skewed error law: :math:`\mathrm{VaR}_c = -F^{-1}(1-c)`.

    Parameters
    ----------
    confidence : array_like
        Fractions in (0, 1), e.g. 0.99.
    loc, scale, shape, skew : array_like
        One-day law: mode, scale > 0, shape > 0, skew in (-1, 1).
    horizon : float, default 1
        Days (>= 1), square-root-of-time around the mean (see the module docstring).
    amount : array_like, optional
        Position value > 0; the result is then money, ``amount * VaR``.

    Returns
    -------
    float or numpy.ndarray
        Positive loss in return units (or money).
    """
    if not np.any(_core.check_skew(skew)):
        return _sym_var(confidence, loc, scale, shape, horizon, amount)
    var, _, scalar = _risk(confidence, loc, scale, shape, skew, horizon, amount)
    return _out(var, scalar)


def expected_shortfall(
    confidence: ArrayLike,
    loc: ArrayLike,
    scale: ArrayLike,
    shape: ArrayLike,
    skew: ArrayLike = 0.0,
    horizon: float = 1,
    amount: ArrayLike | None = None,
) -> FloatOrArray:
    r"""Expected Shortfall of the skewed error law, in closed form.

    .. math::

        \mathrm{ES}_c = a\,\frac{(1-\lambda)^2\,\Gamma(2/b)\,Q(2/b, z)}{2\,\Gamma(1/b)\,(1-c)} - m,
        \qquad z = \left(\frac{m - q}{a(1-\lambda)}\right)^b

    for the usual case :math:`q = \mathrm{-VaR}_c < m` (derivation and the other case in the
    module docstring). Arguments as in :func:`value_at_risk`.

    Returns
    -------
    float or numpy.ndarray
        Positive loss, >= VaR at the same confidence.
    """
    if not np.any(_core.check_skew(skew)):
        return _sym_es(confidence, loc, scale, shape, horizon, amount)
    _, es, scalar = _risk(confidence, loc, scale, shape, skew, horizon, amount)
    return _out(es, scalar)
