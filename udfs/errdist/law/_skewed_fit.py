r"""Exact maximum-likelihood fit of the skewed error law (internal; public via
:mod:`errdist.law.skewed`).

Log-likelihood of mode m, scale a, shape b, skew λ for data x₁…xₙ (Fernández & Steel 1998
two-piece law, bounded skew):

    ℓ = n[ln b − ln 2 − ln a − ln Γ(1/b)] − Σ (|xᵢ−m| / (a(1 ± λ)))^b

with ``+`` for xᵢ ≥ m. Write R(m) = Σ_{x>m}(x−m)^b and L(m) = Σ_{x<m}(m−x)^b.

* Scale, closed form: for fixed (m, b, λ), a^b = (b/n)·S with
  S = R·(1+λ)^(−b) + L·(1−λ)^(−b) (the side weights (1±λ)^(−b)).
* Skew, closed form: S is convex in λ and ∂S/∂λ = 0 gives ((1+λ)/(1−λ))^(b+1) = R/L, i.e.
  λ = (A − B)/(A + B) with A = R^(1/(b+1)), B = L^(1/(b+1)), and then
  S = ((A + B)/2)^(b+1). λ is clipped to ±SKEW_MAX (S convex: the clipped value is the
  constrained optimum); a clip is reported as ``at_bound``.
* Profile: ℓ(m, b) = n[ln b − ln 2 − ln Γ(1/b) − (1/b)·ln(b·S/n) − 1/b].
* Location: for b ≤ 1, R and L are concave between neighbouring observations, hence so
  are A and B and (before clipping) A + B: the best m is an observation. A full search takes
  every distinct observation as a candidate when n ≤ 2,000; above that a coarse pass over
  257 evenly spaced ranks is followed by a window of ranks around the best one, widened until
  the best candidate is inside it. For b > 1 the best observation is then refined by bounded
  Brent minimisation of S(m) over the two neighbouring gaps.
* Shape: ℓ*(b) = max over m of ℓ(m, b) is evaluated on a fixed grid of 25 shapes,
  log-spaced over [SHAPE_MIN, SHAPE_MAX], and refined by bounded Brent search around the best
  grid point(s) (the grid takes observations only as locations, the refinement also the
  points between them); the bounds themselves are evaluated exactly. Along the way the location is
  searched in a window of 0.2·√n/b + 8 ranks around the previous shape's best observation
  (widened until the best is well inside); at the chosen shape every candidate is searched
  again, and should that find a better location the whole shape search is repeated with
  every candidate at every shape. Brent's maximum of a function value is only good to about
  1e-8 in the shape; it is polished to the root of the score ∂ℓ/∂b (the derivative of the
  profile, by the envelope theorem n/b + n·ψ(1/b)/b² − (1/b)Σ zᵢ ln zᵢ) by Brent's root finder.

There is no starting point: the result depends only on the multiset of data (it is the same
for any order of the observations). The data are centred on the median and divided by
their standard deviation first (ℓ changes by −n·ln(spread), added back).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np
from scipy.optimize import brentq, minimize_scalar
from scipy.special import gammaln, psi

from errdist.errors import InsufficientDataError
from errdist.estimate import SHAPE_MAX, SHAPE_MIN, clean_sample
from errdist.law import _skewed_core as _core

__all__ = ["SKEW_MAX", "SkewedFit", "fit_skewed"]

SKEW_MAX = 0.99
"""Largest |skew| the MLE searches (right/left half-scale ratio 199); a fit there is flagged."""

N_PARAMS = 4
"""Fitted parameters (loc, scale, shape, skew) counted in AIC and BIC."""

_EXHAUSTIVE_N = 2000
_COARSE = 257
_GRID = 25
_LOG2 = math.log(2.0)


@dataclass(frozen=True)
class SkewedFit:
    """Result of :func:`fit_skewed`.

    Attributes
    ----------
    loc, scale, shape, skew : float
        Fitted mode m, scale a, shape b, skew λ.
    n : int
        Observations used.
    n_dropped : int
        NaN / blank entries dropped.
    loglik : float
        Σ ln f(xᵢ) at the fitted parameters.
    aic, bic : float
        2k − 2ℓ and k·ln n − 2ℓ with k = 4.
    at_bound : bool
        True when the shape sits at SHAPE_MIN / SHAPE_MAX or |skew| at SKEW_MAX.
    warning : str
        Explanation when ``at_bound`` (empty otherwise).
    """

    loc: float
    scale: float
    shape: float
    skew: float
    n: int
    n_dropped: int
    loglik: float
    aic: float
    bic: float
    at_bound: bool
    warning: str


class _Sample:
    """Sorted standardised data with the per-shape location search."""

    def __init__(self, ys: np.ndarray) -> None:
        self.ys = ys
        self.n = ys.size
        self.uv = np.unique(ys)  # candidate locations (distinct observations)
        # where each candidate's ties start and end in the sorted data
        self.left = np.searchsorted(ys, self.uv, "left")
        self.right = np.searchsorted(ys, self.uv, "right")
        self._rows: dict[int, np.ndarray] = {}  # candidate -> ln|y - uv[j]|, then a -inf

    def rl_obs(self, idx: np.ndarray, b: float) -> tuple[np.ndarray, np.ndarray]:
        """(R, L) at the distinct observations ``uv[idx]``.

        The rows ln|y − uv[j]| (−inf at ties, and one −inf appended) are kept for the fit,
        so a new shape costs one exp per element; each row's sums over y below, at and above
        the candidate come from one ``reduceat`` over the sorted data. An empty "below"
        segment (the smallest observation) reads its first element, a tie, whose term is 0.
        """
        rows = self._rows
        missing = [int(j) for j in idx if int(j) not in rows]
        if missing:
            c = self.uv[missing]
            with np.errstate(divide="ignore"):
                block = np.log(np.abs(self.ys[None, :] - c[:, None]))
            block = np.concatenate((block, np.full((len(missing), 1), -math.inf)), axis=1)
            for j, row in zip(missing, block, strict=True):
                rows[j] = row
        width = self.n + 1
        p = np.stack([rows[int(j)] for j in idx])
        p *= b
        np.exp(p, out=p)
        start = np.arange(idx.size) * width
        cuts = np.stack((start, start + self.left[idx], start + self.right[idx]), axis=1)
        sums = np.add.reduceat(p.ravel(), cuts.ravel())
        return sums[2::3], sums[0::3]

    def rl_at(self, cand: np.ndarray, b: float) -> tuple[np.ndarray, np.ndarray]:
        """(R, L) at the candidate locations ``cand`` (direct, in blocks)."""
        ys = self.ys
        r = np.empty(cand.size)
        lft = np.empty(cand.size)
        step = max(1, (1 << 18) // self.n)
        for k in range(0, cand.size, step):
            d = ys[None, :] - cand[k : k + step, None]
            p = np.abs(d) ** b
            r[k : k + step] = np.where(d > 0.0, p, 0.0).sum(axis=1)
            lft[k : k + step] = np.where(d < 0.0, p, 0.0).sum(axis=1)
        return r, lft

    def _window(self, b: float, lo: int, hi: int, half: int) -> tuple[float, int]:
        """Best distinct observation, searching ranks [lo, hi) and widening the window until
        the best one is at least half/2 ranks inside what has been searched."""
        nu = self.uv.size
        best_s, best_j = math.inf, -1
        seen_lo, seen_hi = lo, hi
        while True:
            s, _ = _s_min(*self.rl_obs(np.arange(lo, hi), b), b)
            k = int(np.argmin(s))
            if s[k] < best_s:
                best_s, best_j = float(s[k]), lo + k
            seen_lo, seen_hi = min(seen_lo, lo), max(seen_hi, hi)
            if best_j - seen_lo < half // 2 and seen_lo > 0:
                lo, hi = max(seen_lo - half, 0), seen_lo
            elif seen_hi - 1 - best_j < half // 2 and seen_hi < nu:
                lo, hi = seen_hi, min(seen_hi + half, nu)
            else:
                return best_s, best_j

    def best_obs(self, b: float, j0: int | None = None) -> tuple[float, int]:
        """(S, index into uv) of the best distinct observation as location.

        ``j0`` None: every distinct observation (n <= 2,000), or 257 evenly spaced ranks then
        a window around the best. Otherwise a window of 0.2·√n/b + 8 ranks either side of
        ``j0``, widened until the best candidate is well inside it.
        """
        nu = self.uv.size
        half = int(math.ceil(0.2 * math.sqrt(self.n) / b)) + 8
        if j0 is None:
            if nu <= _EXHAUSTIVE_N:
                s, _ = _s_min(*self.rl_obs(np.arange(nu), b), b)
                j = int(np.argmin(s))
                return float(s[j]), j
            coarse = np.unique(np.linspace(0, nu - 1, _COARSE).round().astype(np.intp))
            s, _ = _s_min(*self.rl_at(self.uv[coarse], b), b)  # not kept: used once per shape
            j0 = int(coarse[int(np.argmin(s))])
            half += nu // (_COARSE - 1)
        return self._window(b, max(j0 - half, 0), min(j0 + half + 1, nu), half)

    def s_cont(self, m: float, b: float) -> float:
        """S minimised over λ at any location ``m`` (the sorted data split at ``m``)."""
        ys = self.ys
        k = int(np.searchsorted(ys, m, "left"))
        j = int(np.searchsorted(ys, m, "right"))
        r = float(np.sum((ys[j:] - m) ** b))
        lft = float(np.sum((m - ys[:k]) ** b))
        c = 1.0 / (b + 1.0)
        a_, b_ = r**c, lft**c
        lam = min(max((a_ - b_) / (a_ + b_), -SKEW_MAX), SKEW_MAX)
        return r * (1.0 + lam) ** (-b) + lft * (1.0 - lam) ** (-b)

    def best_loc(
        self, b: float, j0: int | None = None, refine: bool = True
    ) -> tuple[float, float, int]:
        """(S, m, j): the location minimising S for shape ``b`` and the best observation's
        index (see :meth:`best_obs` for ``j0``); without ``refine`` only observations are
        candidates (for b > 1 an S at most slightly too large)."""
        s_obs, j = self.best_obs(b, j0)
        m = float(self.uv[j])
        if b <= 1.0 or not refine:
            return s_obs, m, j
        best_s, best_m = s_obs, m
        uv = self.uv
        width = float(uv[-1]) - float(uv[0])
        for lo, hi in ((j - 1, j), (j, j + 1)):
            left = float(uv[lo]) if lo >= 0 else float(uv[0]) - width
            right = float(uv[hi]) if hi < uv.size else float(uv[-1]) + width
            res = minimize_scalar(
                lambda t: self.s_cont(t, b),
                bounds=(left, right),
                method="bounded",
                options={"xatol": 1e-13 * max(1.0, abs(left), abs(right))},
            )
            if res.fun < best_s:
                best_s, best_m = float(res.fun), float(res.x)
        return best_s, best_m, j


def _s_min(r: np.ndarray, lft: np.ndarray, b: float) -> tuple[np.ndarray, np.ndarray]:
    """S = R(1+λ)^−b + L(1−λ)^−b at the best λ in [−SKEW_MAX, SKEW_MAX], and that λ."""
    c = 1.0 / (b + 1.0)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        a_, b_ = r**c, lft**c
        lam = np.clip((a_ - b_) / (a_ + b_), -SKEW_MAX, SKEW_MAX)
        s = r * (1.0 + lam) ** (-b) + lft * (1.0 - lam) ** (-b)
    return s, lam


def _profile(s: float, n: int, b: float) -> float:
    """ℓ(m, b) at the best scale and skew, from S."""
    if not s > 0.0:
        return -math.inf
    return n * (math.log(b) - _LOG2 - float(gammaln(1.0 / b)) - math.log(b * s / n) / b - 1.0 / b)


def _shape_search(smp: _Sample, exhaustive: bool) -> tuple[float, float]:
    """(b, ℓ) maximising the profile over the shape; locations searched in windows that
    follow the best observation from shape to shape (every candidate if ``exhaustive``)."""
    n = smp.n
    cache: dict[float, tuple[float, int]] = {}
    last_j: list[int | None] = [None]
    refine = [False]  # the grid ranks shapes on observations only; Brent refines

    def ll(u: float) -> float:
        if u not in cache:
            b = math.exp(u)
            s, _, j = smp.best_loc(b, None if exhaustive else last_j[0], refine[0])
            last_j[0] = j
            cache[u] = (_profile(s, n, b), j)
        return cache[u][0]

    u_min, u_max = math.log(SHAPE_MIN), math.log(SHAPE_MAX)
    grid = np.linspace(u_min, u_max, _GRID)
    grid[0], grid[-1] = u_min, u_max
    vals = np.array([ll(float(u)) for u in grid])
    order = np.argsort(-vals)
    tops = [int(order[0])]
    if int(order[1]) not in (tops[0] - 1, tops[0] + 1):
        tops.append(int(order[1]))  # a second, separate peak: refine it too
    best_u, best_v = float(grid[tops[0]]), float(vals[tops[0]])
    refine[0] = True
    for k in tops:
        last_j[0] = cache[float(grid[k])][1]
        lo, hi = float(grid[max(k - 1, 0)]), float(grid[min(k + 1, _GRID - 1)])
        res = minimize_scalar(
            lambda u: -ll(u), bounds=(lo, hi), method="bounded", options={"xatol": 1e-10}
        )
        if -res.fun > best_v:
            best_u, best_v = float(res.x), float(-res.fun)
    b = math.exp(best_u)
    if best_u == u_min:
        b = SHAPE_MIN
    elif best_u == u_max:
        b = SHAPE_MAX
    return b, best_v


def _score(smp: _Sample, b: float, j: int) -> float:
    """∂ℓ/∂b at the best (m, a, λ) for shape ``b`` (by the envelope theorem, the derivative of
    the profile): n/b + n·ψ(1/b)/b² − (1/b)·Σ zᵢ ln zᵢ with zᵢ = (|yᵢ − m|/(a(1 ± λ)))^b."""
    n = smp.n
    _, m, _ = smp.best_loc(b, j)
    r, lft = smp.rl_at(np.array([m]), b)
    s_arr, lam_arr = _s_min(r, lft, b)
    lam = float(lam_arr[0])
    a = (b * float(s_arr[0]) / n) ** (1.0 / b)
    d = smp.ys - m
    w = np.abs(d) / (a * np.where(d >= 0.0, 1.0 + lam, 1.0 - lam))
    z = w**b
    with np.errstate(divide="ignore", invalid="ignore"):
        zlz = np.where(z > 0.0, z * np.log(z), 0.0)
    return n / b + n * float(psi(1.0 / b)) / (b * b) - float(zlz.sum()) / b


def _score_root(smp: _Sample, b: float, j: int) -> float:
    """Polish the shape from Brent's maximum (about 1e-8 relative: a function value is flat
    at its maximum) to the root of the score (about 1e-15), if the score changes sign within
    a small bracket around it; otherwise ``b`` unchanged."""
    for width in (1e-6, 1e-5, 1e-4):
        lo = max(b * math.exp(-width), SHAPE_MIN)
        hi = min(b * math.exp(width), SHAPE_MAX)
        g_lo, g_hi = _score(smp, lo, j), _score(smp, hi, j)
        if g_lo > 0.0 > g_hi:
            return float(brentq(lambda t: _score(smp, t, j), lo, hi, xtol=1e-15 * b, rtol=8.9e-16))
    return b


def _fit_sorted(ys: np.ndarray) -> tuple[float, float, float, float]:
    """(m, a, b, λ) of standardised sorted data.

    The shape search follows the best location in windows; at the chosen shape the location
    is then searched over every candidate. Should that find a better location than the
    window did, the shape search is repeated with every candidate at every shape.
    """
    smp = _Sample(ys)
    n = smp.n
    b, ll_window = _shape_search(smp, exhaustive=False)
    s, m, j = smp.best_loc(b)
    if _profile(s, n, b) > ll_window + 1e-9 * max(1.0, abs(ll_window)):
        b, _ = _shape_search(smp, exhaustive=True)
        s, m, j = smp.best_loc(b)
    if SHAPE_MIN < b < SHAPE_MAX:
        b_root = _score_root(smp, b, j)
        if b_root != b:
            s2, m2, _ = smp.best_loc(b_root)
            ll_b = _profile(s, n, b)
            # the score root is the maximum; the two values differ by rounding only
            if _profile(s2, n, b_root) >= ll_b - 1e-12 * max(1.0, abs(ll_b)):
                b, m = b_root, m2
    r, lft = smp.rl_at(np.array([m]), b)
    s_arr, lam_arr = _s_min(r, lft, b)
    lam = float(lam_arr[0])
    a = (b * float(s_arr[0]) / n) ** (1.0 / b)
    return m, a, b, lam


def fit_skewed(data: Any) -> SkewedFit:
    """Exact maximum-likelihood fit of the skewed error law.

    Parameters
    ----------
    data : array_like
        Observations (1-D or 2-D, read row-major); NaN / blank entries are dropped.

    Returns
    -------
    SkewedFit
        loc (the mode), scale, shape in [SHAPE_MIN, SHAPE_MAX], skew in
        [−SKEW_MAX, SKEW_MAX], n, n_dropped, loglik, aic, bic, at_bound, warning.

    Raises
    ------
    InsufficientDataError
        Fewer than 5 numbers (four parameters), or no spread.
    DomainError
        ±inf in the data.
    InputTypeError
        Non-numeric data.

    Notes
    -----
    The search (module docstring) has no starting point, so the result does not depend on
    the order of the data. Many equal values (e.g. unchanged prices) pull the shape down,
    as in the symmetric :func:`errdist.fit`; a shape at the lower bound is flagged.
    """
    x, n_dropped = clean_sample(data, min_count=5)
    n = x.size
    xs = np.sort(x)
    if xs[0] == xs[-1]:
        raise InsufficientDataError(f"data have no spread: all {n} values equal {xs[0]:g}")
    centre = float(np.median(xs))
    spread = float(np.std(xs))
    ys = (xs - centre) / spread
    m, a, b, lam = _fit_sorted(ys)
    loc = centre + spread * m
    scale = spread * a
    ll = float(np.sum(np.asarray(_core.logpdf(xs, loc, scale, b, lam))))
    warnings = []
    if b >= SHAPE_MAX:
        warnings.append(
            f"shape at upper bound {SHAPE_MAX:g}: data look lighter-tailed than any "
            "error law in range; treat tail figures with care"
        )
    elif b <= SHAPE_MIN:
        warnings.append(
            f"shape at lower bound {SHAPE_MIN:g}: data look heavier-tailed than any "
            "error law in range (or have many repeated values); treat tail figures with care"
        )
    if abs(lam) >= SKEW_MAX:
        warnings.append(
            f"skew at bound {lam:+g}: almost all the data lie on one side of the mode; "
            "treat tail figures with care"
        )
    return SkewedFit(
        loc=float(loc),
        scale=float(scale),
        shape=float(b),
        skew=float(lam),
        n=int(n),
        n_dropped=int(n_dropped),
        loglik=ll,
        aic=2.0 * N_PARAMS - 2.0 * ll,
        bic=N_PARAMS * math.log(n) - 2.0 * ll,
        at_bound=bool(warnings),
        warning="; ".join(warnings),
    )
