"""Benchmark: errdist.law.symmetric against scipy.stats.gennorm, measured side by side.

Run: ``python tests/benchmarks/bench_distribution.py [--repeat N]``.
Prints best-of-N timings and the ratio ours / scipy for each case. Targets (docs/performance.md,
"Distribution functions"): scalar calls <= 1/20 of scipy's scalar call; on the grid of shapes
{0.6, 0.92, 1.0, 1.3, 2, 4} x two point sets (x ~ N(0, (2a)^2) and x uniform over +-16 scales),
1,000,000 points, every array cell (cdf, sf, logcdf, logsf, pdf, ppf) no slower than scipy.
``--grid-only`` skips the scalar and single-shape sections; ``--n`` sets the array length.
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
    parser.add_argument("--n", type=int, default=1_000_000)
    parser.add_argument("--grid-only", action="store_true")
    args = parser.parse_args()
    r = args.repeat
    if args.grid_only:
        grid(args.n, r)
        return
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
    grid(n, r)


GRID_SHAPES = (0.6, 0.92, 1.0, 1.3, 2.0, 4.0)
GRID_FUNCTIONS = ("cdf", "sf", "logcdf", "logsf", "pdf", "ppf")


def grid(n: int, r: int) -> None:
    """Ratio ours / scipy for every function x shape x point set (the issue-10 grid)."""
    g = stats.gennorm
    loc, scale = 0.001, 0.012
    rng = np.random.default_rng(20261203)
    sets = {
        "normal": loc + rng.standard_normal(n) * 2.0 * scale,
        "uniform16": loc + rng.uniform(-16.0, 16.0, n) * scale,
    }
    print(f"\ngrid: arrays of {n:,} points, loc={loc}, scale={scale}, best of {r}")
    print("point sets: normal = x ~ N(loc, (2 scale)^2); uniform16 = x ~ U(loc -+ 16 scale)")
    print("ppf uses p = cdf(x) of the same points")
    print(f"{'function':8s} {'points':10s} " + " ".join(f"{b:>7g}" for b in GRID_SHAPES))
    worst = 0.0
    for name in GRID_FUNCTIONS:
        ours_f = getattr(D, name)
        ref_f = getattr(g, name)
        for set_name, x in sets.items():
            cells = []
            for b in GRID_SHAPES:
                arg = D.cdf(x, loc, scale, b) if name == "ppf" else x
                t_ours = best(lambda: ours_f(arg, loc, scale, b), 1, r)  # noqa: B023
                t_ref = best(lambda: ref_f(arg, b, loc, scale), 1, r)  # noqa: B023
                cells.append(t_ours / t_ref)
            worst = max(worst, *cells)
            print(f"{name:8s} {set_name:10s} " + " ".join(f"{c:7.3f}" for c in cells))
    print(f"worst ratio on the grid: {worst:.3f} (target <= 1.0)")


if __name__ == "__main__":
    main()
