"""Exact shape for many fixed locations at once (row-wise profile in the shape).

For a fixed location m the profile log-likelihood of the generalized normal law (Nadarajah
2005, "A generalized normal distribution", J. Applied Statistics 32(7):685-694), scale
profiled out in closed form a^b = (b/n)·S0, S0 = Σ|xᵢ−m|^b, is

    ℓ(m, b) = n[ln b − ln 2 − ln Γ(1/b) − (1/b)·ln(b·S0/n) − 1/b],

with, in u = ln b, L = ln|x−m|, S1 = Σ|x−m|^b·L, S2 = Σ|x−m|^b·L², c = ψ(1/b) + ln(b·S0/n):

    (1/n) ∂ℓ/∂u   = 1 + c/b − S1/S0
    (1/n) ∂²ℓ/∂u² = −c/b − ψ'(1/b)/b² + 1/b + S1/S0 − b(S2/S0 − (S1/S0)²).

:func:`shape_rows` maximises it over b ∈ [b_min, b_max] for every row of a matrix of
ln|xᵢ−m| by the bracketed Newton iteration of :func:`errdist.estimate.mle._shape_given_loc`,
all rows together. The exhaustive b ≤ 1 search of :mod:`errdist.estimate.mle` uses it with one
row per candidate observation.
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import NDArray
from scipy.special import gammaln, psi, zeta

__all__ = ["profile_rows", "shape_rows"]

_LOG2 = math.log(2.0)

FloatArray = NDArray[np.float64]


def profile_rows(s0: FloatArray, n: int, b: FloatArray) -> FloatArray:
    """ℓ(m, b) from S0 = S_b(m), row-wise."""
    inv = 1.0 / b
    return n * (np.log(b) - _LOG2 - gammaln(inv) - np.log(b * s0 / n) * inv - inv)


def shape_rows(
    lg: FloatArray, b0: float, b_min: float, b_max: float
) -> tuple[FloatArray, FloatArray]:
    """Shape maximising ℓ(m, b) over [b_min, b_max] for every row, and ℓ there.

    ``lg`` (rows × n) holds ln|xᵢ−m| with a huge negative number (−1e300) where xᵢ = m.
    Every row starts at ``b0``; a row settles after a short true Newton step (≤ 1e-7 in
    ln b; quadratic convergence leaves O(1e-14)), when its bracket shrinks to the float
    resolution, or at a bound where the score does not change sign inside.
    Returns (b, loglik).
    """
    rows, n = lg.shape
    u_min, u_max = math.log(b_min), math.log(b_max)
    u = np.full(rows, min(max(math.log(b0), u_min), u_max))
    u_lo = np.full(rows, u_min)
    u_hi = np.full(rows, u_max)
    lo_t = np.zeros(rows, dtype=bool)
    hi_t = np.zeros(rows, dtype=bool)
    out = np.exp(u)
    act = np.arange(rows)
    for _ in range(200):
        if act.size == 0:
            break
        lga = lg if act.size == rows else lg[act]
        ua = u[act]
        ba = np.exp(ua)
        p = lga * ba[:, None]
        np.exp(p, out=p)
        s0 = p.sum(axis=1)
        p *= lga
        r1 = p.sum(axis=1) / s0
        var = np.einsum("ij,ij->i", p, lga) / s0 - r1 * r1
        inv = 1.0 / ba
        c = psi(inv) + np.log(ba * s0 / n)
        gu = 1.0 + c * inv - r1
        pos = gu > 0.0
        u_lo[act[pos]], lo_t[act[pos]] = ua[pos], True
        u_hi[act[~pos]], hi_t[act[~pos]] = ua[~pos], True
        top = pos & (ua >= u_max)
        bottom = ~pos & (ua <= u_min)
        out[act[top]] = b_max
        out[act[bottom]] = b_min
        guu = -c * inv - zeta(2.0, inv) * inv * inv + inv + r1 - ba * var
        with np.errstate(all="ignore"):
            un = np.where(guu < 0.0, ua - gu / guu, np.nan)
        lo, hi = u_lo[act], u_hi[act]
        inside = (lo < un) & (un < hi)
        to_max = ~inside & ~(un < hi) & ~hi_t[act]
        to_min = ~inside & ~to_max & ~(un > lo) & ~lo_t[act]
        un = np.where(inside, un, np.where(to_max, u_max, np.where(to_min, u_min, 0.5 * (lo + hi))))
        conv = inside & (np.abs(un - ua) <= 1e-7)
        flat = hi - lo <= 4e-16 * np.maximum(1.0, np.abs(ua))
        done = (conv | flat) & ~top & ~bottom
        out[act[done]] = np.exp(un[done])
        u[act] = un
        act = act[~(done | top | bottom)]
    if act.size:
        out[act] = np.exp(u[act])
    p = lg * out[:, None]
    np.exp(p, out=p)
    return out, profile_rows(p.sum(axis=1), n, out)


def smooth_locations(
    xs: FloatArray, bs: FloatArray, m0: float, rel_tol: float = 1e-15
) -> FloatArray:
    """Exact minimiser of S_b(m) = Σ|xᵢ−m|^b for every shape in ``bs`` (all > 1), one sample.

    S_b is strictly convex for b > 1, so the minimiser is the root of the decreasing score
    T(m) = Σ sign(xᵢ−m)|xᵢ−m|^(b−1) inside [min x, max x]. All shapes together: Newton steps
    (T′ = −(b−1)Σ|xᵢ−m|^(b−2)) kept inside a bracket of the root that every evaluation of T
    narrows, bisection when a step leaves it; a row stops when the step or the bracket is
    below ``rel_tol`` of the data's range. (S_b is stationary at the root: a location off by
    δ changes S_b only by O(δ²), so a scan of the profile needs no tight ``rel_tol``.)
    """
    k = bs.size
    lo = np.full(k, float(xs[0]))
    hi = np.full(k, float(xs[-1]))
    m = np.full(k, min(max(m0, lo[0]), hi[0]))
    tol = rel_tol * (float(xs[-1] - xs[0]) + abs(m0))
    bm1 = (bs - 1.0)[:, None]
    act = np.arange(k)
    for _ in range(200):
        if act.size == 0:
            break
        ma = m[act]
        d = xs[None, :] - ma[:, None]
        ad = np.abs(d)
        with np.errstate(divide="ignore"):
            q = np.log(ad)
        q *= bm1[act]
        np.exp(q, out=q)  # |d|^(b−1), 0 where d = 0
        t = np.copysign(q, d).sum(axis=1)
        np.divide(q, ad, out=q, where=ad > 0.0)
        u = q.sum(axis=1)
        pos = t > 0.0
        lo[act[pos]] = ma[pos]
        hi[act[t < 0.0]] = ma[t < 0.0]
        la, ha = lo[act], hi[act]
        with np.errstate(all="ignore"):
            mn = ma + t / (bm1[act, 0] * u)
        bad = ~((la < mn) & (mn < ha))
        mn = np.where(bad, 0.5 * (la + ha), mn)
        done = (t == 0.0) | (np.abs(mn - ma) <= tol) | (ha - la <= tol)
        mn = np.where(t == 0.0, ma, mn)
        m[act] = mn
        act = act[~done]
    return m
