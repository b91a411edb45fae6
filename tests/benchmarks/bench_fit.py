"""Benchmark: errdist.fit (exact MLE) against scipy.stats.gennorm.fit, side by side.

Run:  python tests/benchmarks/bench_fit.py  [--quick]

For each case the same seeded sample (scipy.stats.gennorm.rvs) is fitted alternately by
both, several times; the best and the median CPU time (``time.process_time``: the
machine is shared, so wall time mostly measures the neighbours) are printed with the ratio
scipy / errdist, and the two log-likelihoods are compared (errdist must not be lower).
Target: at n = 100,000, errdist's time <= 1/10 of scipy's (ratio >= 10) at shapes 0.7, 0.9,
1.05, 1.5 and 2.5, over several seeds (scipy's own time varies about 3x by seed): the script
prints the ratio per seed and its minimum and median per shape. Smaller samples follow.
"""

from __future__ import annotations

import argparse
import platform
import statistics
import sys
import time
from collections.abc import Callable

import numpy as np
import scipy
from scipy import stats

import errdist
from errdist.estimate import fit


def _timed(func: Callable[[], object]) -> tuple[float, object]:
    """CPU time of one call: on a shared machine, wall time mostly measures the neighbours."""
    t0 = time.process_time()
    out = func()
    return time.process_time() - t0, out


def bench(n: int, shape: float, repeats: int, seed: int = 20261202) -> dict[str, float]:
    """Fit one seeded sample ``repeats`` times with each library, interleaved."""
    x = stats.gennorm.rvs(shape, loc=0.0003, scale=0.01, size=n, random_state=seed)
    ours: list[float] = []
    theirs: list[float] = []
    f = fit(x)  # warm-up (imports, caches)
    p = stats.gennorm.fit(x)
    for _ in range(repeats):
        dt, f = _timed(lambda: fit(x))
        ours.append(dt)
        dt, p = _timed(lambda: stats.gennorm.fit(x))
        theirs.append(dt)
    ll_scipy = float(stats.gennorm.logpdf(x, *p).sum())
    return {
        "n": n,
        "shape": shape,
        "ours_best": min(ours),
        "ours_median": statistics.median(ours),
        "scipy_best": min(theirs),
        "scipy_median": statistics.median(theirs),
        "ll_ours": f.loglik,
        "ll_scipy": ll_scipy,
        "b_ours": f.shape,
        "b_scipy": float(p[0]),
    }


def bench_repeated(n: int, shape: float, fits: int, seed: int = 7) -> tuple[float, float]:
    """Mean time per fit over ``fits`` different samples (rolling-window style use)."""
    rng = np.random.default_rng(seed)
    xs = stats.gennorm.rvs(shape, scale=0.01, size=(fits, n), random_state=rng)
    t0 = time.process_time()
    for row in xs:
        fit(row)
    ours = (time.process_time() - t0) / fits
    k = max(1, fits // 10)
    t0 = time.process_time()
    for row in xs[:k]:
        stats.gennorm.fit(row)
    theirs = (time.process_time() - t0) / k
    return ours, theirs


def _row(r: dict[str, float]) -> None:
    print(
        f"{r['n']:>7} {r['shape']:>5} {r['ours_best'] * 1e3:>7.2f} ({r['ours_median'] * 1e3:>6.2f}) "
        f"{r['scipy_best'] * 1e3:>7.2f} ({r['scipy_median'] * 1e3:>6.2f}) "
        f"{r['scipy_best'] / r['ours_best']:>5.1f} ({r['scipy_median'] / r['ours_median']:>4.1f}) "
        f"{r['ll_ours'] - r['ll_scipy']:>23.3e} {r['b_ours']:>9.4f} {r['b_scipy']:>9.4f}",
        flush=True,
    )


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="fewer repeats")
    args = parser.parse_args(argv)
    q = 0.4 if args.quick else 1.0
    print(
        f"errdist {errdist.__version__}, numpy {np.__version__}, scipy {scipy.__version__}, "
        f"Python {platform.python_version()}, {platform.machine()}"
    )
    header = (
        f"{'n':>7} {'shape':>5} {'errdist ms':>16} {'scipy ms':>16} {'ratio':>11} "
        f"{'loglik errdist - scipy':>23} {'b errdist':>9} {'b scipy':>9}"
    )
    print(header)
    print("-" * len(header))
    ratios: dict[float, list[float]] = {}
    for shape in (0.7, 0.9, 1.05, 1.5, 2.5):
        for seed in (1, 2, 3):
            r = bench(100_000, shape, max(2, int(4 * q)), seed=seed)
            ratios.setdefault(shape, []).append(r["scipy_best"] / r["ours_best"])
            _row(r)
    for n, shape, reps in ((2_500, 0.9, 40), (2_500, 1.5, 40), (250, 0.9, 60), (250, 1.05, 60)):
        _row(bench(n, shape, max(3, int(reps * q))))
    for shape, v in ratios.items():
        print(
            f"n = 100,000, shape {shape}: ratio scipy/errdist min {min(v):.1f}, "
            f"median {statistics.median(v):.1f} over {len(v)} seeds  target >= 10: "
            f"{'met' if min(v) >= 10 else 'MISSED'}"
        )
    print("CPU times: best (median); ratio = scipy / errdist")
    for n, shape, fits in ((250, 0.9, 1000), (1260, 0.9, 300), (1260, 1.05, 300)):
        ours, theirs = bench_repeated(n, shape, max(20, int(fits * q)))
        print(
            f"repeated fits n={n} shape {shape}: errdist {ours * 1e3:.3f} ms/fit, "
            f"scipy {theirs * 1e3:.3f} ms/fit, ratio {theirs / ours:.1f}"
        )
    return 0


if __name__ == "__main__":
    sys.exit(main())
