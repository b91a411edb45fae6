r"""The regularized incomplete gamma functions :math:`P, Q` at :math:`(1/b, |d|^b)` and :math:`\log Q`.

The tails of the error law are :math:`\tfrac12 Q(1/b, z)` with :math:`z = |d|^b`. These helpers
pick the route **per point first** and call each special function only on its own points:

* shapes 2 and 1: ``erfc(|d|)`` / ``exp(-|d|)`` (Abramowitz & Stegun 6.5.17, 6.5.13);
* body, :math:`z < 1/b + 1`: :math:`Q = 1 - P` with :math:`P` summed from the power series
  (A&S 6.5.29, Numerical Recipes 3rd ed. §6.2 ``gser``)

  .. math::

      P(c, z) = \frac{z^c e^{-z}}{\Gamma(c + 1)}
                \sum_{k \ge 0} \frac{z^k}{(c + 1)(c + 2)\cdots(c + k)},
      \qquad z^c = |d| \text{ exactly},

  which is 3-10x faster than ``scipy.special.gammainc`` there and never underflows for huge
  shapes (``|d|^b`` may underflow, ``|d|`` does not). Where :math:`P > 0.9` (so that ``1 - P``
  would lose digits) ``gammaincc`` is called on those points only;
* tails, :math:`z \ge 1/b + 1`: ``scipy.special.gammaincc`` only;
* far tails, :math:`z \ge 1000\max(1, 1/b)`: :math:`Q` underflows, 0 without a call.

:math:`\log Q` where :math:`Q < 10^{-250}` comes from the asymptotic series for
:math:`z \ge 500 \max(1, 1/b)` (A&S 6.5.32 with 8 terms: truncation below one ulp of the sum) and
from Legendre's continued fraction, by the modified Lentz algorithm with a per-point relative stop
test (Numerical Recipes 3rd ed. §6.2 ``gcf``), in between.
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import NDArray
from scipy import special as sc
from scipy.special import cython_special as _cs

_INF = math.inf
_EPS = 2.220446049250313e-16
#: Below this value of Q the log tail switches from log(Q) to the series / continued fraction.
_Q_SWITCH = 1e-250
#: Q is taken as 1 - P while P <= this (relative error of Q <= 10 eps); beyond it, gammaincc.
_P_SWITCH = 0.9
#: The body series is summed for c = 1/b up to this (b >= 0.25); gammainc beyond (slow series).
_SERIES_C_MAX = 4.0
#: Q(c, z) underflows to 0 for z >= _Z_ZERO * max(1, c).
_Z_ZERO = 1000.0
#: log Q by the asymptotic series for z >= _Z_ASYM * max(1, c) (8 terms below one ulp).
_Z_ASYM = 500.0
_ASYM_TERMS = 8
#: Continued fraction: stop a point when |delta - 1| <= this (a few ulps; delta rounds to 1 +- eps).
_CF_TOL = 4.0 * _EPS
_CF_MAX_ITER = 5000

_gammaincc = sc.gammaincc
_gammainc = sc.gammainc
_gammaln = sc.gammaln


def _scalar_z(d: float, shape: float) -> float:
    try:
        return abs(d) ** shape
    except OverflowError:
        return _INF


# --------------------------------------------------------------------------------------------
# the body series for P
# --------------------------------------------------------------------------------------------
def _series_terms(zmax: float, cmin: float) -> int:
    """Number of terms k with z^k / ((c+1)...(c+k)) < eps / 4 for every z <= zmax, c >= cmin."""
    term, k = 1.0, 0
    while term > 0.25 * _EPS and k < 400:
        k += 1
        term *= zmax / (cmin + k)
    return k


def _p_series(
    zc: NDArray[np.float64], z: NDArray[np.float64], c: float | NDArray[np.float64]
) -> NDArray[np.float64]:
    r""":math:`P(c, z)` by the power series, given ``zc`` :math:`= z^c` (for :math:`z < c + 1`).

    Horner's rule on :math:`1 + \frac{z}{c+1}(1 + \frac{z}{c+2}(1 + \cdots))`; every term is
    positive (no cancellation), so the relative error is a few ulps.
    """
    if z.size == 0:
        return np.empty(0)
    cmin = float(np.min(c))
    k = _series_terms(float(np.max(z)), cmin)
    s = np.ones_like(z)
    for j in range(k, 0, -1):
        s *= z
        s /= c + j
        s += 1.0
    if np.ndim(c) == 0:
        cf = float(c)
        lead = math.exp(-math.lgamma(cf + 1.0))
    else:
        lead = np.exp(-_gammaln(c + 1.0))
    s *= np.exp(-z)
    s *= zc
    s *= lead
    return s


#: zeta(k) * (-1)^k / k, k = 2..11, for log Gamma(1 + c) at small c (A&S 6.1.33).
_LGAMMA1P = [(-1) ** k * float(sc.zeta(k)) / k for k in range(2, 12)]
_EULER_GAMMA = 0.5772156649015329


def _lgamma1p(c: float | NDArray[np.float64]) -> float | NDArray[np.float64]:
    r""":math:`\log\Gamma(1 + c)` with full relative accuracy for :math:`0 < c \le 0.02`.

    :math:`\log\Gamma(1+c) = -\gamma c + \sum_{k\ge2} (-1)^k \zeta(k) c^k / k`
    (Abramowitz & Stegun 6.1.33; 10 terms: truncation below :math:`0.02^{11}`); forming
    ``1 + c`` first would lose :math:`\varepsilon / c` of it. Larger ``c``: ``gammaln(1 + c)``.
    """
    if np.ndim(c) == 0:
        cf = float(c)
        if cf > 0.02:
            return math.lgamma(1.0 + cf)
        acc = 0.0
        for coef in reversed(_LGAMMA1P):
            acc = (acc + coef) * cf
        return (acc - _EULER_GAMMA) * cf
    c = np.asarray(c, dtype=np.float64)
    acc = np.zeros_like(c)
    for coef in reversed(_LGAMMA1P):
        acc = (acc + coef) * c
    return np.where(c > 0.02, _gammaln(1.0 + c), (acc - _EULER_GAMMA) * c)


#: Body points with P > 0.9 and z below this take Q = -expm1(log P) (huge shapes only).
_Z_SMALL = 1e-3


def _q_small_z(
    zc: NDArray[np.float64], z: NDArray[np.float64], c: float | NDArray[np.float64]
) -> NDArray[np.float64]:
    r""":math:`Q = -\operatorname{expm1}(\log P)` for :math:`z < 10^{-3}` and :math:`P > 0.9`.

    This happens only for huge shapes (:math:`c = 1/b < 0.015`), where :math:`z = |d|^b` may
    underflow and ``gammaincc(c, z)`` then returns 1. With
    :math:`\log P = \log z^c - z - \log\Gamma(c+1) + \log S(z)` (A&S 6.5.29) and
    :math:`\log z^c = \log |d|` every term is small and exact to a few ulps, so
    :math:`Q \approx -\log P` keeps full relative accuracy.
    """
    s = np.zeros_like(z)
    for j in range(6, 0, -1):
        s = z / (c + j) * (1.0 + s)
    with np.errstate(divide="ignore"):
        return -np.expm1(np.log(zc) - z - _lgamma1p(c) + np.log1p(s))


# --------------------------------------------------------------------------------------------
# Q on arrays
# --------------------------------------------------------------------------------------------
def _q_array(d: NDArray[np.float64], b: NDArray[np.float64]) -> NDArray[np.float64]:
    """``Q(1/b, |d|**b)`` per point, each route on its own points (see the module docstring)."""
    if b.ndim == 0:
        bv = float(b)
        if bv == 2.0:
            return np.asarray(sc.erfc(np.abs(d)), dtype=np.float64)
        if bv == 1.0:
            return np.exp(-np.abs(d))
    dabs = np.abs(d)
    with np.errstate(over="ignore", under="ignore"):
        z = dabs**b
    if b.ndim == 0:
        return _q_scalar_shape(dabs, z, 1.0 / float(b))
    shape = z.shape
    dabs = np.broadcast_to(dabs, shape).ravel()
    zf = z.ravel()
    c = np.broadcast_to(1.0 / b, shape).ravel()
    q = np.zeros(zf.shape)
    body = zf < c + 1.0
    mid = ~body & ~(zf >= _Z_ZERO * np.maximum(c, 1.0))  # NaN goes here: gammaincc(NaN) = NaN
    if np.any(mid):
        q[mid] = _gammaincc(c[mid], zf[mid])
    if np.any(body):
        ib = np.flatnonzero(body)
        cb, zb = c[ib], zf[ib]
        ser = cb <= _SERIES_C_MAX
        p = np.empty(ib.size)
        if np.any(ser):
            p[ser] = _p_series(dabs[ib][ser], zb[ser], cb[ser])
        if not np.all(ser):
            p[~ser] = _gammainc(cb[~ser], zb[~ser])
        hard = p > _P_SWITCH
        np.subtract(1.0, p, out=p)
        if np.any(hard):
            tiny = hard & (zb < _Z_SMALL)
            p[tiny] = _q_small_z(dabs[ib][tiny], zb[tiny], cb[tiny])
            hard &= ~tiny
            p[hard] = _gammaincc(cb[hard], zb[hard])
        q[ib] = p
    return q.reshape(shape)


def q_power(t: NDArray[np.float64], b: float, k: float) -> NDArray[np.float64]:
    r""":math:`Q(k/b, |t|^b)` for one shape ``b``, with :math:`z^{k/b} = |t|^k` in the body series.

    E.g. ``k = 2`` gives the Expected Shortfall factor :math:`Q(2/b, |t|^b)`; for huge shapes
    :math:`|t|^b` underflows although :math:`P = |t|^2 \ldots` does not.
    """
    tabs = np.abs(np.asarray(t, dtype=np.float64))
    with np.errstate(over="ignore", under="ignore"):
        z = tabs**b
        zc = tabs**k
    return _q_scalar_shape(zc, z, k / b)


def _q_scalar_shape(
    dabs: NDArray[np.float64], z: NDArray[np.float64], c: float
) -> NDArray[np.float64]:
    """:func:`_q_array` for one shape (``c = 1/b``; ``dabs = z**c``), scalar thresholds."""
    if z.ndim == 0:
        return np.asarray(_q_scalar_cz(float(dabs), float(z), c))
    q = np.zeros(z.shape)
    body = z < c + 1.0
    mid = ~body & ~(z >= _Z_ZERO * max(c, 1.0))  # NaN goes here: gammaincc(NaN) = NaN
    if np.any(mid):
        q[mid] = _gammaincc(c, z[mid])
    if np.any(body):
        zb = z[body]
        db = dabs[body]
        p = _p_series(db, zb, c) if c <= _SERIES_C_MAX else _gammainc(c, zb)
        hard = p > _P_SWITCH
        np.subtract(1.0, p, out=p)
        if np.any(hard):
            tiny = hard & (zb < _Z_SMALL)
            if np.any(tiny):
                p[tiny] = _q_small_z(db[tiny], zb[tiny], c)
                hard &= ~tiny
            p[hard] = _gammaincc(c, zb[hard])
        q[body] = p
    return q


# --------------------------------------------------------------------------------------------
# Q on scalars
# --------------------------------------------------------------------------------------------
def _q_scalar_cz(dabs: float, z: float, c: float) -> float:
    """Scalar ``Q(c, z)`` with ``z = dabs**(1/c)`` (same routes as the arrays)."""
    if z < c + 1.0:
        if z < _Z_SMALL:
            # six series terms are exact here; z**c = dabs avoids the underflow of z
            if dabs == 0.0:
                return 1.0
            s = 0.0
            for j in range(6, 0, -1):
                s = z / (c + j) * (1.0 + s)
            log_p = math.log(dabs) - z - _lgamma1p(c) + math.log1p(s)
            return -math.expm1(log_p) if log_p > -0.1 else 1.0 - math.exp(log_p)
        p = float(_cs.gammainc(c, z))
        if p <= _P_SWITCH:
            return 1.0 - p
    elif z >= _Z_ZERO * max(c, 1.0):
        return 0.0
    return float(_cs.gammaincc(c, z))


def _q_scalar(d: float, shape: float) -> float:
    """Upper tail mass ``Q(1/b, |d|**b)`` for a standardised offset ``d`` (scalar).

    Shape 2 uses ``erfc(|d|)`` and shape 1 ``exp(-|d|)`` (exact identities for Q(1/2, d^2) and
    Q(1, |d|), Abramowitz & Stegun 6.5.17 and 6.5.13). Other shapes: ``1 - P`` in the body
    (``z < 1/b + 1`` and ``P <= 0.9``: relative error of ``Q`` <= 10 eps), ``gammaincc`` in
    the tails; the array path makes the same choice.
    """
    if shape == 2.0:
        return math.erfc(abs(d))
    if shape == 1.0:
        return math.exp(-abs(d))
    dabs = abs(d)
    try:
        z = dabs**shape
    except OverflowError:
        return 0.0
    return _q_scalar_cz(dabs, z, 1.0 / shape)


# --------------------------------------------------------------------------------------------
# log Q where Q underflows
# --------------------------------------------------------------------------------------------
def _log_q_asym(a: NDArray[np.float64], z: NDArray[np.float64]) -> NDArray[np.float64]:
    r""":math:`\log Q(a, z)` by the asymptotic series, for :math:`z \ge 500\max(1, a)`.

    .. math::

        \Gamma(a, z) \sim z^{a-1} e^{-z} \sum_{k \ge 0} \frac{(a-1)(a-2)\cdots(a-k)}{z^k}

    (Abramowitz & Stegun 6.5.32). With 8 terms the first omitted one is below
    :math:`\max(1, a)^8 \cdot 9! / z^8 < 10^{-16}` of the sum. ``z = inf`` gives ``-inf``.
    """
    with np.errstate(divide="ignore", invalid="ignore"):
        r = 1.0 / z
        s = np.zeros_like(z)
        for j in range(_ASYM_TERMS, 0, -1):
            s = (a - j) * r * (1.0 + s)
        out = (a - 1.0) * np.log(z) - z - _gammaln(a) + np.log1p(s)
    return np.where(np.isinf(z), -_INF, out)


def _log_q_cf(a: NDArray[np.float64], z: NDArray[np.float64]) -> NDArray[np.float64]:
    r""":math:`\log Q(a, z)` by Legendre's continued fraction (valid and fast for z > a + 1).

    .. math::

        Q(a, z) = \frac{e^{-z} z^a}{\Gamma(a)}
        \cfrac{1}{z + 1 - a - \cfrac{1 \cdot (1 - a)}{z + 3 - a - \cfrac{2 (2 - a)}{z + 5 - a - \cdots}}}

    evaluated with the modified Lentz algorithm (Numerical Recipes, 3rd ed., §6.2, ``gcf``).
    Each point stops on its own once :math:`|\delta - 1| \le 4\varepsilon` (the factor
    :math:`\delta` rounds to :math:`1 \pm \varepsilon`, so an absolute test below one ulp would
    never stop); converged points leave the working set. The result is
    :math:`a \log z - z - \log\Gamma(a) + \log h`, finite where :math:`Q` itself underflows.
    ``z = inf`` gives ``-inf``.
    """
    a = np.asarray(a, dtype=np.float64)
    z = np.asarray(z, dtype=np.float64)
    out = np.full(z.shape, -_INF)
    fin = np.flatnonzero(np.isfinite(z))
    if fin.size == 0:
        return out
    af, zf = a.ravel()[fin] if a.ndim else np.full(fin.size, float(a)), z.ravel()[fin]
    tiny = 1e-300
    h_all = np.empty(fin.size)
    idx = np.arange(fin.size)
    aw = af
    bb = zf + 1.0 - aw
    c = np.full(zf.shape, 1.0 / tiny)
    d = 1.0 / bb
    h = d.copy()
    for i in range(1, _CF_MAX_ITER):
        an = -i * (i - aw)
        bb = bb + 2.0
        d = an * d + bb
        d = np.where(np.abs(d) < tiny, tiny, d)
        c = bb + an / c
        c = np.where(np.abs(c) < tiny, tiny, c)
        d = 1.0 / d
        delta = d * c
        h = h * delta
        done = np.abs(delta - 1.0) <= _CF_TOL
        if np.all(done):
            break
        if np.any(done):
            h_all[idx[done]] = h[done]
            keep = ~done
            idx, aw, bb, c, d, h = idx[keep], aw[keep], bb[keep], c[keep], d[keep], h[keep]
    h_all[idx] = h
    flat = out.ravel()
    flat[fin] = af * np.log(zf) - zf - _gammaln(af) + np.log(h_all)
    return flat.reshape(z.shape)


def _log_q_small(a: NDArray[np.float64], z: NDArray[np.float64]) -> NDArray[np.float64]:
    """``log Q(a, z)`` where ``Q < 1e-250``: asymptotic series far out, continued fraction nearer."""
    asym = z >= _Z_ASYM * np.maximum(a, 1.0)
    if np.all(asym):
        return _log_q_asym(a, z)
    out = np.empty(z.shape)
    out[asym] = _log_q_asym(a[asym], z[asym])
    out[~asym] = _log_q_cf(a[~asym], z[~asym])
    return out


def _log_q_array(
    d: NDArray[np.float64], b: NDArray[np.float64]
) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """``(Q, log Q)`` of ``Q(1/b, |d|**b)``; the log stays finite where ``Q`` underflows."""
    q = _q_array(d, b)
    with np.errstate(divide="ignore"):
        out = np.log(q)
    small = q < _Q_SWITCH
    if np.any(small):
        bs = np.broadcast_to(b, q.shape)[small]
        with np.errstate(over="ignore"):
            zb = np.abs(np.broadcast_to(d, q.shape)[small]) ** bs
        out[small] = _log_q_small(1.0 / bs, zb)
    return q, out


def _log_q_scalar(d: float, shape: float) -> tuple[float, float]:
    """Scalar ``(Q, log Q)`` of ``Q(1/b, |d|**b)``."""
    q = _q_scalar(d, shape)
    if q >= _Q_SWITCH:
        return q, math.log(q)
    z = _scalar_z(d, shape)
    if z == _INF:
        return q, -_INF
    a = 1.0 / shape
    if z >= _Z_ASYM * max(a, 1.0):
        s = 0.0
        for j in range(_ASYM_TERMS, 0, -1):
            s = (a - j) / z * (1.0 + s)
        return q, (a - 1.0) * math.log(z) - z - math.lgamma(a) + math.log1p(s)
    return q, _log_q_cf_scalar(a, z)


def _log_q_cf_scalar(a: float, z: float) -> float:
    """Scalar :func:`_log_q_cf` in plain floats (same recurrence and stop test)."""
    tiny = 1e-300
    bb = z + 1.0 - a
    c = 1.0 / tiny
    d = 1.0 / bb
    h = d
    for i in range(1, _CF_MAX_ITER):
        an = -i * (i - a)
        bb += 2.0
        d = an * d + bb
        if abs(d) < tiny:
            d = tiny
        c = bb + an / c
        if abs(c) < tiny:
            c = tiny
        d = 1.0 / d
        delta = d * c
        h *= delta
        if abs(delta - 1.0) <= _CF_TOL:
            break
    return a * math.log(z) - z - math.lgamma(a) + math.log(h)
