"""Verification: the exact MLE against a brute-force search on real rolling windows.

For every rolling window of the daily log returns of the index series shipped with ``arch``
(`arch.data` index 2 and `arch.data` index 1, adjusted close) the fit of
``errdist.estimate.mle._mle_sorted`` (the engine of ``errdist.fit``) is compared with the
brute-force search of ``tests/mle_bruteforce.py`` (every observation as location for b ≤ 1,
a dense shape grid with the exact convex location for b ≥ 1, both refined by scipy's bounded
scalar minimiser). Also checked: the fit does not change with ``start``; the batched refit
(``mle_sorted_rows``) equals the one-row fit; simulated samples with ties (prices rounded to
cents). A window counts as *short* when the brute force beats the fit by more than 1e-9
relative.

Run: python tests/benchmarks/verify_mle_bruteforce.py [--stride K] [--windows 250,1000,5000]
(the full count with --stride 1 takes about an hour per series on the 2-core machine).
"""

from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from errdist.estimate.mle import _mle_sorted  # noqa: E402
from errdist.estimate.mle_batch import mle_sorted_rows  # noqa: E402
from mle_bruteforce import brute_force  # noqa: E402


def _returns(name: str) -> np.ndarray:
    from real_series import index as real_index

    prices = (
        (real_index(2) if name == "index2" else real_index(1)).load()["Adj Close"].to_numpy(float)
    )
    return np.diff(np.log(prices))


def _check(xs: np.ndarray) -> tuple[float, float, float]:
    """(brute − fit, largest change of loglik over starts, fit loglik) for one sorted sample."""
    m, a, b, ll = _mle_sorted(xs)
    best = brute_force(xs)[0]
    spread = max(abs(_mle_sorted(xs, s)[3] - ll) for s in (0.3, 3.0))
    return best - ll, spread / max(1.0, abs(ll)), ll


def windows(name: str, w: int, stride: int, limit: int, offset: int = 0) -> None:
    r = _returns(name)
    ends = list(range(w + offset, r.size + 1, stride))
    if len(ends) > limit:  # evenly spread over the series
        ends = [ends[int(k)] for k in np.linspace(0, len(ends) - 1, limit)]
    t0 = time.process_time()
    short, worst, moved = 0, -np.inf, 0
    batch_rows = []
    for t in ends:
        xs = np.sort(r[t - w : t])
        gap, spread, ll = _check(xs)
        tol = 1e-9 * max(1.0, abs(ll))
        short += gap > tol
        worst = max(worst, gap)
        moved += spread > 1e-12
        if len(batch_rows) < 100:
            batch_rows.append(xs)
    rows = np.array(batch_rows)
    bl = mle_sorted_rows(rows, 1.0)[3]
    one = np.array([_mle_sorted(x)[3] for x in rows])
    batch_diff = float(np.max(np.abs(bl - one) / np.maximum(1.0, np.abs(one))))
    print(
        f"{name} window {w}: {len(ends)} windows (stride {stride}, offset {offset}), "
        f"short {short}, "
        f"largest brute-fit {worst:.3g}, start changes loglik on {moved}, "
        f"batched vs one-row (first {rows.shape[0]} windows) max rel diff {batch_diff:.2g}, "
        f"{time.process_time() - t0:.0f} s CPU",
        flush=True,
    )


def rounded_prices(samples: int = 30, n: int = 250) -> None:
    """Simulated prices rounded to cents: many exactly repeated returns."""
    from scipy import stats

    short = 0
    at_min = 0
    for seed in range(samples):
        rng = np.random.default_rng(seed)
        steps = 0.01 * stats.gennorm.rvs(1.2, size=n, random_state=rng)
        prices = np.round(20.0 * np.exp(np.cumsum(steps)), 2)
        x = np.diff(prices) / prices[:-1]
        xs = np.sort(x)
        _, _, b, ll = _mle_sorted(xs)
        short += brute_force(xs)[0] > ll + 1e-9 * abs(ll)
        at_min += b == 0.1
    print(f"rounded prices: {samples} samples, short {short}, shape at lower bound {at_min}")


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--stride", type=int, default=1)
    ap.add_argument("--windows", default="250,1000,5000")
    ap.add_argument("--series", default="index2,index1")
    ap.add_argument("--limit5000", type=int, default=40)
    ap.add_argument("--offset", type=int, default=0, help="first window ends this much later")
    ap.add_argument("--no-rounded", action="store_true", help="skip the rounded-price samples")
    args = ap.parse_args()
    for name in args.series.split(","):
        for w in (int(v) for v in args.windows.split(",")):
            stride = args.stride if w < 5000 else max(args.stride, 100)
            windows(name, w, stride, args.limit5000 if w >= 5000 else 10**9, args.offset)
    if not args.no_rounded:
        rounded_prices()


if __name__ == "__main__":
    main()
