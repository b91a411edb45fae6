"""Benchmark: the skewed error law (errdist.law.skewed) against scipy.stats, side by side.

Run: ``python tests/benchmarks/bench_skewed.py [--repeat N]``.
Prints best-of-N timings and the ratio ours / scipy. References of a comparable law:
``scipy.stats.laplace_asymmetric`` (the same law at shape 1) and ``scipy.stats.gennorm`` (the
symmetric error law, no skew). Target (issue: skewed law): scalar cdf <= 1/20 of a scalar
scipy.stats call. Also reported: array cdf on 1,000,000 points, and the exact MLE fit on
real series (arch.data index 2 / index 1 windows) next to the symmetric fit.
"""

from __future__ import annotations

import argparse
import math
import platform
import sys
import timeit
from pathlib import Path

import numpy as np
import scipy
from scipy import stats

import errdist
from errdist.law import skewed as K

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))  # tests/: real_series


def best(stmt, number: int, repeat: int) -> float:  # type: ignore[no-untyped-def]
    """Best time per call in seconds over ``repeat`` runs of ``number`` calls."""
    return min(timeit.repeat(stmt, number=number, repeat=repeat)) / number


def laplace_ref(lam: float, loc: float, scale: float):  # type: ignore[no-untyped-def]
    """scipy's asymmetric Laplace equal to the skewed law at shape 1."""
    kappa = math.sqrt((1 - lam) / (1 + lam))
    return kappa, loc, scale * math.sqrt(1 - lam * lam)


def laplace_cases(lam: float, loc: float, scale: float) -> list:  # type: ignore[type-arg]
    """(name, ours, scipy) scalar calls at shape 1 for one skew."""
    la = stats.laplace_asymmetric
    kappa, lo, sc = laplace_ref(lam, loc, scale)
    return [
        ("cdf", lambda: K.cdf(-0.02, loc, scale, 1.0, lam), lambda: la.cdf(-0.02, kappa, lo, sc)),
        ("sf", lambda: K.sf(0.02, loc, scale, 1.0, lam), lambda: la.sf(0.02, kappa, lo, sc)),
        ("pdf", lambda: K.pdf(-0.02, loc, scale, 1.0, lam), lambda: la.pdf(-0.02, kappa, lo, sc)),
        ("ppf", lambda: K.ppf(0.01, loc, scale, 1.0, lam), lambda: la.ppf(0.01, kappa, lo, sc)),
        (
            "logcdf",
            lambda: K.logcdf(-0.02, loc, scale, 1.0, lam),
            lambda: la.logcdf(-0.02, kappa, lo, sc),
        ),
    ]


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--repeat", type=int, default=5)
    args = parser.parse_args()
    r = args.repeat
    loc, scale = 0.001, 0.012
    print(
        f"Python {platform.python_version()}  numpy {np.__version__}  scipy {scipy.__version__}"
        f"  {platform.machine()}  best of {r}"
    )

    print("\nscalar calls, shape 1 vs scipy.stats.laplace_asymmetric (the same law)")
    print(f"{'function':8s} {'skew':>6s} {'ours [us]':>10s} {'scipy [us]':>11s} {'ratio':>8s}")
    la = stats.laplace_asymmetric
    for lam in (-0.3, 0.2):
        cases = laplace_cases(lam, loc, scale)
        for name, ours, ref in cases:
            t_ours, t_ref = best(ours, 20_000, r), best(ref, 1_000, r)
            print(
                f"{name:8s} {lam:6.2f} {t_ours * 1e6:10.2f} {t_ref * 1e6:11.2f} {t_ours / t_ref:8.3f}"
            )

    print("\nscalar cdf over shapes vs scipy.stats.gennorm (symmetric; comparable law)")
    print(f"{'shape':>6s} {'skew':>6s} {'ours [us]':>10s} {'scipy [us]':>11s} {'ratio':>8s}")
    g = stats.gennorm
    for shape in (0.7, 1.0, 1.3, 2.0, 4.0):
        for lam in (-0.4, 0.0, 0.3):
            t_ours = best(lambda: K.cdf(-0.02, loc, scale, shape, lam), 20_000, r)  # noqa: B023
            t_ref = best(lambda: g.cdf(-0.02, shape, loc, scale), 1_000, r)  # noqa: B023
            print(
                f"{shape:6.2f} {lam:6.2f} {t_ours * 1e6:10.2f} {t_ref * 1e6:11.2f} {t_ours / t_ref:8.3f}"
            )

    print("\narray cdf, 1,000,000 points")
    rng = np.random.default_rng(20261202)
    x = loc + scale * rng.standard_normal(1_000_000) * 1.5
    print(
        f"{'shape':>6s} {'skew':>6s} {'ours [ms]':>10s} {'scipy [ms]':>11s} {'ratio':>8s}  reference"
    )
    for shape, lam in ((1.0, -0.3), (1.3, -0.3), (2.0, 0.2)):
        t_ours = best(lambda: K.cdf(x, loc, scale, shape, lam), 1, r)  # noqa: B023
        if shape == 1.0:
            kappa, lo, sc = laplace_ref(lam, loc, scale)
            t_ref = best(lambda: la.cdf(x, kappa, lo, sc), 1, r)  # noqa: B023
            ref_name = "laplace_asymmetric"
        else:
            t_ref = best(lambda: g.cdf(x, shape, loc, scale), 1, r)  # noqa: B023
            ref_name = "gennorm (no skew)"
        print(
            f"{shape:6.2f} {lam:6.2f} {t_ours * 1e3:10.1f} {t_ref * 1e3:11.1f} {t_ours / t_ref:8.3f}  {ref_name}"
        )

    try:
        from real_series import index as real_index
    except ImportError:
        print("\nfit timings skipped: the arch package (arch.data) is not installed")
        return
    print("\nexact MLE on real daily log returns (seconds, best of 3)")
    print(f"{'series':22s} {'n':>6s} {'skewed':>8s} {'symmetric':>10s} {'shape':>7s} {'skew':>8s}")
    for label, mod in (("index2", real_index(2)), ("index1", real_index(1))):
        ret = np.diff(np.log(mod.load()["Adj Close"].to_numpy()))
        for n in (250, 1000, ret.size):
            xw = ret[-n:]
            ts = min(timeit.repeat(lambda: K.fit_skewed(xw), number=1, repeat=3))  # noqa: B023
            tf = min(timeit.repeat(lambda: errdist.fit(xw), number=1, repeat=3))  # noqa: B023
            f = K.fit_skewed(xw)
            print(
                f"{label + ' last ' + str(n):22s} {n:6d} {ts:8.3f} {tf:10.3f} {f.shape:7.3f} {f.skew:8.4f}"
            )


if __name__ == "__main__":
    main()
