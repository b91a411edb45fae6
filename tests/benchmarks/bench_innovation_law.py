"""Benchmark: the skewed law on the conditional models' hot paths, vs arch's own error law.

1. Log-likelihood: ``errdist.risk.arch_law.SkewedErrorInnovations.loglikelihood`` (through
   ``errdist.risk.innovation_law`` and ``errdist.law.skewed``) against
   ``arch.univariate.GeneralizedError.loglikelihood`` (the symmetric law, the same work per
   element), side by side on standardized residuals of n = 1,000 and 5,000, and in whole
   GJR-GARCH(1,1) fits on arch.data index 2 / index 1 windows of 1,000 returns (CPU time).
2. Rolling refits of the skewed law: ``fit_skewed(..., start=previous, method="local")`` against
   the exact search ``fit_skewed(...)`` on 30 windows 21 days apart (250 and 1,000 returns),
   with the local search's largest log-likelihood shortfall.

Run: python tests/benchmarks/bench_innovation_law.py
"""

from __future__ import annotations

import sys
import time
import timeit
from pathlib import Path

import numpy as np
from arch.univariate import GARCH, ConstantMean, GeneralizedError

from errdist.law.skewed import fit_skewed
from errdist.risk.arch_law import SkewedErrorInnovations

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))  # tests/: real_series
from real_series import index as real_index  # noqa: E402


def _returns(mod) -> np.ndarray:  # type: ignore[no-untyped-def]
    return np.diff(np.log(mod.load()["Adj Close"].to_numpy()))


def _loglik_calls() -> None:
    ours, ref = SkewedErrorInnovations(), GeneralizedError()
    for n in (1000, 5000):
        rng = np.random.default_rng(n)
        z = rng.standard_normal(n)
        s2 = np.exp(rng.normal(0.0, 0.3, n))
        t_ours = t_ref = np.inf
        for _ in range(15):
            t_ours = min(
                t_ours,
                timeit.timeit(
                    lambda z=z, s2=s2: ours.loglikelihood([1.3, -0.1], z, s2), number=200
                ),
            )
            t_ref = min(
                t_ref, timeit.timeit(lambda z=z, s2=s2: ref.loglikelihood([1.3], z, s2), number=200)
            )
        print(
            f"loglikelihood n={n}: errdist skewed {t_ours / 200 * 1e6:.1f} us, "
            f"arch GeneralizedError {t_ref / 200 * 1e6:.1f} us, ratio {t_ours / t_ref:.2f}"
        )


def _gjr_fits() -> None:
    for name, mod in (("index2", real_index(2)), ("index1", real_index(1))):
        r = 100.0 * _returns(mod)
        best = {"errdist": np.inf, "arch": np.inf}
        for _ in range(3):
            for key, dist in (("errdist", SkewedErrorInnovations), ("arch", GeneralizedError)):
                t = time.process_time()
                for t0 in (1500, 2500, 3500, 4500):
                    vol = GARCH(1, 1, 1)
                    ConstantMean(r[t0 - 1000 : t0], volatility=vol, distribution=dist()).fit(
                        disp="off"
                    )
                best[key] = min(best[key], time.process_time() - t)
        print(
            f"{name}: 4 GJR fits, errdist skewed law {best['errdist'] * 1e3:.0f} ms CPU, "
            f"arch GeneralizedError {best['arch'] * 1e3:.0f} ms, "
            f"ratio {best['errdist'] / best['arch']:.2f}"
        )


def _rolling_fits() -> None:
    for name, mod in (("index2", real_index(2)), ("index1", real_index(1))):
        r = _returns(mod)
        for w in (250, 1000):
            prev, t_local, t_exact, short = None, 0.0, 0.0, 0.0
            for t0 in range(1000, 1000 + 21 * 30, 21):
                x = r[t0 - w : t0]
                t = time.process_time()
                f = fit_skewed(x, start=prev, method="local")
                t_local += time.process_time() - t
                prev = f
                t = time.process_time()
                e = fit_skewed(x)
                t_exact += time.process_time() - t
                short = max(short, e.loglik - f.loglik)
            print(
                f"{name} window {w}: local {t_local / 30 * 1e3:.1f} ms/fit, exact "
                f"{t_exact / 30 * 1e3:.0f} ms/fit (ratio {t_exact / t_local:.1f}), "
                f"largest loglik shortfall of local {short:.2e}"
            )


if __name__ == "__main__":
    _loglik_calls()
    _gjr_fits()
    _rolling_fits()
