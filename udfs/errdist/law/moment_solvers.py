"""Shape from excess kurtosis and scale from standard deviation (method of moments).

For the generalized normal law with scale a and shape b (Nadarajah 2005, "A generalized
normal distribution", J. Applied Statistics 32(7):685-694):

    variance         σ² = a² Γ(3/b) / Γ(1/b)
    excess kurtosis  κ(b) = Γ(5/b) Γ(1/b) / Γ(3/b)² − 3

κ is strictly decreasing in b, from +∞ (b → 0) to −6/5 (b → ∞, the uniform law), so every
κ > −1.2 has exactly one shape. :func:`solve_shape` inverts κ to full double precision over
that whole range; :func:`solve_scale` inverts the variance formula.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.special import gammaln, psi, zeta

from errdist.errors import DomainError

__all__ = ["kurtosis_of_shape", "solve_scale", "solve_shape"]

_LOG_9_5 = math.log(1.8)
# 6/5 minus the double nearest 1.2 (exactly 2**-52 / 5): added back so that κ + 6/5 is
# accurate even for κ within a few ulps of -1.2.
_SIX_FIFTHS_CORRECTION = 2.0**-52 / 5.0
_SERIES_EPS = 0.1  # use the power series in ε = 1/b for b >= 10
_N_TERMS = 64
_k = np.arange(2, _N_TERMS + 2, dtype=np.float64)
# ln Γ(1+x) = −γx + Σ_{k≥2} (−1)^k ζ(k) x^k / k, so
# D(ε) = lnΓ(1+5ε) + lnΓ(1+ε) − 2 lnΓ(1+3ε) = Σ_{k≥2} c_k ε^k  (the γ terms cancel)
_COEF = (-1.0) ** _k * zeta(_k) / _k * (5.0**_k + 1.0 - 2.0 * 3.0**_k)
_COEF_D = _COEF * _k  # for ε·dD/dε
_U_LO = math.log(1e-3)  # κ(0.001) overflows every double: bracket for any finite κ
_U_HI = math.log(1e10)  # κ(1e10) + 1.2 is far below the spacing of doubles at -1.2


def _log_excess(b: float) -> tuple[float, float]:
    """D(b) = ln((κ(b)+3)/1.8) and its derivative dD/d(ln b), both accurately."""
    eps = 1.0 / b
    if eps <= _SERIES_EPS:
        powers = eps**_k
        return float(_COEF @ powers), -float(_COEF_D @ powers)
    d = float(gammaln(5.0 * eps) + gammaln(eps) - 2.0 * gammaln(3.0 * eps)) - _LOG_9_5
    dd = -eps * float(5.0 * psi(5.0 * eps) + psi(eps) - 6.0 * psi(3.0 * eps))
    return d, dd


def kurtosis_of_shape(shape: float) -> float:
    """Theoretical excess kurtosis Γ(5/b)Γ(1/b)/Γ(3/b)² − 3 (Nadarajah 2005)."""
    d, _ = _log_excess(float(shape))
    return 1.8 * math.expm1(d) - 1.2 if d < 700 else math.inf


def solve_shape(excess_kurtosis: float) -> float:
    """Shape b whose theoretical excess kurtosis equals ``excess_kurtosis``.

    Solves Γ(5/b)Γ(1/b)/Γ(3/b)² − 3 = κ (Nadarajah 2005) in log form,

        ln Γ(5/b) + ln Γ(1/b) − 2 ln Γ(3/b) − ln(9/5) = ln(1 + (κ + 6/5)/(9/5)),

    with a bracketing root finder (Brent) in u = ln b over b ∈ [1e-3, 1e10], followed by a
    Newton polish. For b ≥ 10 the left side is summed as the power series of
    ln Γ(1+x) in ε = 1/b, so inputs very close to −1.2 (huge b, where the kurtosis is
    about −1.2 + 1.2π²/b²) are solved without cancellation. This is the plain inverse
    function: no bound on b is applied here (:func:`errdist.estimate.fit` applies them).

    Parameters
    ----------
    excess_kurtosis : float
        Target excess kurtosis κ, any finite number > −1.2.

    Returns
    -------
    float
        The shape b > 0.

    Raises
    ------
    DomainError
        κ ≤ −1.2 (no error distribution is that light-tailed), or κ is NaN or infinite.
    """
    k = float(excess_kurtosis)
    if math.isnan(k) or math.isinf(k):
        raise DomainError(f"excess kurtosis must be a finite number, got {k}")
    if k <= -1.2:
        raise DomainError(
            f"no error distribution has excess kurtosis <= -1.2 (got {k:g}); "
            "-1.2 is the uniform limit of the family"
        )
    # target y = ln((κ+3)/1.8) = ln1p((κ + 6/5)/1.8), accurate near κ = -1.2
    y = math.log1p(((k + 1.2) + _SIX_FIFTHS_CORRECTION) / 1.8)

    def resid(u: float) -> float:
        return _log_excess(math.exp(u))[0] - y

    from scipy.optimize import brentq  # deferred: scipy.optimize is slow to import

    u = brentq(resid, _U_LO, _U_HI, xtol=1e-15, rtol=4.0 * np.finfo(float).eps, maxiter=200)
    for _ in range(2):  # Newton polish: D is smooth and strictly decreasing in u
        d, dd = _log_excess(math.exp(u))
        step = (d - y) / dd
        u -= step
        if abs(step) <= 1e-16 * max(1.0, abs(u)):
            break
    return math.exp(u)


def solve_scale(sd: float, shape: float) -> float:
    """Scale a of the law with standard deviation ``sd`` and shape b.

    Inverts σ² = a² Γ(3/b)/Γ(1/b) (Nadarajah 2005):

        a = sd · √(Γ(1/b)/Γ(3/b)) = sd · exp(½(ln Γ(1/b) − ln Γ(3/b))).

    b = 2 gives a = √2·sd (normal), b = 1 gives a = sd/√2 (Laplace).

    Raises
    ------
    DomainError
        sd ≤ 0 or shape ≤ 0 (or either not finite).
    """
    sd = float(sd)
    b = float(shape)
    if not math.isfinite(sd) or sd <= 0.0:
        raise DomainError(f"sd must be > 0, got {sd:g}")
    if not math.isfinite(b) or b <= 0.0:
        raise DomainError(f"shape must be > 0, got {b:g}")
    return sd * math.exp(0.5 * (float(gammaln(1.0 / b)) - float(gammaln(3.0 / b))))
