r"""Value at Risk and Expected Shortfall of a generalized normal return law.

Sign convention
---------------
Returns :math:`X` follow the generalized normal law (location :math:`m`, scale :math:`a`,
shape :math:`b`). At confidence :math:`c` (a fraction, e.g. 0.99) the lower-tail probability is
:math:`u = 1 - c` and, with :math:`q_u` the :math:`u`-quantile of the (horizon) return law,

.. math::

    \mathrm{VaR}_c = -q_u, \qquad \mathrm{ES}_c = -E[X \mid X \le q_u].

Both are *positive losses* in return units (a 2.5 % loss is 0.025). With ``amount`` given they
are money: ``amount * loss`` — the position value times the return-unit loss. For simple
returns that is exact; for log returns it is the usual first-order approximation
(the exact money loss is ``amount * (1 - exp(-VaR))``, slightly smaller).

Expected Shortfall in closed form
---------------------------------
Write :math:`X = m + aY` with :math:`Y` standard (density
:math:`\frac{b}{2\Gamma(1/b)} e^{-|y|^b}`) and :math:`t = (q - m)/a`. Substituting
:math:`w = u^b` in :math:`\int_{|t|}^\infty u\,e^{-u^b}\,du = \frac1b\,\Gamma(2/b, |t|^b)`,

.. math::

    \int_{-\infty}^{t} y f_Y(y)\,dy = -\frac{\Gamma(2/b,\ |t|^b)}{2\Gamma(1/b)}

for :math:`t \le 0`; for :math:`t > 0` the same expression holds because :math:`E[Y] = 0`
and the law is symmetric (:math:`\int_{-\infty}^{t} = -\int_{t}^{\infty}`). Hence

.. math::

    E[X; X \le q] = m\,F(q) - a\,\frac{\Gamma(2/b, z)}{2\Gamma(1/b)},\quad z = |t|^b,
    \qquad
    \mathrm{ES}_c = a\,\frac{\Gamma(2/b)\,Q(2/b, z)}{2\,\Gamma(1/b)\,(1-c)} - m,

with :math:`Q` the regularized upper incomplete gamma function; the ratio of gamma functions
is taken in log space. Special cases: the normal (:math:`b = 2`, :math:`\sigma = a/\sqrt2`):
:math:`\mathrm{ES} = \sigma\varphi(z_c)/(1-c) - \mu`; the Laplace (:math:`b = 1`):
:math:`\mathrm{ES} = \mathrm{VaR} + a` for :math:`c \ge 1/2`.

Horizon rules (``horizon`` = :math:`h` days)
--------------------------------------------
``"sqrt"``
    Square-root-of-time scaling of the *centred* quantile: the location is scaled by :math:`h`
    and the dispersion by :math:`\sqrt h`,
    :math:`q_h = h m + \sqrt h\,(q_1 - m)` and likewise for the tail mean. A convention
    (common practice, no source); exact only for the normal law. Any real :math:`h \ge 1`.
``"iid"``
    The exact law of the sum of :math:`h` i.i.d. one-day returns of the fitted law, computed by
    numerical convolution (:mod:`errdist.risk.horizon`); a fat one-day tail is *not* simply scaled
    up — the sum is closer to normal than the one-day law. Integer :math:`h \ge 1`.

Both assume independent, identically distributed daily returns; volatility clustering and
autocorrelation make both wrong (see ``docs/risk.md``).
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray
from scipy import special as sc

from errdist._validate import as_float_array, raise_first
from errdist._validate import fmt_number as _fmt
from errdist.errors import DomainError, InputTypeError
from errdist.law._incgamma import q_power
from errdist.law.symmetric import check_params, ppf
from errdist.risk.horizon import sum_lower_tail

__all__ = ["HORIZON_RULES", "expected_shortfall", "value_at_risk"]

IID_MIN_TAIL = 1e-9
"""Smallest tail probability 1 - confidence (or confidence, below 1/2) accepted by the "iid"
rule: down to it VaR and ES are accurate to 1e-6 relative (checked against the normal law,
where the rule must equal the square root of time); further out the convolution's rounding
noise (~1e-16 per grid point) is no longer small against the tail mass."""

#: The accepted values of ``horizon_rule``.
HORIZON_RULES = ("sqrt", "iid")

FloatOrArray = float | NDArray[np.float64]


def _first_bad(name: str, arr: NDArray[np.float64], bad: NDArray[np.bool_], rule: str) -> None:
    """Raise for the first ``bad`` element, if any (a ``None`` input arrives here as NaN)."""
    if np.any(bad):
        raise_first(name, arr, bad, rule)


def _check_confidence(confidence: ArrayLike) -> NDArray[np.float64]:
    c = as_float_array("confidence", confidence, strict=False)
    _first_bad("confidence", c, ~((c > 0.0) & (c < 1.0)), "a fraction in (0, 1) such as 0.99")
    # 1 - c must stay inside (0, 1): a confidence below 1.1e-16 rounds 1 - c to exactly 1
    _first_bad(
        "confidence",
        c,
        ~(1.0 - c < 1.0),
        "at least 1.2e-16 (closer to 0, 1 - confidence rounds to 1 in double precision)",
    )
    return c


def _check_rule(horizon_rule: Any) -> str:
    if not isinstance(horizon_rule, str):
        raise InputTypeError(f'horizon_rule must be "sqrt" or "iid", got {horizon_rule!r}')
    rule = horizon_rule.strip().lower()
    if rule not in HORIZON_RULES:
        raise InputTypeError(f'horizon_rule must be "sqrt" or "iid", got {horizon_rule!r}')
    return rule


def _check_horizon(horizon: Any, rule: str) -> float:
    if isinstance(horizon, (str, bytes)) or isinstance(horizon, bool):
        raise InputTypeError(f"horizon must be a number of days, got {horizon!r}")
    arr = as_float_array("horizon", horizon, strict=False)
    if arr.ndim != 0:
        raise InputTypeError("horizon must be a single number of days, got an array")
    h = float(arr)
    if not (math.isfinite(h) and h >= 1.0):
        raise DomainError(f"horizon must be >= 1 day, got {_fmt(h)}")
    if rule == "iid" and not h.is_integer():
        raise DomainError(
            f'horizon must be a whole number of days for the "iid" rule, got {_fmt(h)}'
        )
    return h


def _check_amount(amount: Any) -> NDArray[np.float64] | None:
    if amount is None:
        return None
    arr = as_float_array("amount", amount, strict=False)
    _first_bad("amount", arr, ~(np.isfinite(arr) & (arr > 0.0)), "> 0 (a position value)")
    return arr


def _std_tail_mean(u: NDArray[np.float64], t: NDArray[np.float64], b: NDArray[np.float64]):
    r"""E[Y | Y <= t] for the standard law, with F(t) = u: -Γ(2/b, |t|^b) / (2 Γ(1/b) u)."""
    log_ratio = sc.gammaln(2.0 / b) - sc.gammaln(1.0 / b) - math.log(2.0) - np.log(u)
    # Q(2/b, |t|^b) per shape, with the body series on z^(2/b) = t^2: |t|^b underflows for
    # huge shapes (b > ~1000) while the tail factor does not
    q = np.empty(np.broadcast_shapes(np.shape(t), np.shape(b)))
    tb, bb = np.broadcast_arrays(t, b)
    for shape_value in np.unique(bb):
        sel = bb == shape_value
        q[sel] = q_power(tb[sel], float(shape_value), 2.0)
    return -np.exp(log_ratio) * q


def _risk(*args: Any) -> tuple[NDArray[np.float64], NDArray[np.float64], bool]:
    """:func:`_risk_unchecked` (same arguments) with a DomainError where a result overflows."""
    with np.errstate(over="ignore", invalid="ignore"):
        var, es, scalar = _risk_unchecked(*args)
    if not (np.all(np.isfinite(var)) and np.all(np.isfinite(es))):
        raise DomainError(
            "VaR or Expected Shortfall exceeds the float range: loc, scale, horizon or "
            "amount is too large"
        )
    return var, es, scalar


def _risk_unchecked(
    confidence: ArrayLike,
    loc: ArrayLike,
    scale: ArrayLike,
    shape: ArrayLike,
    horizon: Any,
    amount: Any,
    horizon_rule: Any,
) -> tuple[NDArray[np.float64], NDArray[np.float64], bool]:
    """Return (VaR, ES) arrays and whether every input was a scalar."""
    c = _check_confidence(confidence)
    check_params(loc, scale, shape)
    m = np.asarray(loc, dtype=np.float64)
    a = np.asarray(scale, dtype=np.float64)
    b = np.asarray(shape, dtype=np.float64)
    rule = _check_rule(horizon_rule)
    h = _check_horizon(horizon, rule)
    amt = _check_amount(amount)
    arrays = [c, m, a, b] + ([amt] if amt is not None else [])
    scalar = all(x.ndim == 0 for x in arrays)
    c, m, a, b = np.broadcast_arrays(c, m, a, b)
    u = 1.0 - c  # lower-tail probability
    if rule == "sqrt" or h == 1.0:
        t = np.asarray(ppf(u, 0.0, 1.0, b), dtype=np.float64)
        e = _std_tail_mean(u, t, b)
        root = math.sqrt(h)
        q = h * m + root * a * t
        tail = h * m + root * a * e
    else:
        n = int(h)
        qs = np.empty(u.shape)
        es = np.empty(u.shape)
        w = np.minimum(u, 1.0 - u)  # symmetric law: work on the lower half only
        if np.any(w < 0.999 * IID_MIN_TAIL):  # 1 - (1 - 1e-9) rounds to 0.99999997e-9
            bad = float(np.asarray(c).reshape(-1)[int(np.argmin(w.reshape(-1)))])
            raise DomainError(
                f'confidence {_fmt(bad)} is too far in the tail for the "iid" horizon rule, '
                f"which is accurate to 1e-6 only for confidence between {IID_MIN_TAIL:g} and "
                f'1 - {IID_MIN_TAIL:g}; use a confidence in that range or the "sqrt" rule'
            )
        for shape_value in np.unique(b):
            sel = b == shape_value
            qw, ew = sum_lower_tail(w[sel], float(shape_value), n)
            upper = u[sel] > 0.5
            # q_u = -q_{1-u};  E[S; S <= q_u] = E[S; S <= q_{1-u}] (symmetry, E[S] = 0)
            qs[sel] = np.where(upper, -qw, qw)
            es[sel] = np.where(upper, ew * w[sel] / u[sel], ew)
        q = n * m + a * qs
        tail = n * m + a * es
    var = -q
    es_out = -tail
    if amt is not None:
        var = var * amt
        es_out = es_out * amt
    return np.asarray(var, dtype=np.float64), np.asarray(es_out, dtype=np.float64), scalar


def _out(arr: NDArray[np.float64], scalar: bool) -> FloatOrArray:
    return float(arr.reshape(-1)[0]) if scalar else arr


def value_at_risk(
    confidence: ArrayLike,
    loc: ArrayLike,
    scale: ArrayLike,
    shape: ArrayLike,
    horizon: float = 1,
    amount: ArrayLike | None = None,
    horizon_rule: str = "sqrt",
) -> FloatOrArray:
    r"""Value at Risk: the loss not exceeded with probability ``confidence``.

    .. math::

        \mathrm{VaR}_c = -q_{1-c}, \qquad q_{1-c} = m + a\,F_Y^{-1}(1-c) \text{ (one day)},

    with the horizon rule applied to the quantile (see the module docstring).

    Parameters
    ----------
    confidence : array_like
        Confidence level(s) as fractions in (0, 1), e.g. 0.99.
    loc, scale, shape : array_like
        One-day return law: location :math:`m`, scale :math:`a > 0`, shape :math:`b > 0`.
        Broadcast with ``confidence``.
    horizon : float, default 1
        Horizon in days, >= 1 (a whole number for ``"iid"``).
    amount : array_like, optional
        Position value (> 0); when given the result is money: ``amount * VaR``.
    horizon_rule : {"sqrt", "iid"}, default "sqrt"
        ``"sqrt"``: :math:`q_h = h m + \sqrt h (q_1 - m)` (common practice, no source);
        ``"iid"``: exact quantile of the sum of :math:`h` i.i.d. one-day returns.

    Returns
    -------
    float or numpy.ndarray
        Positive loss (negative when the quantile is a gain, e.g. ``confidence < 0.5``).

    Raises
    ------
    DomainError
        ``confidence`` outside (0, 1), invalid parameters, ``horizon < 1``, a non-integer
        horizon with ``"iid"``, ``amount <= 0``.
    InputTypeError
        Text where a number is needed, an unknown ``horizon_rule``.
    """
    var, _, scalar = _risk(confidence, loc, scale, shape, horizon, amount, horizon_rule)
    return _out(var, scalar)


def expected_shortfall(
    confidence: ArrayLike,
    loc: ArrayLike,
    scale: ArrayLike,
    shape: ArrayLike,
    horizon: float = 1,
    amount: ArrayLike | None = None,
    horizon_rule: str = "sqrt",
) -> FloatOrArray:
    r"""Expected Shortfall: the mean loss on the days the loss exceeds the VaR.

    .. math::

        \mathrm{ES}_c = -E[X \mid X \le q_{1-c}]
        = a\,\frac{\Gamma(2/b)\,Q(2/b, z)}{2\,\Gamma(1/b)\,(1-c)} - m,
        \qquad z = \left|\frac{q_{1-c} - m}{a}\right|^b \text{ (one day)}.

    Derivation in the module docstring; arguments, horizon rules and errors as in
    :func:`value_at_risk`. Under ``"sqrt"`` the centred tail mean is scaled by :math:`\sqrt h`
    and the location by :math:`h`; under ``"iid"`` it is the exact tail mean of the
    :math:`h`-day sum.

    Returns
    -------
    float or numpy.ndarray
        Positive loss, always >= VaR at the same confidence.
    """
    _, es, scalar = _risk(confidence, loc, scale, shape, horizon, amount, horizon_rule)
    return _out(es, scalar)
