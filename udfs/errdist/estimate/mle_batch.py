"""Exact maximum-likelihood fits of the generalized normal law for many samples at once.

The bootstrap of :mod:`errdist.checks.goodness` refits hundreds of simulated samples of the same
size. Here the search of :func:`errdist.estimate.mle._mle_sorted` runs on all rows of a (rows × n)
array of sorted samples at once, every step a numpy operation over the rows still searching
(row compaction for the rows already done), so the per-call overhead of the one-row fit is
paid once per step instead of once per row and step.

Same law, likelihood and search as :mod:`errdist.estimate.mle` (Nadarajah 2005, "A generalized
normal distribution", J. Applied Statistics 32(7):685-694): with S_b(m) = Σ|xᵢ−m|^b the
profile log-likelihood is

    ℓ(m, b) = n[ln b − ln 2 − ln Γ(1/b) − (1/b)·ln((b/n)·S_b(m)) − 1/b],

and the scale is a = ((b/n)·S_b(m))^(1/b).

1. Start shape b₀ > 1: joint Newton in (m, u = ln b) from the median, with the analytic
   derivatives and step halving of :func:`errdist.estimate.mle._joint_newton`.
2. Rows where that does not converge (or b₀ ≤ 1): alternate the exact shape for the current
   location (bracketed Newton in u) and the exact location for the current shape (b > 1:
   safeguarded Newton / Illinois false position on T(m) = Σ sign(x−m)|x−m|^(b−1), bracketed
   between two neighbouring observations; b ≤ 1: the best observation within 0.2·√n/b + 8
   ranks of the current location, every observation when n ≤ 400), until the location no
   longer moves. Away from the current location, S_b and T come from a far-field series
   (:class:`_Local`), so a location step costs little more than one pass over the data.

Every row where the batched search is not certain — Newton or the alternation did not
converge, the shape hit SHAPE_MIN or SHAPE_MAX, the best observation is still near the edge
of the searched window after six re-centred windows, the far-field series of a window would
need too many terms, an exact tie spoils a Newton step, or the row is one of the last 8
still alternating — is refitted by :func:`errdist.estimate.mle._mle_sorted` itself. The tests
check on thousands of simulated rows that the log-likelihood is never below the one-by-one
fit's (minus 1e-9).
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import NDArray
from scipy.special import gammaln, psi, zeta

from errdist.estimate.mle import SHAPE_MAX, SHAPE_MIN, _mle_sorted

__all__ = ["mle_sorted_rows"]

_U_MIN = math.log(SHAPE_MIN)
_U_MAX = math.log(SHAPE_MAX)
_LOG2 = math.log(2.0)
_EXHAUSTIVE_N = 400  # as errdist.estimate.mle: below this, b <= 1 searches every observation
_HALF_WINDOW = 8
_ZERO_LOG = -1e300  # stands for ln 0 (exp(b·it) = 0 and 0·it = 0, without NaN)
_BLOCK = 1 << 16  # elements of one (rows × candidates × observations) block (cache-sized)
_SERIES_EPS = 1e-16  # far-field series: relative truncation error per observation
_RHO_MIN = 3.0  # nearest far observation at least this many window half-widths away
_RECENTRE = 6  # b <= 1 window searches per location step (re-centred on the best)
_NEAR_MULT = 7  # near observations: this many window widths (direct sums)
_MAX_TERMS = 60  # longest far-field series
_TAIL_ROWS = 8  # rows left in the alternation that are handed to the one-row fit
_NEWTON_PASSES = 30  # joint Newton passes before a row moves on to the alternation

FloatArray = NDArray[np.float64]


def mle_sorted_rows(
    xs: FloatArray, start_shape: float | None = None
) -> tuple[FloatArray, FloatArray, FloatArray, FloatArray]:
    """Maximum-likelihood (loc, scale, shape, loglik) of every row of sorted samples.

    Parameters
    ----------
    xs : ndarray, shape (rows, n)
        Finite samples, each row sorted ascending and not constant (no checks: internal
        entry point, like :func:`errdist.estimate.mle._mle_sorted`).
    start_shape : float or None
        Shape where the search starts (clipped to [SHAPE_MIN, SHAPE_MAX]); None: the moment
        estimate of each row, as :func:`errdist.estimate.mle._mle_sorted`.

    Returns
    -------
    loc, scale, shape, loglik : ndarray, shape (rows,)
        The exact MLE of each row: log-likelihood at least that of
        :func:`errdist.estimate.mle._mle_sorted` on the row, minus rounding (the tests use 1e-9).
    """
    xs = np.ascontiguousarray(xs, dtype=float)
    rows, n = xs.shape
    loc = np.full(rows, np.nan)
    shape = np.full(rows, np.nan)
    if start_shape is None:
        # the moment start differs per row: the one-by-one fit is simplest and exact
        return _fallback(xs, np.arange(rows), None, loc, shape)
    b0 = min(max(float(start_shape), SHAPE_MIN), SHAPE_MAX)
    half = n // 2
    med = xs[:, half] if n % 2 else 0.5 * (xs[:, half - 1] + xs[:, half])
    tol = 1e-15 * (xs[:, -1] - xs[:, 0] + np.abs(med))
    m = med.copy()
    b = np.full(rows, b0)
    todo = np.arange(rows)
    with np.errstate(all="ignore"):
        if b0 > 1.0:
            m, b, ok = _joint_newton(xs, m, b)
            loc[ok], shape[ok] = m[ok], b[ok]
            todo = np.flatnonzero(~ok)
        if todo.size:
            lm, lb, ok = _alternate(xs[todo], m[todo], b[todo], b0, tol[todo])
            loc[todo[ok]], shape[todo[ok]] = lm[ok], lb[ok]
        done = np.flatnonzero(np.isfinite(loc))
        scale = np.full(rows, np.nan)
        ll = np.full(rows, np.nan)
        if done.size:
            scale[done], ll[done] = _finish(xs[done], loc[done], shape[done])
            bad = ~(np.isfinite(ll[done]) & (scale[done] > 0.0))
            loc[done[bad]] = np.nan
    rest = np.flatnonzero(~np.isfinite(loc))
    if rest.size:
        _fallback(xs, rest, b0, loc, shape, scale, ll)
    return loc, scale, shape, ll


# --------------------------------------------------------------------------------------------
# Pieces
# --------------------------------------------------------------------------------------------


def _fallback(
    xs: FloatArray,
    idx: NDArray[np.intp],
    b0: float | None,
    loc: FloatArray,
    shape: FloatArray,
    scale: FloatArray | None = None,
    ll: FloatArray | None = None,
) -> tuple[FloatArray, FloatArray, FloatArray, FloatArray]:
    """Fit rows ``idx`` one by one with :func:`errdist.estimate.mle._mle_sorted` (in place)."""
    if scale is None or ll is None:
        scale = np.full(loc.size, np.nan)
        ll = np.full(loc.size, np.nan)
    for r in idx:
        loc[r], scale[r], shape[r], ll[r] = _mle_sorted(xs[r], b0)
    return loc, scale, shape, ll


def _profile(s0: FloatArray, n: int, b: FloatArray) -> FloatArray:
    """ℓ(m, b) from S0 = S_b(m), row-wise."""
    inv = 1.0 / b
    return n * (np.log(b) - _LOG2 - gammaln(inv) - np.log(b * s0 / n) * inv - inv)


def _finish(xs: FloatArray, m: FloatArray, b: FloatArray) -> tuple[FloatArray, FloatArray]:
    """(scale, ℓ) with the closed-form scale a = ((b/n)·S_b(m))^(1/b)."""
    n = xs.shape[1]
    p = _log_abs(xs, m)
    p *= b[:, None]
    np.exp(p, out=p)
    s0 = p.sum(axis=1)
    return (b * s0 / n) ** (1.0 / b), _profile(s0, n, b)


def _log_abs(xs: FloatArray, m: FloatArray) -> FloatArray:
    """ln|x−m| row-wise, with _ZERO_LOG where x equals m."""
    lg = np.subtract(xs, m[:, None])
    np.abs(lg, out=lg)
    np.log(lg, out=lg)
    np.maximum(lg, _ZERO_LOG, out=lg)
    return lg


def _joint_newton(
    xs: FloatArray, m: FloatArray, b: FloatArray
) -> tuple[FloatArray, FloatArray, NDArray[np.bool_]]:
    """Row-wise :func:`errdist.estimate.mle._joint_newton`: Newton on ℓ(m, u = ln b), step halving.

    Returns (m, b, converged); rows not converged carry the point where they stopped (the
    last accepted point when halving failed), as the one-row version does.
    """
    rows, n = xs.shape
    m, b = m.copy(), b.copy()
    best = np.full(rows, -np.inf)
    base_m, base_b = m.copy(), b.copy()
    step_m = np.zeros(rows)
    step_u = np.zeros(rows)
    halvings = np.zeros(rows, dtype=np.int64)
    ok = np.zeros(rows, dtype=bool)
    act = np.arange(rows)
    for _ in range(_NEWTON_PASSES):
        if act.size == 0:
            break
        x = xs if act.size == rows else xs[act]
        ma, ba = m[act], b[act]
        d = np.subtract(x, ma[:, None])
        lg = np.abs(d)
        np.log(lg, out=lg)  # −inf at an exact tie: T, U turn NaN and the row gives up
        p = lg * ba[:, None]
        np.exp(p, out=p)
        s0 = p.sum(axis=1)
        ll = _profile(s0, n, ba)
        bst = best[act]
        worse = ~(ll >= bst - 1e-13 * np.abs(bst))
        # rows whose full step lowered ℓ: halve it from the last accepted point (6 times)
        hw = act[worse]
        give_up = hw[halvings[hw] >= 6]
        m[give_up], b[give_up] = base_m[give_up], base_b[give_up]
        hw = hw[halvings[hw] < 6]
        halvings[hw] += 1
        step_m[hw] *= 0.5
        step_u[hw] *= 0.5
        m[hw] = base_m[hw] + step_m[hw]
        b[hw] = base_b[hw] * np.exp(step_u[hw])
        keep = ~worse
        a = act[keep]
        ma, ba, s0 = ma[keep], ba[keep], s0[keep]
        halvings[a] = 0
        best[a], base_m[a], base_b[a] = ll[keep], ma, ba
        if a.size < act.size:  # derivatives only where the step was accepted
            d, lg, p = d[keep], lg[keep], p[keep]
        w = p * lg
        s1 = w.sum(axis=1)
        s2 = np.einsum("ij,ij->i", w, lg)
        np.divide(p, d, out=w)  # sign(d)|d|^(b−1)
        t = w.sum(axis=1)
        v = np.einsum("ij,ij->i", w, lg)
        np.divide(w, d, out=w)  # |d|^(b−2)
        uu = w.sum(axis=1)
        inv = 1.0 / ba
        r1 = s1 / s0
        c = psi(inv) + np.log(ba * s0 / n)
        g_u = 1.0 + c * inv - r1
        g_m = t / s0
        h_uu = -c * inv - zeta(2.0, inv) * inv * inv + inv + r1 - ba * (s2 / s0 - r1 * r1)
        h_mm = -(ba - 1.0) * uu / s0 + ba * g_m * g_m
        h_um = ba * v / s0 - ba * r1 * g_m
        det = h_mm * h_uu - h_um * h_um
        dm = -(h_uu * g_m - h_um * g_u) / det
        du = -(h_mm * g_u - h_um * g_m) / det
        u = np.log(ba) + du
        fine = (h_mm < 0.0) & (h_uu < 0.0) & (det > 0.0) & (u > 0.0) & (u > _U_MIN) & (u < _U_MAX)
        # rows that give up keep (m, b) of this pass
        step_m[a], step_u[a] = dm, du
        go = a[fine]
        m[go] = ma[fine] + dm[fine]
        b[go] = np.exp(u[fine])
        scale = (ba * s0 / n) ** inv
        conv = fine & (np.abs(dm) <= 1e-8 * scale) & (np.abs(du) <= 1e-8)
        ok[a[conv]] = True
        still = np.zeros(rows, dtype=bool)
        still[hw] = True
        still[a[fine & ~conv]] = True
        act = np.flatnonzero(still)
    return m, b, ok


def _shape_given_loc(lg: FloatArray, b0: FloatArray) -> tuple[FloatArray, NDArray[np.bool_]]:
    """Row-wise :func:`errdist.estimate.mle._shape_given_loc` (bracketed Newton in u = ln b).

    ``lg`` holds ln|xᵢ−m| with _ZERO_LOG at ties. Returns (b, certain); rows whose
    maximum is at SHAPE_MIN or SHAPE_MAX, or that did not converge, are not certain.
    """
    rows, n = lg.shape
    u = np.clip(np.log(b0), _U_MIN, _U_MAX)
    u_lo = np.full(rows, _U_MIN)
    u_hi = np.full(rows, _U_MAX)
    lo_t = np.zeros(rows, dtype=bool)
    hi_t = np.zeros(rows, dtype=bool)
    out = np.exp(u)
    ok = np.zeros(rows, dtype=bool)
    act = np.arange(rows)
    for _ in range(100):
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
        at_bound = (pos & (ua >= _U_MAX)) | (~pos & (ua <= _U_MIN))  # → not certain
        guu = -c * inv - zeta(2.0, inv) * inv * inv + inv + r1 - ba * var
        with np.errstate(all="ignore"):
            un = np.where(guu < 0.0, ua - gu / guu, np.nan)
        lo, hi = u_lo[act], u_hi[act]
        inside = (lo < un) & (un < hi)
        to_max = ~inside & ~(un < hi) & ~hi_t[act]
        to_min = ~inside & ~to_max & ~(un > lo) & ~lo_t[act]
        un = np.where(
            inside, un, np.where(to_max, _U_MAX, np.where(to_min, _U_MIN, 0.5 * (lo + hi)))
        )
        # only a short Newton step (not a bisection midpoint) settles a row, as in mle.py
        conv = ~at_bound & inside & (np.abs(un - ua) <= 1e-7)
        out[act[conv]] = np.exp(un[conv])
        ok[act[conv]] = True
        u[act] = un
        act = act[~conv & ~at_bound]
    return out, ok


def _root_step(
    act: NDArray[np.int64],
    ma: FloatArray,
    t: FloatArray,
    uu: FloatArray,
    bm1: FloatArray,
    m: FloatArray,
    lo: FloatArray,
    hi: FloatArray,
    t_lo: FloatArray,
    t_hi: FloatArray,
    side: NDArray[np.int64],
    last: FloatArray,
    ok: NDArray[np.bool_],
    tol: FloatArray,
) -> NDArray[np.int64]:
    """One safeguarded Newton step on T(m) = Σ sign(x−m)|x−m|^(b−1) for the active rows.

    ``t`` = T(ma) and ``uu`` = Σ|x−ma|^(b−2) of the active rows ``act``. Updates the bracket
    [lo, hi] with T's values at its ends (halved on the stale side: Illinois false position),
    takes the Newton step when it stays inside the bracket and shrinks by half at least,
    otherwise false position (bisection when that stalls or one end is still open), and
    writes m, last and ok in place. Returns the rows still active.
    """
    zero = t == 0.0
    ok[act[zero]] = True
    pos = t > 0.0
    neg = ~pos & ~zero
    ia = act[pos]
    lo[ia], t_lo[ia] = ma[pos], t[pos]
    ill = ia[side[ia] > 0]
    t_hi[ill] *= 0.5
    side[ia] = 1
    ib = act[neg]
    hi[ib], t_hi[ib] = ma[neg], t[neg]
    ill = ib[side[ib] < 0]
    t_lo[ill] *= 0.5
    side[ib] = -1
    la, ha, tla, tha = lo[act], hi[act], t_lo[act], t_hi[act]
    with np.errstate(all="ignore"):
        mn = np.where(uu > 0.0, ma + t / (bm1[act] * uu), np.nan)
        bad = ~((la < mn) & (mn < ha)) | (np.abs(mn - ma) > 0.5 * last[act])
        both = np.isfinite(tla) & np.isfinite(tha)
        mf = la + (ha - la) * tla / (tla - tha)
    mid = 0.5 * (la + ha)
    mf = np.where((la < mf) & (mf < ha), mf, mid)
    mf = np.where(~((la < mf) & (mf < ha)) | (np.abs(mf - ma) < 1e-3 * (ha - la)), mid, mf)
    out_br = ~((la < mn) & (mn < ha))
    mn = np.where(bad & both, mf, np.where(bad & out_br, mid, mn))
    step = np.abs(mn - ma)
    m[act[~zero]] = mn[~zero]
    conv = ~zero & ((step <= tol[act]) | (ha - la <= tol[act]))
    ok[act[conv]] = True
    last[act] = step
    return act[~zero & ~conv]


def _loc_smooth(
    xs: FloatArray, b: FloatArray, m0: FloatArray, tol: FloatArray
) -> tuple[FloatArray, NDArray[np.bool_]]:
    """Row-wise :func:`errdist.estimate.mle._loc_smooth`: root of T(m) = Σ sign(x−m)|x−m|^(b−1).

    Newton steps safeguarded by a bracket of the root and by false position (Illinois).
    Returns (m, converged).
    """
    rows = xs.shape[0]
    lo, hi = xs[:, 0].copy(), xs[:, -1].copy()
    t_lo = np.full(rows, np.inf)
    t_hi = np.full(rows, -np.inf)
    m = np.clip(m0, lo, hi)
    bm1 = b - 1.0
    last = np.full(rows, np.inf)
    side = np.zeros(rows, dtype=np.int64)
    ok = np.zeros(rows, dtype=bool)
    act = np.arange(rows)
    for _ in range(200):
        if act.size == 0:
            break
        x = xs if act.size == rows else xs[act]
        ma = m[act]
        d = np.subtract(x, ma[:, None])
        ad = np.abs(d)
        q = np.log(ad)
        q *= bm1[act][:, None]
        np.exp(q, out=q)  # |x−m|^(b−1), 0 at ties
        t = np.copysign(q, d).sum(axis=1)
        np.divide(q, ad, out=q, where=ad > 0.0)
        uu = q.sum(axis=1)
        act = _root_step(act, ma, t, uu, bm1, m, lo, hi, t_lo, t_hi, side, last, ok, tol)
    return m, ok


def _search_half(n: int, b: FloatArray) -> NDArray[np.int64]:
    """Half-width (ranks) of the b ≤ 1 candidate search: 0.2·√n/b + 8."""
    return np.ceil(0.2 * math.sqrt(n) / b).astype(np.int64) + _HALF_WINDOW


class _Local:
    """S_b near the current location of every row: exact near part plus far-field series.

    A window of 2h+1 consecutive candidate observations centred on the current location (h
    from the caller: the b ≤ 1 search uses at least the one-row search's 0.2·√n/b + 8). S_b
    at a point m of the window is the direct sum over the 7(2h+1) observations centred on the
    window plus, for the observations farther out, the binomial series in the offset
    δ = m − c from the window centre c,

        Σ_far |D−δ|^b = Σ_k C(b,k) (−δ)^k F_k,   F_k = Σ_far |D|^b D^(−k),  D = x − c.

    With ρ = |D| / (window half-width in value) and cmax ≥ |C(b, k)|, an observation leaves
    out at most cmax·ρ^−k/(1 − 1/ρ) of its own |D|^b after k terms; it gets the terms while
    1.5·cmax·60·ρ^−k ≥ 1e-16 (banded: far observations stop early; the factor 60 covers the
    derivative series for T, whose term k carries a factor k). Rows whose nearest far
    observation has ρ below 3 are not ``sure``.
    """

    def __init__(self, xs: FloatArray, b: FloatArray, m0: FloatArray, h: int) -> None:
        rows, n = xs.shape
        self.b = b
        size = min(2 * h + 1, n)
        self.h, self.size = h, size
        ridx = np.arange(rows)
        self.ridx = ridx
        j = np.minimum(np.count_nonzero(xs < m0[:, None], axis=1), n - 1)
        lo = np.clip(j - h, 0, n - size)
        self.lo, self.at_lo, self.at_hi = lo, lo == 0, lo + size == n
        self.cand = xs[ridx[:, None], lo[:, None] + np.arange(size)]
        c = xs[ridx, lo + size // 2]
        self.c = c
        w = np.maximum(c - self.cand[:, 0], self.cand[:, -1] - c)
        nsize = min(_NEAR_MULT * size, n)
        nlo = np.clip(lo + size // 2 - nsize // 2, 0, n - nsize)
        nhi = nlo + nsize
        self.near = xs[ridx[:, None], nlo[:, None] + np.arange(nsize)]
        left = np.where(nlo > 0, c - xs[ridx, np.maximum(nlo - 1, 0)], np.inf)
        right = np.where(nhi < n, xs[ridx, np.minimum(nhi, n - 1)] - c, np.inf)
        rho = np.minimum(left, right) / w
        self.sure = (rho >= _RHO_MIN) & (w > 0.0)
        self.coef = np.zeros((rows, 2))
        self.dcoef: tuple[FloatArray, FloatArray] | None = None
        if nsize == n:
            return
        rho_min = max(float(np.min(rho[self.sure])) if np.any(self.sure) else _RHO_MIN, _RHO_MIN)
        # binomial factors C(b, k)·(−1)^k of every row, up to the largest useful order
        beta = np.ones((rows, _MAX_TERMS + 1))
        for k in range(1, _MAX_TERMS + 1):
            beta[:, k] = beta[:, k - 1] * (-(b - k + 1.0) / k)
        # an observation at ρ = |D|/w leaves out at most cmax·ρ^−k/(1 − 1/ρ) of its own term
        # |D|^b after k terms (cmax bounds |C(b, j)|); its terms stop at the first k where
        # that is below _SERIES_EPS / _MAX_TERMS (the T series multiplies term k by k)
        cmax = max(float(np.max(np.abs(beta))), 1.0)
        log_need = math.log(1.5 * cmax * _MAX_TERMS / _SERIES_EPS)
        terms = min(int(math.ceil(log_need / math.log(rho_min))), _MAX_TERMS)
        near_at = (ridx[:, None], nlo[:, None] + np.arange(nsize))
        dd = xs - c[:, None]
        dd[near_at] = np.inf  # near observations: out of the series (r = 0, weight zeroed)
        r = 1.0 / dd
        t = np.abs(dd)
        colmin = np.min(t, axis=0) / float(np.max(w))  # ≤ ρ of every far observation per column
        np.log(t, out=t)  # far observations are not at c: no log 0
        t *= b[:, None]
        np.exp(t, out=t)
        t[near_at] = 0.0
        coef = np.zeros((rows, terms + 1))
        coef[:, 0] = t.sum(axis=1)
        lo_col, hi_col = 0, n
        for k in range(1, terms + 1):
            # columns holding an observation that still needs term k (nested, shrinking)
            need = np.flatnonzero(colmin[lo_col:hi_col] < math.exp(log_need / k))
            if need.size == 0:
                break
            lo_col, hi_col = lo_col + int(need[0]), lo_col + int(need[-1]) + 1
            tv = t[:, lo_col:hi_col]
            tv *= r[:, lo_col:hi_col]
            coef[:, k] = beta[:, k] * tv.sum(axis=1)
        self.coef = coef

    def far_s(self, m: FloatArray) -> FloatArray:
        """Far part of S_b at points m (rows × points): Σ_k coef_k δ^k."""
        return _series(m - self.c[:, None], self.coef)

    def _derivative_coefs(self) -> tuple[FloatArray, FloatArray]:
        """Series coefficients of the far parts of T = −(1/b)·S′ and T′ = −(1/b)·S″."""
        if self.dcoef is None:
            k = np.arange(self.coef.shape[1], dtype=float)
            inv = (-1.0 / self.b)[:, None]
            self.dcoef = (
                self.coef[:, 1:] * k[1:] * inv,
                self.coef[:, 2:] * (k[2:] * k[1:-1]) * inv,
            )
        return self.dcoef

    def far_t_grid(self, m: FloatArray) -> FloatArray:
        """Far part of T at points m (rows × points)."""
        return _series(m - self.c[:, None], self._derivative_coefs()[0])

    def far_t(self, m: FloatArray, idx: NDArray[np.intp]) -> tuple[FloatArray, FloatArray]:
        """Far parts of T and T′ at one point m per row ``idx``."""
        d1, d2 = (v[idx] for v in self._derivative_coefs())
        powers = np.vander(m - self.c[idx], d1.shape[1], increasing=True)
        return np.einsum("rk,rk->r", powers, d1), np.einsum("rk,rk->r", powers[:, :-1], d2)


def _series(delta: FloatArray, coef: FloatArray) -> FloatArray:
    """Σ_k coef[r, k]·delta[r, p]^k for every row r and point p."""
    rows, npts = delta.shape
    powers = np.vander(delta.ravel(), coef.shape[1], increasing=True).reshape(rows, npts, -1)
    return np.einsum("rpk,rk->rp", powers, coef)


def _pair_sums(pts: FloatArray, obs: FloatArray, e: FloatArray, signed: bool = False) -> FloatArray:
    """Σ_j |obs_j − pts_i|^e (or Σ_j sign(obs_j − pts_i)|obs_j − pts_i|^e) per row and point.

    ``pts`` (rows × points), ``obs`` (rows × m), ``e`` (rows,) > 0; a pair at distance 0 adds
    0. Evaluated in cache-sized blocks of rows.
    """
    rows, npts = pts.shape
    m = obs.shape[1]
    out = np.empty((rows, npts))
    step = max(1, _BLOCK // (npts * m))
    buf = np.empty(min(step, rows) * npts * m)
    sgn = np.empty_like(buf) if signed else None
    for k in range(0, rows, step):
        r = min(step, rows - k)
        dist = buf[: r * npts * m].reshape(r, npts, m)
        np.subtract(obs[k : k + r, None, :], pts[k : k + r, :, None], out=dist)
        if sgn is not None:
            sg = sgn[: r * npts * m].reshape(r, npts, m)
            np.sign(dist, out=sg)
        np.abs(dist, out=dist)
        np.log(dist, out=dist)  # −inf at distance 0: exp(−inf·e) = 0
        dist *= e[k : k + r, None, None]
        np.exp(dist, out=dist)
        if sgn is not None:
            dist *= sg
        dist.sum(axis=2, out=out[k : k + r])
    return out


def _near_pow(near: FloatArray, pts: FloatArray, e: FloatArray) -> tuple[FloatArray, FloatArray]:
    """(d, |d|^e) with d = near − pts for rows × points × near; 0 where d = 0 (e > 0)."""
    d = near[:, None, :] - pts[:, :, None]
    q = np.abs(d)
    with np.errstate(divide="ignore"):
        np.log(q, out=q)
    q *= e[:, None, None]
    np.exp(q, out=q)
    return d, q


def _loc_discrete(
    xs: FloatArray, b: FloatArray, m0: FloatArray, h: int
) -> tuple[FloatArray, NDArray[np.bool_]]:
    """Best observation for b ≤ 1, row-wise (S_b is concave between observations).

    n ≤ 400: every observation (exhaustive, as the one-row search). Otherwise the candidates
    of a :class:`_Local` window. While the best candidate lies within h/2 ranks of a window
    edge that is not the end of the sample, the window is centred again on it (up to 6
    windows; then the row is not certain, returned False).
    """
    rows, n = xs.shape
    if n <= _EXHAUSTIVE_N:
        best = np.argmin(_pair_sums(xs, xs, b), axis=1)
        return xs[np.arange(rows), best], np.ones(rows, dtype=bool)
    m = m0.copy()
    sure = np.zeros(rows, dtype=bool)
    act = np.arange(rows)
    for _ in range(_RECENTRE):
        mw, fine, edge = _window_best(xs[act], b[act], m[act], h)
        m[act] = mw
        sure[act] = fine & ~edge
        act = act[fine & edge]  # best near an inner edge: search again around it
        if act.size == 0:
            break
    return m, sure


def _window_best(
    xs: FloatArray, b: FloatArray, m0: FloatArray, h: int
) -> tuple[FloatArray, NDArray[np.bool_], NDArray[np.bool_]]:
    """Best candidate of a :class:`_Local` window: (m, series fine, near an inner edge)."""
    loc = _Local(xs, b, m0, h)
    s = loc.far_s(loc.cand)
    s += _pair_sums(loc.cand, loc.near, b)
    best = np.argmin(s, axis=1)
    margin = loc.h // 2
    edge_lo = (best < margin) & ~loc.at_lo
    edge_hi = (loc.size - 1 - best < margin) & ~loc.at_hi
    return loc.cand[loc.ridx, best], loc.sure, edge_lo | edge_hi


def _loc_smooth_local(
    xs: FloatArray, b: FloatArray, m0: FloatArray, tol: FloatArray
) -> tuple[FloatArray, NDArray[np.bool_]]:
    """Root of T(m) = Σ sign(x−m)|x−m|^(b−1) for b > 1 through a :class:`_Local` model.

    T is decreasing (S_b convex); its values at the window's observations give a bracket
    [x_k, x_k+1] of the root, inside which the safeguarded Newton / Illinois iteration of
    :func:`_loc_smooth` runs on the near observations plus the far-field series. Rows whose
    root is not inside the window are not certain (returned False).
    """
    rows, n = xs.shape
    if n <= _EXHAUSTIVE_N:
        return _loc_smooth(xs, b, m0, tol)
    loc = _Local(xs, b, m0, _HALF_WINDOW)
    bm1 = b - 1.0
    tc = loc.far_t_grid(loc.cand)
    tc += _pair_sums(loc.cand, loc.near, bm1, signed=True)
    above = np.count_nonzero(tc > 0.0, axis=1)  # T decreasing: candidates left of the root
    sure = loc.sure & (above > 0) & (above < loc.size)
    k = np.clip(above, 1, loc.size - 1)
    lo = loc.cand[loc.ridx, k - 1].copy()
    hi = loc.cand[loc.ridx, k].copy()
    t_lo = tc[loc.ridx, k - 1].copy()
    t_hi = tc[loc.ridx, k].copy()
    m = np.clip(m0, lo, hi)
    exact = t_hi == 0.0
    m[exact] = hi[exact]
    ok = exact & sure
    last = np.full(rows, np.inf)
    side = np.zeros(rows, dtype=np.int64)
    act = np.flatnonzero(sure & ~exact)
    near = loc.near
    for _ in range(200):
        if act.size == 0:
            break
        ma = m[act]
        d, q = _near_pow(near[act], ma[:, None], bm1[act])
        d, q = d[:, 0, :], q[:, 0, :]
        ft, fd = loc.far_t(ma, act)
        t = np.copysign(q, d).sum(axis=1) + ft
        ad = np.abs(d)
        np.divide(q, ad, out=q, where=ad > 0.0)
        uu = q.sum(axis=1) - fd / bm1[act]  # Σ|d|^(b−2) = −T′/(b−1)
        act = _root_step(act, ma, t, uu, bm1, m, lo, hi, t_lo, t_hi, side, last, ok, tol)
    return m, ok


def _alternate(
    xs: FloatArray, m: FloatArray, b: FloatArray, b0: float, tol: FloatArray
) -> tuple[FloatArray, FloatArray, NDArray[np.bool_]]:
    """Exact shape given location and exact location given shape, alternated row-wise.

    Mirrors the alternation of :func:`errdist.estimate.mle._mle_sorted`. Returns (m, b, certain).
    """
    rows, n = xs.shape
    m, b = m.copy(), b.copy()
    ok = np.zeros(rows, dtype=bool)
    alive = np.ones(rows, dtype=bool)
    searched = np.full(rows, np.nan)  # shape of each row's last full-window search
    if b0 <= 1.0:
        m, sure = _loc_discrete(xs, b, m, int(_search_half(n, b[:1])[0]))
        alive &= sure
        searched[:] = b0
    act = np.flatnonzero(alive)
    for _ in range(100):
        if act.size <= _TAIL_ROWS:
            # a few slow rows: a batched round costs more than the one-row fit (the caller
            # refits the rows left not certain)
            break
        x = xs[act]
        lg = _log_abs(x, m[act])
        bn, sure = _shape_given_loc(lg, b[act])
        del lg
        b[act] = bn
        mn = m[act].copy()
        smooth = sure & (bn > 1.0)
        rough = sure & ~smooth
        if np.any(smooth):
            ms, s_ok = _loc_smooth_local(x[smooth], bn[smooth], mn[smooth], tol[act][smooth])
            if not s_ok.all():  # root outside the local window: the direct search
                r = np.flatnonzero(smooth)[~s_ok]
                ms[~s_ok], s_ok[~s_ok] = _loc_smooth(x[r], bn[r], mn[r], tol[act][r])
            mn[smooth] = ms
            sure[np.flatnonzero(smooth)[~s_ok]] = False
        if np.any(rough):
            # full window unless one was searched at a shape within 5 %; then a quarter
            # of it re-checks the neighbourhood (as the one-row search)
            half = _search_half(n, bn)
            quarter = rough & (np.abs(bn - searched[act]) <= 0.05 * bn)
            full = rough & ~quarter
            searched[act[full]] = bn[full]
            for grp, hs in ((quarter, np.maximum(_HALF_WINDOW, half // 4)), (full, half)):
                if np.any(grp):
                    mr, r_ok = _loc_discrete(x[grp], bn[grp], mn[grp], int(hs[grp].max()))
                    mn[grp] = mr
                    sure[np.flatnonzero(grp)[~r_ok]] = False
        conv = sure & (np.abs(mn - m[act]) <= tol[act])
        ok[act[conv]] = True
        m[act[sure & ~conv]] = mn[sure & ~conv]
        act = act[sure & ~conv]
    return m, b, ok
