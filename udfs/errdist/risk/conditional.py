r"""Conditional volatility models with the (skewed) error law as innovation law.

Two models of daily returns :math:`r_t = \mu_t + \sigma_t z_t`, :math:`z_t` i.i.d. from the
standardized two-piece error law (:mod:`errdist.risk.innovation_law`; mean 0, variance 1, shape
:math:`\nu`, skew :math:`\lambda`):

**EWMA** (RiskMetrics Technical Document, J.P. Morgan/Reuters 1996, 4th ed., section 5.2):
zero mean and

.. math::

    \sigma_t^2 = \lambda\,\sigma_{t-1}^2 + (1-\lambda)\,r_{t-1}^2,\qquad \lambda = 0.94
    \text{ (daily, RiskMetrics' choice)}.

The recursion starts after :data:`EWMA_SEED_DAYS` = 75 days with :math:`\sigma^2` = the mean of
their squared returns (about the RiskMetrics "effective number of days" for
:math:`\lambda = 0.94` at a 1 % tolerance, :math:`\ln 0.01/\ln 0.94 \approx 74`), so no
variance uses a return on or after its own day. The scaled returns :math:`r_t/\sigma_t` of the
last ``fit_window`` days are then fitted by the two-piece law with free mean and spread
(exact maximum likelihood, :func:`errdist.law.skewed.fit_skewed`): the forecast law of tomorrow is
:math:`\sigma_{T+1}(\mu_z + s_z Z)`. RiskMetrics itself uses the normal law; the fitted law
corrects both the tail and any scale bias of the fixed :math:`\lambda`.

**GJR-GARCH(1,1)** (Glosten, Jagannathan & Runkle 1993, J. Finance 48(5):1779-1801):

.. math::

    \sigma_t^2 = \omega + (\alpha + \gamma\,\mathbf 1[\varepsilon_{t-1} < 0])\,
    \varepsilon_{t-1}^2 + \beta\,\sigma_{t-1}^2, \qquad \varepsilon_t = r_t - \mu,

estimated by maximum likelihood by the ``arch`` package with errdist's law as its
distribution (:class:`errdist.risk.arch_law.SkewedErrorInnovations`); ``asymmetric=False`` gives
GARCH(1,1) (Bollerslev 1986), :math:`\gamma = 0`. Standard errors are ``arch``'s robust
(Bollerslev-Wooldridge) ones.

Mean: GJR-GARCH uses a **constant mean** :math:`\mu` estimated jointly (``arch``'s default
and the protocol the comparison with ``arch``'s skew-t uses; the drift is small, about
0.03 % a day on index data, and estimating it keeps the residuals centred); ``mean="zero"``
drops it. EWMA uses RiskMetrics' zero mean; the fitted residual law's own mean takes up any
drift.

VaR and ES of tomorrow follow in closed form from the law:
:math:`\mathrm{VaR}_c = -(\mu + \sigma q_{1-c})`, :math:`\mathrm{ES}_c = -(\mu + \sigma
e_{1-c})` with :math:`(q, e)` from :func:`errdist.risk.innovation_law.lower_tail`.

Cautions: conditional figures move with the last days' returns (one large loss raises
tomorrow's VaR at once); the parameters are estimates (see the standard errors), and the
model's assumptions (one regime, i.i.d. innovations) are themselves uncertain. See
``docs/risk.md``.
"""

from __future__ import annotations

import math
import warnings
from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray
from scipy import signal

from errdist._validate import check_confidence
from errdist._validate import fmt_number as _fmt
from errdist.errors import DomainError, InputTypeError, InsufficientDataError
from errdist.law.skewed import fit_skewed
from errdist.risk.innovation_law import lower_tail

__all__ = [
    "EWMA_LAMBDA",
    "EWMA_SEED_DAYS",
    "ConditionalFit",
    "clean_returns",
    "ewma_variance",
    "fit_ewma",
    "fit_gjr",
    "law_risk",
]

#: RiskMetrics' daily decay factor (J.P. Morgan/Reuters 1996).
EWMA_LAMBDA = 0.94
#: Days whose mean square seeds the EWMA recursion.
EWMA_SEED_DAYS = 75
#: Fewest returns a conditional fit accepts.
MIN_RETURNS = 250


@dataclass(frozen=True)
class ConditionalFit:
    """A fitted conditional volatility model and tomorrow's risk figures.

    Attributes
    ----------
    model : str
        ``"ewma"``, ``"gjr"`` or ``"garch"``.
    n, n_dropped : int
        Returns used; blanks dropped.
    confidence : float
    volatility : float
        Tomorrow's conditional standard deviation :math:`\\sigma_{T+1}` (return units).
    mean : float
        Tomorrow's conditional mean of the return.
    value_at_risk, expected_shortfall : float
        One-day figures (positive losses, return units) from the fitted law.
    shape, skew : float
        The innovation law's shape :math:`\\nu` and skew :math:`\\lambda` (standardized law).
    param_names, params, std_errors : tuple
        All parameters in return units (``omega`` in squared return units), with standard
        errors (NaN where none exists, e.g. the user-set EWMA ``lambda``).
    loglik : float
    at_bound : bool
        A parameter ended at its bound (shape 0.3 or 50, skew +-0.99).
    warning : str
        Empty, or why the figures deserve care.
    """

    model: str
    n: int
    n_dropped: int
    confidence: float
    volatility: float
    mean: float
    value_at_risk: float
    expected_shortfall: float
    shape: float
    skew: float
    param_names: tuple[str, ...]
    params: tuple[float, ...]
    std_errors: tuple[float, ...]
    loglik: float
    at_bound: bool
    warning: str

    def rows(self) -> list[tuple[str, float | str]]:
        """(label, value) rows: figures first, then each parameter and its standard error."""
        out: list[tuple[str, float | str]] = [
            ("model", self.model),
            ("n", self.n),
            ("volatility", self.volatility),
            ("mean", self.mean),
            ("VaR", self.value_at_risk),
            ("ES", self.expected_shortfall),
        ]
        for name, v, se in zip(self.param_names, self.params, self.std_errors, strict=True):
            out.append((name, v))
            out.append((f"se({name})", se))
        return out


# --------------------------------------------------------------------------------------------
# input checks
# --------------------------------------------------------------------------------------------
def _confidence(confidence: Any) -> float:
    return check_confidence(confidence, minimum=0.5)


def clean_returns(
    returns: ArrayLike, minimum: int = MIN_RETURNS
) -> tuple[NDArray[np.float64], int]:
    """Returns as a float array with blanks (None/NaN) dropped; ``(values, n_dropped)``.

    Raises
    ------
    InputTypeError
        Text or other non-numbers (naming the position).
    DomainError
        Infinite values (naming the position).
    InsufficientDataError
        Fewer than ``minimum`` numbers.
    """
    arr = np.asarray(returns, dtype=object).ravel()
    out = np.empty(arr.size)
    for i, v in enumerate(arr):
        if v is None:
            out[i] = math.nan
        elif isinstance(v, (str, bytes, bool)):
            raise InputTypeError(f"returns must be numbers, got {v!r} at position {i + 1}")
        else:
            try:
                out[i] = float(v)
            except (TypeError, ValueError) as exc:
                raise InputTypeError(
                    f"returns must be numbers, got {v!r} at position {i + 1}"
                ) from exc
    if np.any(np.isinf(out)):
        i = int(np.argmax(np.isinf(out)))
        raise DomainError(f"returns must be finite, got {_fmt(out[i])} at position {i + 1}")
    keep = ~np.isnan(out)
    x = out[keep]
    if x.size < minimum:
        raise InsufficientDataError(
            f"the model needs at least {minimum} returns, got {x.size}"
            + (f" ({arr.size - x.size} blanks dropped)" if x.size < arr.size else "")
        )
    if not np.std(x) > 0.0:
        raise InsufficientDataError("the returns are all equal: no volatility to model")
    return x, int(arr.size - x.size)


def _lambda(lam: Any) -> float:
    if isinstance(lam, (str, bytes, bool)) or lam is None:
        raise InputTypeError(f"lambda must be a number, got {lam!r}")
    v = float(lam)
    if not 0.0 < v < 1.0:
        raise DomainError(f"lambda must be in (0, 1) such as 0.94, got {_fmt(v)}")
    return v


# --------------------------------------------------------------------------------------------
# shared pieces
# --------------------------------------------------------------------------------------------
def law_risk(
    confidence: float, mean: ArrayLike, std: ArrayLike, shape: ArrayLike, skew: ArrayLike
) -> tuple[Any, Any]:
    r"""VaR and ES of the law :math:`\mu + \sigma Z` (standardized two-piece :math:`Z`).

    :math:`\mathrm{VaR} = -(\mu + \sigma q)`, :math:`\mathrm{ES} = -(\mu + \sigma e)`,
    :math:`(q, e)` = :func:`errdist.risk.innovation_law.lower_tail` at :math:`1 - c`. Arrays
    broadcast.
    """
    q, e = lower_tail(1.0 - confidence, np.asarray(shape, float), np.asarray(skew, float))
    mean = np.asarray(mean, float)
    std = np.asarray(std, float)
    var, es = -(mean + std * q), -(mean + std * e)
    if np.ndim(var) == 0:
        return float(var), float(es)
    return var, es


def ewma_variance(returns: ArrayLike, lam: float = EWMA_LAMBDA) -> NDArray[np.float64]:
    r"""The RiskMetrics EWMA variance of each day, given the returns before it.

    ``out[t]`` is :math:`\sigma_t^2` for day :math:`t` (0-based) using returns
    :math:`r_0..r_{t-1}` only; ``out`` has ``len(returns) + 1`` entries, the last one being
    tomorrow's. Days before :data:`EWMA_SEED_DAYS` are NaN;
    :math:`\sigma^2_{75} = \frac1{75}\sum_{s<75} r_s^2` and then
    :math:`\sigma_t^2 = \lambda\sigma_{t-1}^2 + (1-\lambda) r_{t-1}^2`
    (RiskMetrics Technical Document 1996, eq. 5.3).
    """
    lam = _lambda(lam)
    r = np.asarray(returns, dtype=float)
    n = r.size
    k = EWMA_SEED_DAYS
    if n < k:
        raise InsufficientDataError(f"EWMA needs at least {k} returns, got {n}")
    out = np.full(n + 1, math.nan)
    seed = float(np.mean(r[:k] ** 2))
    # sigma2[t] for t = k..n: IIR filter of (1-lam) r^2 with memory lam, initial state seed.
    x = (1.0 - lam) * r[k:] ** 2
    y, _ = signal.lfilter([1.0], [1.0, -lam], x, zi=[lam * seed])
    out[k] = seed
    out[k + 1 :] = y
    return out


# --------------------------------------------------------------------------------------------
# EWMA
# --------------------------------------------------------------------------------------------
def _numeric_se(x: NDArray[np.float64], f: Any) -> tuple[float, ...]:
    r"""Standard errors of (mean, std, shape, skew) of the residual law.

    Outer product of the per-observation scores (BHHH: :math:`\hat I = \sum_i g_i g_i^T`,
    covariance :math:`\hat I^{-1}`), the scores by central differences. The observed
    Hessian is avoided: for shapes near or below 1 the log density has a cusp at the mode
    and a finite-difference second derivative there is dominated by single observations.
    """
    from errdist.risk.innovation_law import standardized_logpdf

    theta = np.array([f.mean, f.std, f.shape, f.skew])

    def lls(t: NDArray[np.float64]) -> NDArray[np.float64]:
        z = (x - t[0]) / t[1]
        return standardized_logpdf(z, t[2], t[3]) - math.log(t[1])

    h = np.array([1e-5 * f.std, 1e-5 * f.std, 1e-5 * f.shape, 1e-5])
    g = np.empty((x.size, 4))
    for i in range(4):
        e = np.zeros(4)
        e[i] = h[i]
        g[:, i] = (lls(theta + e) - lls(theta - e)) / (2.0 * h[i])
    try:
        d = np.diag(np.linalg.inv(g.T @ g))
    except np.linalg.LinAlgError:
        return (math.nan,) * 4
    return tuple(float(math.sqrt(v)) if v > 0 else math.nan for v in d)


def fit_ewma(
    returns: ArrayLike,
    confidence: float = 0.99,
    lam: float = EWMA_LAMBDA,
    fit_window: int = 1000,
) -> ConditionalFit:
    r"""RiskMetrics EWMA volatility with the skewed error law fitted to the scaled returns.

    Parameters
    ----------
    returns : array_like
        Daily returns, oldest first (blanks dropped and counted); at least 250.
    confidence : float, default 0.99
    lam : float, default 0.94
        Decay factor :math:`\lambda` in (0, 1).
    fit_window : int, default 1000
        The law is fitted to the scaled returns :math:`r_t/\sigma_t` of the last
        ``fit_window`` days (fewer when the series is shorter).

    Returns
    -------
    ConditionalFit
        Parameters ``lambda`` (user-set, no standard error), ``z_mean``, ``z_std`` (the scaled
        returns' law), ``nu``, ``skew``; standard errors from the observed information.
    """
    c = _confidence(confidence)
    lam = _lambda(lam)
    r, dropped = clean_returns(returns)
    s2 = ewma_variance(r, lam)
    sig = np.sqrt(s2)
    lo = max(EWMA_SEED_DAYS, r.size - int(fit_window))
    z = r[lo:] / sig[lo:-1]
    f = fit_skewed(z)
    vol = float(sig[-1])
    mean, std = vol * f.mean, vol * f.std
    var, es = law_risk(c, mean, std, f.shape, f.skew)
    ses = _numeric_se(z, f)
    warning = ""
    if f.at_bound:
        warning = "the residual law's shape or skew is at its search bound"
    return ConditionalFit(
        model="ewma",
        n=int(r.size),
        n_dropped=dropped,
        confidence=c,
        volatility=vol * f.std,
        mean=mean,
        value_at_risk=var,
        expected_shortfall=es,
        shape=f.shape,
        skew=f.skew,
        param_names=("lambda", "z_mean", "z_std", "nu", "skew"),
        params=(lam, float(f.mean), float(f.std), f.shape, f.skew),
        std_errors=(math.nan, *ses),
        loglik=float(f.loglik - np.sum(np.log(sig[lo:-1]))),
        at_bound=f.at_bound,
        warning=warning,
    )


# --------------------------------------------------------------------------------------------
# GJR-GARCH
# --------------------------------------------------------------------------------------------
def data_scale(r: NDArray[np.float64]) -> float:
    """Power of ten that brings the returns' standard deviation into [1, 10) for ``arch``."""
    sd = float(np.std(r))
    return 10.0 ** (-math.floor(math.log10(sd)))


def gjr_model(
    y: NDArray[np.float64], asymmetric: bool = True, mean: str = "constant", skewed: bool = True
) -> Any:
    """An ``arch`` GJR-GARCH(1,1) (or GARCH(1,1)) model of ``y`` with errdist's law."""
    from errdist.risk.arch_law import SkewedErrorInnovations, require_arch

    require_arch()
    from arch.univariate import GARCH, ConstantMean, ZeroMean

    vol = GARCH(p=1, o=1 if asymmetric else 0, q=1)
    dist = SkewedErrorInnovations(skewed=skewed)
    if mean == "constant":
        return ConstantMean(y, volatility=vol, distribution=dist, rescale=False)
    if mean == "zero":
        return ZeroMean(y, volatility=vol, distribution=dist, rescale=False)
    raise InputTypeError(f'mean must be "constant" or "zero", got {mean!r}')


def fit_arch_quietly(model: Any, **kwargs: Any) -> Any:
    """``model.fit`` without output; returns ``(result, warning_text)``.

    ``arch``'s ``ConvergenceWarning`` (the optimiser's return code and message) becomes the
    warning text; other ``arch`` warnings (e.g. starting values replaced) are dropped.
    """
    from arch.utility.exceptions import ConvergenceWarning

    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        res = model.fit(disp="off", show_warning=True, **kwargs)
    msgs = [
        " ".join(str(w.message).split("See scipy")[0].split())
        for w in caught
        if issubclass(w.category, ConvergenceWarning)
    ]
    return res, "; ".join(msgs)


def fit_gjr(
    returns: ArrayLike,
    confidence: float = 0.99,
    asymmetric: bool = True,
    mean: str = "constant",
) -> ConditionalFit:
    r"""GJR-GARCH(1,1) (or GARCH(1,1)) with the skewed error law, estimated by ``arch``.

    Parameters
    ----------
    returns : array_like
        Daily returns, oldest first (blanks dropped and counted); at least 250.
    confidence : float, default 0.99
    asymmetric : bool, default True
        ``False``: GARCH(1,1) (:math:`\gamma = 0`).
    mean : {"constant", "zero"}, default "constant"

    Returns
    -------
    ConditionalFit
        Parameters ``mu`` (if constant mean), ``omega``, ``alpha``, ``gamma`` (GJR only),
        ``beta``, ``nu``, ``skew`` in return units, with ``arch``'s robust standard errors.
    """
    c = _confidence(confidence)
    if mean not in ("constant", "zero"):
        raise InputTypeError(f'mean must be "constant" or "zero", got {mean!r}')
    r, dropped = clean_returns(returns)
    s = data_scale(r)
    model = gjr_model(r * s, asymmetric=asymmetric, mean=mean)
    res, warn = fit_arch_quietly(model)
    p = np.asarray(res.params, dtype=float)
    se = np.asarray(res.std_err, dtype=float)
    names = list(res.params.index)
    fc = res.forecast(horizon=1, reindex=False)
    var_next = float(np.asarray(fc.variance)[-1, 0])
    mu_next = float(np.asarray(fc.mean)[-1, 0])
    nu, lam = float(p[-2]), float(p[-1])
    vol = math.sqrt(var_next) / s
    mu = mu_next / s
    var, es = law_risk(c, mu, vol, nu, lam)
    # back to return units
    unit = {"mu": 1 / s, "omega": 1 / s**2}
    out_names, out_p, out_se = [], [], []
    for name, v, e in zip(names, p, se, strict=True):
        f = unit.get(name, 1.0)
        out_names.append(
            {"alpha[1]": "alpha", "gamma[1]": "gamma", "beta[1]": "beta", "lambda": "skew"}.get(
                name, name
            )
        )
        out_p.append(float(v * f))
        out_se.append(float(e * f))
    at_bound = bool(nu <= 0.3 + 1e-6 or nu >= 50 - 1e-6 or abs(lam) >= 0.99 - 1e-6)
    warning = warn
    if at_bound:
        warning = (warning + "; " if warning else "") + "the law's shape or skew is at its bound"
    persistence = float(p[names.index("beta[1]")] + p[names.index("alpha[1]")]) + (
        0.5 * float(p[names.index("gamma[1]")]) if asymmetric else 0.0
    )
    if persistence >= 1.0:
        warning = (warning + "; " if warning else "") + (
            f"persistence {persistence:.3f} >= 1: no finite long-run variance"
        )
    return ConditionalFit(
        model="gjr" if asymmetric else "garch",
        n=int(r.size),
        n_dropped=dropped,
        confidence=c,
        volatility=vol,
        mean=mu,
        value_at_risk=var,
        expected_shortfall=es,
        shape=nu,
        skew=lam,
        param_names=tuple(out_names),
        params=tuple(out_p),
        std_errors=tuple(out_se),
        loglik=float(res.loglikelihood + r.size * math.log(s)),
        at_bound=at_bound,
        warning=warning,
    )
