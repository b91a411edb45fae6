"""Exact maximum-likelihood fit of the generalized normal law (internal engine).

Log-likelihood of location m, scale a, shape b for data x₁…xₙ:

    ℓ(m, a, b) = n[ln b − ln 2 − ln a − ln Γ(1/b)] − Σ(|xᵢ−m|/a)^b.

For fixed (m, b) the scale has the closed form a^b = (b/n)·S_b(m) with
S_b(m) = Σ|xᵢ−m|^b, which leaves the profile log-likelihood

    ℓ(m, b) = n[ln b − ln 2 − ln Γ(1/b) − (1/b)·ln((b/n)·S_b(m)) − 1/b].

Maximising it over m means minimising S_b(m). The search (:func:`_search_regions`) treats the
two shape regions separately and returns the larger maximum (b = 1 belongs to both):

* b ≤ 1: S_b is concave between neighbouring observations, so its minimum sits at an
  observation (b = 1 gives the median). n ≤ 400: every observation with its own best shape
  (:func:`_rough_exhaustive`). Otherwise the exact shape for the current location and the best
  observation within 0.2·√n/b + 8 ranks of it (:func:`_loc_discrete`) alternate, and for
  n ≤ 2,000 a second alternation starts from the best point of a scan over a few shapes.
* b ≥ 1: S_b is strictly convex in m, so the location solves
  T(m) = Σ sign(xᵢ−m)|xᵢ−m|^(b−1) = 0. A joint Newton iteration in (m, u = ln b) from the
  moment start (:func:`_joint_newton`), else the alternation of exact shape and exact location;
  for n ≤ 2,000 also the exact profile on 12 shapes and a second search from the best of them.

The likelihood has no maximum over all shapes (it grows without limit as b → 0 with m at an
observation, fastest at a repeated value), so shapes are searched in [SHAPE_MIN, SHAPE_MAX];
with repeated values the b ≤ 1 region is also searched from SHAPE_MIN. What is proven and what
is only checked against a brute force is set out in docs/methodology.md.

Derivatives used, with p = |x−m|^b, L = ln|x−m|, S0 = Σp, S1 = Σp·L, S2 = Σp·L², and
c = ψ(1/b) + ln(b·S0/n):

    (1/n) ∂ℓ/∂u   = 1 + c/b − S1/S0
    (1/n) ∂²ℓ/∂u² = −c/b − ψ'(1/b)/b² + 1/b + S1/S0 − b(S2/S0 − (S1/S0)²)

(obtained by differentiating the profile above; it is the same law and likelihood as
Nadarajah 2005, "A generalized normal distribution", J. Applied Statistics 32(7):685-694).
"""

from __future__ import annotations

import math
import threading

import numpy as np
from scipy.special import gammaln, psi, zeta

from errdist.estimate.mle_rows import profile_rows, shape_rows, smooth_locations
from errdist.law.moment_solvers import solve_shape

__all__ = ["SHAPE_MAX", "SHAPE_MIN"]

SHAPE_MIN = 0.1
"""Smallest shape the MLE searches (excess kurtosis about 2.8e6: heavier than any market)."""

SHAPE_MAX = 20.0
"""Largest shape the MLE searches (excess kurtosis about −1.176, close to the uniform law).

Without a bound, small near-uniform samples send the shape estimate to absurd values
(scipy's generic fit returns b ≈ 7.5e6 on some); at the bound the fit is flagged.
"""

_U_MIN = math.log(SHAPE_MIN)
_U_MAX = math.log(SHAPE_MAX)
_LOG2 = math.log(2.0)
_EXHAUSTIVE_N = 400  # below this, b <= 1 searches every observation
_HALF_WINDOW = 8  # minimum half-width (ranks) of the b <= 1 candidate window
# far field of a candidate window: shells (inner radius / half-width, series terms),
# terms chosen so that radius**-(terms+1) < 1.5e-14
_SHELLS = ((4.0, 22), (16.0, 11), (256.0, 5), (4096.0, 3))


_NEWTON_PASSES = 30  # joint Newton passes before the alternation takes over
_SCAN_N = 2000  # up to this size, both shape regions are also scanned on a grid
_SMOOTH_GRID = np.geomspace(1.05, SHAPE_MAX, 12)  # shapes of the b > 1 scan
_ROUGH_GRID = (0.2, 0.35, 0.5, 0.65, 0.8, 0.9, 0.97)  # shapes of the b < 1 scan (n > 400)
_CALL_COST = 1000  # overhead of one numpy call, in element operations (cost model)
_TINY = 5e-324
_ZERO_LOG = -1e300  # stands for ln 0: exp(b·it) = 0 and 0·it = 0, without NaN
_CACHE_MAX = 2_000_000  # largest n whose scratch arrays are kept between fits
_MATRIX_MIN = 1 << 16  # size of the scratch area for candidate × observation blocks


class _Workspace:
    """Scratch arrays reused across the steps of a fit (and across fits, per thread).

    Fresh large arrays cost page faults on first touch, which dominate the run time of a
    fit at n = 100,000 on some machines; reusing a few buffers avoids them.
    """

    def __init__(self, n: int) -> None:
        self.size = n
        self.d = np.empty(n)
        self.lg = np.empty(n)
        self.p = np.empty(n)
        self.q = np.empty(n)
        self.mat = np.empty(max(n, _MATRIX_MIN))

    def view(self, n: int) -> _Workspace:
        if n == self.size:
            return self
        w = _Workspace.__new__(_Workspace)
        w.size = n
        w.d, w.lg, w.p, w.q = self.d[:n], self.lg[:n], self.p[:n], self.q[:n]
        w.mat = self.mat
        return w


_local = threading.local()


def _workspace(n: int) -> _Workspace:
    ws = getattr(_local, "ws", None)
    if ws is not None and ws.size >= n:
        return ws.view(n)
    ws = _Workspace(n)
    if n <= _CACHE_MAX:
        _local.ws = ws
    return ws


def _sorted(x: np.ndarray) -> np.ndarray:
    """Sorted copy of ``x`` in a per-thread buffer (valid until the next call)."""
    n = x.size
    buf = getattr(_local, "sort_buf", None)
    if buf is None or buf.size < n:
        if n > _CACHE_MAX:
            return np.sort(x)
        buf = np.empty(n)
        _local.sort_buf = buf
    out = buf[:n]
    out[...] = x
    out.sort()
    return out


def _dot(a: np.ndarray, b: np.ndarray) -> float:
    """Σ aᵢbᵢ; long vectors avoid BLAS (a threaded dot stalls for milliseconds when busy)."""
    if a.size < 8192:
        return float(np.dot(a, b))
    return float(np.einsum("i,i->", a, b))


def _trigamma(x: float) -> float:
    """ψ'(x) = ζ(2, x) (Hurwitz zeta; much cheaper to call than polygamma)."""
    return float(zeta(2.0, x))


def _profile_value(s0: float, n: int, b: float) -> float:
    """ℓ(m, b) from S0 = S_b(m)."""
    return n * (math.log(b) - _LOG2 - float(gammaln(1.0 / b)) - math.log(b * s0 / n) / b - 1.0 / b)


def _ties(xs: np.ndarray, m: float) -> tuple[int, int]:
    """Index range [j, k) of the observations equal to m (xs[:j] < m < xs[k:])."""
    j = int(np.searchsorted(xs, m, "left"))
    if j < xs.size and xs[j] == m:
        return j, int(np.searchsorted(xs, m, "right"))
    return j, j


def _log_dist(xs: np.ndarray, m: float, ws: _Workspace) -> np.ndarray:
    """ln|x−m| into ws.lg, with _ZERO_LOG for the observations equal to m."""
    lg = ws.lg
    np.subtract(xs, m, out=lg)
    np.abs(lg, out=lg)
    j, k = _ties(xs, m)
    lg[j:k] = 1.0
    np.log(lg, out=lg)
    lg[j:k] = _ZERO_LOG
    return lg


def _shape_given_loc(
    lg: np.ndarray,
    n: int,
    b0: float,
    ws: _Workspace,
    b_min: float = SHAPE_MIN,
    b_max: float = SHAPE_MAX,
) -> float:
    """Maximise the profile ℓ(m, b) over b for a fixed location.

    ``lg`` holds ln|xᵢ−m|, with −1e300 in place of −inf for observations equal to m
    (they add 0 to every sum). Bracketed Newton in u = ln b on [ln b_min, ln b_max] (default
    [SHAPE_MIN, SHAPE_MAX]; the region searches use [SHAPE_MIN, 1] and [1, SHAPE_MAX]);
    returns the bound itself when ∂ℓ/∂u does not change sign inside.
    """
    u_min, u_max = math.log(b_min), math.log(b_max)
    u_lo, u_hi = u_min, u_max
    lo_tested = hi_tested = False
    u = min(max(math.log(b0), u_min), u_max)
    p = ws.p[: lg.size]
    pl = ws.q[: lg.size]
    for _ in range(100):
        b = math.exp(u)
        np.multiply(lg, b, out=p)
        np.exp(p, out=p)
        s0 = float(p.sum())
        np.multiply(p, lg, out=pl)
        r1 = float(pl.sum()) / s0
        var = float(_dot(pl, lg)) / s0 - r1 * r1
        inv = 1.0 / b
        c = float(psi(inv)) + math.log(b * s0 / n)
        gu = 1.0 + c * inv - r1
        if gu > 0.0:
            u_lo, lo_tested = u, True
            if u >= u_max:
                return b_max
        else:
            u_hi, hi_tested = u, True
            if u <= u_min:
                return b_min
        guu = -c * inv - _trigamma(inv) * inv * inv + inv + r1 - b * var
        un = u - gu / guu if guu < 0.0 else math.nan
        newton = u_lo < un < u_hi
        if not newton:
            if not (un < u_hi) and not hi_tested:
                un = u_max
            elif not (un > u_lo) and not lo_tested:
                un = u_min
            else:
                un = 0.5 * (u_lo + u_hi)
        if newton and abs(un - u) <= 1e-7:
            # a Newton step (not a bisection midpoint) this short: Newton converges
            # quadratically, so the error after it is O(1e-14)
            return math.exp(un)
        if u_hi - u_lo <= 4e-16 * max(1.0, abs(u)):
            return math.exp(un)  # bracket at the float resolution
        u = un
    return math.exp(u)


def _pow(a: np.ndarray, b: float, zeros: bool = True) -> np.ndarray:
    """a**b for a ≥ 0 as exp(b·ln a), in place (vectorised exp/log are faster than pow).

    With ``zeros`` the entries 0 are first raised to the smallest double (5e-324), whose
    power is 0 for b ≥ 1 and below 1e-32 for b ≥ 0.1: every candidate location carries
    the same such self-term, so comparisons between candidates are unaffected.
    """
    if zeros:
        np.maximum(a, _TINY, out=a)
    np.log(a, out=a)
    a *= b
    return np.exp(a, out=a)


def _loc_smooth(xs: np.ndarray, b: float, m0: float, tol: float, ws: _Workspace) -> float:
    """Minimiser of S_b(m) for b > 1: root of T(m) = Σ sign(x−m)|x−m|^(b−1) (decreasing).

    Newton steps (T' = −(b−1)Σ|x−m|^(b−2)) safeguarded by a bracket of the root and by
    false position (Illinois variant) when Newton does not at least halve the step.
    """
    lo, hi = float(xs[0]), float(xs[-1])
    t_lo, t_hi = math.inf, -math.inf
    m = min(max(m0, lo), hi)
    bm1 = b - 1.0
    last_step = math.inf
    side = 0
    ad, q = ws.d, ws.p
    for _it in range(200):
        j, k = _ties(xs, m)
        np.subtract(xs, m, out=ad)
        np.abs(ad, out=ad)
        ad[j:k] = 1.0
        np.log(ad, out=q)
        q[j:k] = _ZERO_LOG
        q *= bm1
        np.exp(q, out=q)  # |x−m|^(b−1), 0 at ties
        t = float(q[k:].sum()) - float(q[:j].sum())
        if t == 0.0:
            return m
        if t > 0.0:
            lo, t_lo = m, t
            if side > 0:  # Illinois: the other end stayed twice, halve its weight
                t_hi *= 0.5
            side = 1
        else:
            hi, t_hi = m, t
            if side < 0:
                t_lo *= 0.5
            side = -1
        np.divide(q, ad, out=q)
        u = float(q.sum())
        mn = m + t / (bm1 * u) if u > 0.0 else math.nan
        if not (lo < mn < hi) or abs(mn - m) > 0.5 * last_step:
            if math.isfinite(t_lo) and math.isfinite(t_hi):
                mf = lo + (hi - lo) * t_lo / (t_lo - t_hi)
                mn = mf if lo < mf < hi else 0.5 * (lo + hi)
                if not (lo < mn < hi) or abs(mn - m) < 1e-3 * (hi - lo):
                    mn = 0.5 * (lo + hi)
            elif not (lo < mn < hi):
                mn = 0.5 * (lo + hi)
        step = abs(mn - m)
        m = mn
        if step <= tol or hi - lo <= tol:
            return m
        last_step = step
    return m


def _joint_newton(xs: np.ndarray, m: float, b: float, ws: _Workspace) -> tuple[float, float, bool]:
    """Newton iteration on ℓ(m, u = ln b) jointly, for the smooth region b > 1.

    With d = x − m, p = |d|^b, L = ln|d|, S0 = Σp, S1 = Σp·L, S2 = Σp·L², T = Σp/d,
    V = Σ(p/d)·L, U = Σp/d² and c = ψ(1/b) + ln(b·S0/n), the derivatives of ℓ/n are

        ∂m = T/S0,            ∂m∂m = −(b−1)U/S0 + b·T²/S0²,
        ∂u = 1 + c/b − S1/S0, ∂u∂u = −c/b − ψ'(1/b)/b² + 1/b + S1/S0 − b(S2/S0 − (S1/S0)²),
        ∂m∂u = b·V/S0 − b·S1·T/S0².

    A step that lowers ℓ is halved (up to 6 times). Returns (m, b, converged). Gives up
    (converged False) when the Hessian is not negative definite, halving does not help, or
    the step leaves b > 1 or the shape bounds; the caller then continues with the
    coordinate-wise search from the returned point.
    """
    n = xs.size
    best = -math.inf
    base_m, base_b, step_m, step_u, halvings = m, b, 0.0, 0.0, 0
    d, lg, p, w = ws.d, ws.lg, ws.p, ws.q
    for _ in range(_NEWTON_PASSES):
        j, k = _ties(xs, m)
        np.subtract(xs, m, out=d)
        np.abs(d, out=lg)
        d[j:k] = 1.0
        lg[j:k] = 1.0
        np.log(lg, out=lg)
        lg[j:k] = _ZERO_LOG
        np.multiply(lg, b, out=p)
        np.exp(p, out=p)
        s0 = float(p.sum())
        np.multiply(p, lg, out=w)
        s1 = float(w.sum())
        s2 = _dot(w, lg)
        np.divide(p, d, out=w)  # p/d = sign(d)|d|^(b-1)
        t = float(w.sum())
        v = _dot(w, lg)
        np.divide(w, d, out=w)  # |d|^(b-2)
        uu = float(w.sum())
        ll = _profile_value(s0, n, b)
        if not ll >= best - 1e-13 * abs(best):
            # the full step lowered ℓ (near b = 1 the location direction is almost
            # piecewise linear): halve it, from the last accepted point
            if halvings >= 6:
                return base_m, base_b, False
            halvings += 1
            step_m *= 0.5
            step_u *= 0.5
            m, b = base_m + step_m, base_b * math.exp(step_u)
            continue
        halvings = 0
        best, base_m, base_b = ll, m, b
        inv = 1.0 / b
        r1 = s1 / s0
        c = float(psi(inv)) + math.log(b * s0 / n)
        g_u = 1.0 + c * inv - r1
        g_m = t / s0
        h_uu = -c * inv - _trigamma(inv) * inv * inv + inv + r1 - b * (s2 / s0 - r1 * r1)
        h_mm = -(b - 1.0) * uu / s0 + b * g_m * g_m
        h_um = b * v / s0 - b * r1 * g_m
        det = h_mm * h_uu - h_um * h_um
        if not (h_mm < 0.0 and h_uu < 0.0 and det > 0.0):
            return m, b, False
        dm = -(h_uu * g_m - h_um * g_u) / det
        du = -(h_mm * g_u - h_um * g_m) / det
        u = math.log(b) + du
        if not (0.0 < u and _U_MIN < u < _U_MAX):
            return m, b, False
        step_m, step_u = dm, du
        m += dm
        b = math.exp(u)
        scale = (b * s0 / n) ** inv
        if abs(dm) <= 1e-8 * scale and abs(du) <= 1e-8:
            # quadratic convergence: the error after this step is O(1e-16)
            return m, b, True
    return m, b, False


def _s_at(xs: np.ndarray, idx: np.ndarray, b: float, ws: _Workspace) -> np.ndarray:
    """S_b(xs[j]) for every j in ``idx`` (direct, in blocks of the scratch area)."""
    n = xs.size
    out = np.empty(idx.size)
    step = max(1, ws.mat.size // n)
    for k in range(0, idx.size, step):
        c = xs[idx[k : k + step]]
        block = ws.mat[: c.size * n].reshape(c.size, n)
        np.subtract(xs[None, :], c[:, None], out=block)
        np.abs(block, out=block)
        out[k : k + step] = _pow(block, b).sum(axis=1)
    return out


def _s_window(xs: np.ndarray, lo: int, hi: int, b: float, ws: _Workspace) -> np.ndarray:
    """S_b(xs[j]) for the consecutive candidates j = lo … hi−1 of the sorted data.

    Observations farther than 4·w from the window centre c (w: half-width of the window
    in value) enter through the binomial series

        Σ_far |D−δ|^b = Σ_k C(b,k) (−δ)^k F_k,   F_k = Σ_far |D|^b D^(−k),  D = x − c,

    which converges like ρ^(−k) for the observations with |D| ≥ ρ·w ≥ ρ·|δ|. Each
    distance shell [ρ·w, ρ'·w) contributes to F_k up to the K where ρ^(−K−1) < 1.5e-14
    (K = 22, 11, 5, 3 for ρ = 4, 16, 256, 4096): a relative error far below what could
    change the log-likelihood noticeably. Observations within 4·w are summed directly.
    """
    cand = xs[lo:hi]
    mid = (lo + hi - 1) // 2
    c = float(xs[mid])
    w = max(c - float(cand[0]), float(cand[-1]) - c)
    n = xs.size
    if w == 0.0:
        return np.full(cand.size, _s_at(xs, np.array([mid]), b, ws)[0])
    lefts = [int(np.searchsorted(xs, c - rho * w, "left")) for rho, _ in _SHELLS] + [0]
    rights = [int(np.searchsorted(xs, c + rho * w, "right")) for rho, _ in _SHELLS] + [n]
    i0, i1 = lefts[0], rights[0]
    # work in element operations; a numpy call costs about _CALL_COST of them
    cost = 6 * cand.size * (i1 - i0) + 3 * n + 20 * _CALL_COST
    for z, (_, terms) in enumerate(_SHELLS):
        size = lefts[z] - lefts[z + 1] + rights[z + 1] - rights[z]
        if size:
            cost += 2 * terms * (size + _CALL_COST) + 6 * _CALL_COST
    if cost >= 6 * cand.size * n + 8 * _CALL_COST:  # direct evaluation is cheaper
        return _s_at(xs, np.arange(lo, hi), b, ws)
    kmax = _SHELLS[0][1]
    moments = np.zeros(kmax + 1)
    for z, (_, terms) in enumerate(_SHELLS):
        left, right = xs[lefts[z + 1] : lefts[z]], xs[rights[z] : rights[z + 1]]
        size = left.size + right.size
        if size == 0:
            continue
        d = np.concatenate((left, right), out=ws.d[:size])
        d -= c
        r = np.divide(1.0, d, out=ws.q[:size])  # ws.lg is kept for _finish
        t = _pow(np.abs(d, out=ws.p[:size]), b, zeros=False)
        moments[0] += t.sum()
        for k in range(1, terms + 1):
            t *= r
            moments[k] += t.sum()
    coef = np.empty(kmax + 1)
    beta = 1.0
    coef[0] = moments[0]
    for k in range(1, kmax + 1):
        beta *= -(b - k + 1.0) / k  # C(b, k)·(−1)^k
        coef[k] = beta * moments[k]
    far = np.vander(cand - c, kmax + 1, increasing=True) @ coef
    near = xs[i0:i1]
    size = cand.size * near.size
    buf = ws.mat[:size] if size <= ws.mat.size else np.empty(size)
    dist = buf.reshape(cand.size, near.size)
    np.subtract(cand[:, None], near[None, :], out=dist)
    np.abs(dist, out=dist)
    return far + _pow(dist, b).sum(axis=1)


def _search_window(n: int, b: float) -> int:
    """Half-width (in ranks) of the candidate search for b ≤ 1: 0.2·√n/b + 8."""
    return int(math.ceil(0.2 * math.sqrt(n) / b)) + _HALF_WINDOW


def _loc_discrete(xs: np.ndarray, b: float, m0: float, ws: _Workspace, half: int = 0) -> float:
    """Best observation for b ≤ 1 (S_b is concave between observations).

    Every observation is a candidate when n ≤ 400. Otherwise the candidates are the
    observations within h = 0.2·√n/b + 8 ranks of the current location (or ``half``
    ranks when given: the alternation re-checks a converged location with h/4), and the
    window grows until the best candidate is at least h/2 ranks from both edges of what has
    been searched. Rationale: S_b(m) is a smooth bowl (curvature of order n) plus a rough part
    from the nearest neighbours; the rough part can only win over a distance of order
    n^(−1/2) in value, i.e. order √n ranks, growing as b shrinks. Tests compare the
    result with an exhaustive search.
    """
    n = xs.size
    if n <= _EXHAUSTIVE_N:
        s = _s_at(xs, np.arange(n), b, ws)
        return float(xs[int(np.argmin(s))])
    half = half or _search_window(n, b)
    margin = half // 2
    j = min(int(np.searchsorted(xs, m0)), n - 1)
    seen_lo, seen_hi = j, j
    best_j, best_s = -1, math.inf
    lo, hi = j - half, j + half + 1
    while True:
        lo, hi = max(lo, 0), min(hi, n)
        s = _s_window(xs, lo, hi, b, ws)
        k = int(np.argmin(s))
        if s[k] < best_s:
            best_s, best_j = float(s[k]), lo + k
        seen_lo, seen_hi = min(seen_lo, lo), max(seen_hi, hi)
        if best_j - seen_lo >= margin or seen_lo == 0:
            if seen_hi - 1 - best_j >= margin or seen_hi == n:
                return float(xs[best_j])
            lo, hi = seen_hi, seen_hi + half
        else:
            lo, hi = seen_lo - half, seen_lo


def _moment_shape(xs: np.ndarray, ws: _Workspace) -> float:
    """Quick moment-based starting shape (plain, not spreadsheet-exact)."""
    d = np.subtract(xs, xs.mean(), out=ws.d)
    d *= d
    v = float(d.sum()) / xs.size
    k = _dot(d, d) / xs.size / (v * v) - 3.0
    if not k > -1.17:
        return SHAPE_MAX
    return min(max(solve_shape(k), SHAPE_MIN), SHAPE_MAX)


def _mle_sorted(
    xs: np.ndarray, start_shape: float | None = None
) -> tuple[float, float, float, float]:
    """Maximum-likelihood (loc, scale, shape, loglik) of a sorted, finite, spread sample.

    Lean entry point for repeated fits (rolling windows, bootstrap): no input checks.
    ``start_shape`` is accepted for compatibility and ignored: every search starts from the
    moment shape, so the result cannot depend on it (see :func:`_search_regions`).
    """
    del start_shape
    n = xs.size
    ws = _workspace(n)
    return _search_regions(xs, _moment_shape(xs, ws), ws)


def _search_regions(xs: np.ndarray, b0: float, ws: _Workspace) -> tuple[float, float, float, float]:
    """Best of the region maxima: b ≤ 1 (discrete location) and b ≥ 1 (smooth location).

    The profile ℓ(m, b) changes character at b = 1 (location an observation below, the
    root of a smooth score above), and real samples often have one local maximum on each
    side within a few per cent of b = 1 (the index 2 250-day windows: about 1 in 200). A
    single search from one start finds the maximum on its own side only, so both regions
    are searched, each from the start shape clipped into it, and the larger maximum wins
    (b = 1 belongs to both, so a region whose search ends at b = 1 can never beat the other).
    With exact repeated values, the b ≤ 1 region is also searched from SHAPE_MIN: there the
    likelihood grows as b → 0 at a repeated value, and the corner (repeated value,
    SHAPE_MIN) can be the maximum on the searched range (see :mod:`errdist.estimate.fit`).
    """
    n = xs.size
    half = n // 2
    med = float(xs[half]) if n % 2 else 0.5 * (float(xs[half - 1]) + float(xs[half]))
    tol = 1e-15 * (float(xs[-1] - xs[0]) + abs(med))
    smooth_first = b0 > 1.0
    best: tuple[float, float, float, float] | None = None
    starts: list[tuple[bool, float]] = [(smooth_first, b0), (not smooth_first, b0)]
    if bool(np.any(xs[1:] == xs[:-1])):
        starts.append((False, SHAPE_MIN))
    for smooth, b in starts:
        if smooth:
            res = _smooth_region(xs, med, max(b, 1.0), tol, ws)
        else:
            res = _rough_region(xs, med, min(b, 1.0), tol, ws)
        if best is None or res[3] > best[3]:
            best = res
    assert best is not None
    return best


def _smooth_region(
    xs: np.ndarray, m: float, b: float, tol: float, ws: _Workspace
) -> tuple[float, float, float, float]:
    """Maximum of ℓ(m, b) over b ∈ [1, SHAPE_MAX] (S_b convex in m).

    A local search (joint Newton, else the alternation) from ``b``; for n ≤ _SCAN_N also the
    exact profile max_m ℓ(m, b) on a grid of shapes (:data:`_SMOOTH_GRID`), and a second local
    search from the best grid shape when it beats the first result: small samples can have
    two maxima for b > 1 (one near 1, one near 2), and a single search finds the one on its
    side.
    """
    res = _smooth_local(xs, m, b, tol, ws)
    if xs.size > _SCAN_N:
        return res
    n = xs.size
    locs = smooth_locations(xs, _SMOOTH_GRID, res[0], 1e-8)
    s0 = np.exp(_SMOOTH_GRID[:, None] * np.log(np.abs(xs[None, :] - locs[:, None]) + _TINY))
    ll = profile_rows(s0.sum(axis=1), n, _SMOOTH_GRID)
    k = int(np.argmax(ll))
    if ll[k] > res[3]:
        other = _smooth_local(xs, float(locs[k]), float(_SMOOTH_GRID[k]), tol, ws)
        if other[3] > res[3]:
            return other
    return res


def _smooth_local(
    xs: np.ndarray, m: float, b: float, tol: float, ws: _Workspace
) -> tuple[float, float, float, float]:
    """Local maximum of ℓ(m, b) over b ∈ [1, SHAPE_MAX] from (m, b)."""
    n = xs.size
    if b > 1.0:
        m, b, ok = _joint_newton(xs, m, b, ws)
        if ok:
            return _finish(xs, m, b, ws)
        b = max(b, 1.0)
    for _ in range(100):
        lg = _log_dist(xs, m, ws)  # kept intact by the location search
        b = _shape_given_loc(lg, n, b, ws, 1.0, SHAPE_MAX)
        m_new = _median(xs) if b == 1.0 else _loc_smooth(xs, b, m, tol, ws)
        if abs(m_new - m) <= tol:
            return _finish(xs, m, b, ws, lg)
        m = m_new
    return _finish(xs, m, b, ws)


def _rough_region(
    xs: np.ndarray, m: float, b: float, tol: float, ws: _Workspace
) -> tuple[float, float, float, float]:
    """Maximum of ℓ(m, b) over b ∈ [SHAPE_MIN, 1] (location an observation).

    n ≤ 400: every observation with its own best shape (:func:`_rough_exhaustive`).
    Otherwise the alternation of exact shape and windowed best observation from ``b``, and
    for n ≤ _SCAN_N a second one from the best (observation, shape) of a scan over the shapes
    :data:`_ROUGH_GRID` when that beats the first result.
    """
    n = xs.size
    if n <= _EXHAUSTIVE_N:
        return _rough_exhaustive(xs, b, ws)
    res = _rough_local(xs, m, b, tol, ws)
    if n > _SCAN_N:
        return res
    # scan: the best observation at a few shapes; a second search from the best of them
    best_ll, best_m, best_b = -math.inf, m, b
    for bk in _ROUGH_GRID:
        mk = _loc_discrete(xs, bk, m, ws, _search_window(n, bk))
        llk = _finish(xs, mk, bk, ws)[3]
        if llk > best_ll:
            best_ll, best_m, best_b = llk, mk, bk
    if best_ll > res[3]:
        other = _rough_local(xs, best_m, best_b, tol, ws)
        if other[3] > res[3]:
            return other
    return res


def _rough_local(
    xs: np.ndarray, m: float, b: float, tol: float, ws: _Workspace
) -> tuple[float, float, float, float]:
    """Local maximum over b ∈ [SHAPE_MIN, 1] by the alternation from (m, b)."""
    n = xs.size
    m = _loc_discrete(xs, b, m, ws, _search_window(n, b))
    searched_b = b  # shape of the last full-window search
    last_m, last_b = math.nan, math.nan
    for _ in range(100):
        lg = _log_dist(xs, m, ws)  # kept intact by the location searches
        b = _shape_given_loc(lg, n, b, ws, SHAPE_MIN, 1.0)
        # full window unless one was searched at a shape within 5 %; then a re-check
        # of the neighbourhood with a quarter of the window suffices
        half = _search_window(n, b)
        if abs(b - searched_b) <= 0.05 * b:
            half = max(_HALF_WINDOW, half // 4)
        else:
            searched_b = b
        m_new = _loc_discrete(xs, b, m, ws, half)
        if abs(m_new - m) <= tol:
            return _finish(xs, m, b, ws, lg)
        if b == last_b and m_new == last_m:
            # a 2-cycle between candidates of equal S_b (b = 1 with an even n: both middle
            # observations minimise S_1): ℓ cannot increase further; keep the better
            here = _finish(xs, m, b, ws, lg)
            there = _finish(xs, m_new, b, ws)
            return there if there[3] > here[3] else here
        last_m, last_b = m, b
        m = m_new
    return _finish(xs, m, b, ws)


def _rough_exhaustive(
    xs: np.ndarray, b0: float, ws: _Workspace
) -> tuple[float, float, float, float]:
    """Best (observation, shape ≤ 1) pair over every observation (small samples).

    For b ≤ 1 the location is an observation (S_b is concave between neighbours), so the
    maximum over b ∈ [SHAPE_MIN, 1] is the largest of the per-observation maxima
    max_b ℓ(xⱼ, b). Each is found by the bracketed Newton iteration in ln b
    (:func:`errdist.estimate.mle_rows.shape_rows`, all observations at once) and compared
    with ℓ at both ends b = SHAPE_MIN and b = 1, so a location whose likelihood keeps growing
    towards SHAPE_MIN (a repeated value) is seen even when it also has an interior peak.
    """
    n = xs.size
    lg = np.subtract(xs[None, :], xs[:, None])
    np.abs(lg, out=lg)
    with np.errstate(divide="ignore"):
        np.log(lg, out=lg)
    np.maximum(lg, _ZERO_LOG, out=lg)
    b, ll = shape_rows(lg, b0, SHAPE_MIN, 1.0)
    for edge in (SHAPE_MIN, 1.0):
        p = np.multiply(lg, edge)
        np.exp(p, out=p)
        ll_edge = profile_rows(p.sum(axis=1), n, np.full(n, edge))
        better = ll_edge > ll
        b[better], ll[better] = edge, ll_edge[better]
    j = int(np.argmax(ll))
    return _finish(xs, float(xs[j]), float(b[j]), ws)


def _median(xs: np.ndarray) -> float:
    """Median of sorted data (minimiser of S_1; midpoint of the two middle values)."""
    half = xs.size // 2
    return float(xs[half]) if xs.size % 2 else 0.5 * (float(xs[half - 1]) + float(xs[half]))


def _finish(
    xs: np.ndarray, m: float, b: float, ws: _Workspace, lg: np.ndarray | None = None
) -> tuple[float, float, float, float]:
    """(m, scale, b, ℓ) with the closed-form scale; ``lg``: ln|x−m| if already at hand."""
    n = xs.size
    if lg is None:
        lg = _log_dist(xs, m, ws)
    p = np.multiply(lg, b, out=ws.p)
    s0 = float(np.exp(p, out=p).sum())
    scale = (b * s0 / n) ** (1.0 / b)
    return m, scale, b, _profile_value(s0, n, b)
