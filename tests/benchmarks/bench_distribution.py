"""Benchmark: errdist.law.symmetric against scipy.stats.gennorm, measured side by side.

Run: ``python tests/benchmarks/bench_distribution.py [--repeat N]``.
Prints best-of-N timings and the ratio ours / scipy for each case. Targets (docs/performance.md,
"Distribution functions"): scalar cdf <= 1/20 of scipy's scalar call; array cdf on 1,000,000
points no slower than scipy.
"""

from __future__ import annotations

import argparse
import platform
import timeit

import numpy as np
import scipy
from scipy import stats

import errdist.law as D


def best(stmt, number: int, repeat: int) -> float:  # type: ignore[no-untyped-def]
    """Best time per call in seconds over ``repeat`` runs of ``number`` calls."""
    return min(timeit.repeat(stmt, number=number, repeat=repeat)) / number


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--repeat", type=int, default=7)
    args = parser.parse_args()
    r = args.repeat
    g = stats.gennorm
    loc, scale, shape = 0.001, 0.012, 1.3
    print(f"parameters: loc={loc}, scale={scale}, shape={shape} unless named")
    print(
        f"Python {platform.python_version()}  numpy {np.__version__}  scipy {scipy.__version__}"
        f"  {platform.machine()}  best of {r}"
    )

    scalar_cases = [
        ("cdf", lambda: D.cdf(-0.02, loc, scale, shape), lambda: g.cdf(-0.02, shape, loc, scale)),
        ("sf", lambda: D.sf(0.02, loc, scale, shape), lambda: g.sf(0.02, shape, loc, scale)),
        ("pdf", lambda: D.pdf(-0.02, loc, scale, shape), lambda: g.pdf(-0.02, shape, loc, scale)),
        ("ppf", lambda: D.ppf(0.01, loc, scale, shape), lambda: g.ppf(0.01, shape, loc, scale)),
        ("isf", lambda: D.isf(0.01, loc, scale, shape), lambda: g.isf(0.01, shape, loc, scale)),
        (
            "logcdf",
            lambda: D.logcdf(-0.02, loc, scale, shape),
            lambda: g.logcdf(-0.02, shape, loc, scale),
        ),
    ]
    print("\nscalar calls (one Python float in, float out)")
    print(f"{'function':10s} {'ours [us]':>10s} {'scipy [us]':>11s} {'ratio':>8s}")
    for name, ours, ref in scalar_cases:
        t_ours = best(ours, 20_000, r)
        t_ref = best(ref, 2_000, r)
        print(f"{name:10s} {t_ours * 1e6:10.2f} {t_ref * 1e6:11.2f} {t_ours / t_ref:8.3f}")

    rng = np.random.default_rng(20261202)
    n = 1_000_000
    x = rng.standard_normal(n) * 0.02
    p = rng.random(n)
    array_cases = [
        ("cdf", lambda: D.cdf(x, loc, scale, shape), lambda: g.cdf(x, shape, loc, scale)),
        ("sf", lambda: D.sf(x, loc, scale, shape), lambda: g.sf(x, shape, loc, scale)),
        ("pdf", lambda: D.pdf(x, loc, scale, shape), lambda: g.pdf(x, shape, loc, scale)),
        ("logcdf", lambda: D.logcdf(x, loc, scale, shape), lambda: g.logcdf(x, shape, loc, scale)),
        ("ppf", lambda: D.ppf(p, loc, scale, shape), lambda: g.ppf(p, shape, loc, scale)),
        ("cdf b=2", lambda: D.cdf(x, loc, scale, 2.0), lambda: g.cdf(x, 2.0, loc, scale)),
        ("cdf b=1", lambda: D.cdf(x, loc, scale, 1.0), lambda: g.cdf(x, 1.0, loc, scale)),
    ]
    print(f"\narrays of {n:,} points")
    print(f"{'function':10s} {'ours [ms]':>10s} {'scipy [ms]':>11s} {'ratio':>8s}")
    for name, ours, ref in array_cases:
        t_ours = best(ours, 1, r)
        t_ref = best(ref, 1, r)
        print(f"{name:10s} {t_ours * 1e3:10.1f} {t_ref * 1e3:11.1f} {t_ours / t_ref:8.3f}")


if __name__ == "__main__":
    main()
