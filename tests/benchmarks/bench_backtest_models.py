"""Benchmark: long one-day 99 % VaR backtests on real index series, errdist vs arch's skew-t.

Protocol (the same for every model, measured in one run): arch.data index 2 and index 1 daily log
returns (1999-2018, shipped with arch); parameters re-estimated every 21 days on the 1,000
returns before the day; volatility filtered daily by arch's fixed-parameter one-step forecasts;
forecasts from day 1,001 to the end (4,030 days per series).

Models:
- errdist GJR-GARCH(1,1) + skewed error law (errdist.risk.forecasts, model "gjr");
- errdist GJR-GARCH(1,1) + symmetric error law with errdist's shape bounds (skew fixed at 0);
- arch GJR-GARCH(1,1) + skew-t (arch.univariate.SkewStudent, Hansen 1994) — the reference;
- arch GJR-GARCH(1,1) + arch's GeneralizedError (shape bounded at 1.01).

Targets (issue 11): errdist's GJR + skewed law passes Kupiec and Christoffersen independence
(p > 0.05) on both series; its exception rate is at least as close to 1 % as the skew-t's.
Then times ``errdist backtest`` on 5,000 index 2 prices with all four default models
(target < 60 s wall time), printing wall and CPU time and the ratio to the target.

A robustness grid (``--grid``) repeats errdist's GJR + skewed law and arch's GJR + skew-t on
both series for other protocol settings within the target's terms (refit every 10 days; a
750-day estimation window), so a conclusion does not rest on one setting.

``--models-table`` prints, for both series, every model of ``errdist backtest`` (defaults:
window 250, fit window 1,000, refit 21, 1,000 ES simulations) as a markdown table.

Run: python tests/benchmarks/bench_backtest_models.py [--grid | --models-table] [--no-cli]
"""

from __future__ import annotations

import os
import resource
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np
from arch.univariate import GARCH, ConstantMean, GeneralizedError, SkewStudent

from errdist.checks.backtest import backtest
from errdist.risk.arch_law import SkewedErrorInnovations
from errdist.risk.conditional import law_risk
from errdist.risk.forecasts import gjr_path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))  # tests/: real_series
from real_series import index as real_index  # noqa: E402

CONFIDENCE = 0.99
FIT_WINDOW = 1000
REFIT = 21


def _arch_factory(dist_cls):
    def make(y):
        return ConstantMean(y, volatility=GARCH(1, 1, 1), distribution=dist_cls(), rescale=False)

    return make


def _run(
    r: np.ndarray, label: str, factory, var_of, fit_window: int = FIT_WINDOW, refit: int = REFIT
) -> dict:
    t0 = time.perf_counter()
    c0 = time.process_time()
    # every setting forecasts the same days: from day FIT_WINDOW (the largest window) on
    mu, sd, dist, refits, warns = gjr_path(r, FIT_WINDOW, fit_window, refit, model_factory=factory)
    sl = slice(FIT_WINDOW, None)
    var = var_of(mu[sl], sd[sl], dist[sl])
    bt = backtest(r[sl], var, CONFIDENCE)
    return {
        "model": label,
        "n": bt.n,
        "exc": bt.exceptions,
        "rate": bt.exceptions / bt.n,
        "kupiec": bt.pof.pvalue,
        "ind": bt.independence.pvalue,
        "cc": bt.conditional_coverage.pvalue,
        "wall": time.perf_counter() - t0,
        "cpu": time.process_time() - c0,
        "warn": len(warns),
    }


def _errdist_var(mu, sd, dist):
    return law_risk(CONFIDENCE, mu, sd, dist[:, 0], dist[:, 1])[0]


def _errdist_sym_var(mu, sd, dist):
    return law_risk(CONFIDENCE, mu, sd, dist[:, 0], 0.0)[0]


def _skewt_var(mu, sd, dist):
    d = SkewStudent()
    q = np.array([d.ppf(1 - CONFIDENCE, p) for p in dist])
    return -(mu + sd * q)


def _ged_var(mu, sd, dist):
    d = GeneralizedError()
    q = np.array([d.ppf(1 - CONFIDENCE, p) for p in dist])
    return -(mu + sd * q)


def _cli_timing() -> None:
    prices = real_index(2).load()["Adj Close"].iloc[-5000:]
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "index2_5000.csv"
        prices.to_frame("Close").rename_axis("Date").to_csv(path)
        env = dict(os.environ)
        before = resource.getrusage(resource.RUSAGE_CHILDREN)
        t0 = time.perf_counter()
        proc = subprocess.run(
            [sys.executable, "-m", "errdist.cli", "backtest", "--prices", str(path)],
            capture_output=True,
            text=True,
            env=env,
            check=False,
        )
        wall = time.perf_counter() - t0
        after = resource.getrusage(resource.RUSAGE_CHILDREN)
    cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
    print()
    print("errdist backtest --prices <5,000 index 2 prices> (models symmetric,skewed,ewma,gjr)")
    print(proc.stdout)
    if proc.returncode != 0:
        print(proc.stderr)
    print(f"wall {wall:.1f} s, CPU {cpu:.1f} s; wall / 60 s target = {wall / 60:.2f}")


def _grid() -> None:
    print("\nrobustness grid: errdist GJR + skewed law vs arch GJR + skew-t, same forecast days")
    print(
        f"{'series':<8}{'fit window':>11}{'refit':>6}{'model':>10}{'exc':>5}{'rate':>8}"
        f"{'Kupiec p':>10}{'indep p':>9}{'CPU s':>7}"
    )
    for name, mod in {"index2": real_index(2), "index1": real_index(1)}.items():
        r = np.diff(np.log(mod.load()["Adj Close"].to_numpy()))
        for fw, k in ((1000, 10), (750, 21)):
            for label, fac, vo in (
                ("errdist", None, _errdist_var),
                ("skew-t", _arch_factory(SkewStudent), _skewt_var),
            ):
                x = _run(r, label, fac, vo, fit_window=fw, refit=k)
                print(
                    f"{name:<8}{fw:>11}{k:>6}{label:>10}{x['exc']:>5}{100 * x['rate']:>7.2f}%"
                    f"{x['kupiec']:>10.3f}{x['ind']:>9.3f}{x['cpu']:>7.1f}",
                    flush=True,
                )


def _models_table() -> None:
    from errdist.checks.model_backtest import backtest_models

    print(
        "| series | model | n | exceptions | rate | Kupiec p | indep. p | cond. cov. p "
        "| ES Z2 | ES p | zone (last 250 d) | CPU s |"
    )
    print("|---|---|---:|---:|---:|---:|---:|---:|---:|---:|---|---:|")
    for name, mod in {"index2": real_index(2), "index1": real_index(1)}.items():
        r = np.diff(np.log(mod.load()["Adj Close"].to_numpy()))
        for m in ("symmetric", "skewed", "ewma", "garch", "gjr"):
            c0 = time.process_time()
            b = backtest_models(r, [m])[m]
            cpu = time.process_time() - c0
            print(
                f"| {name} | {m} | {b.n:,} | {b.exceptions} | {100 * b.exception_rate:.2f} % "
                f"| {b.kupiec_pvalue:.3f} | {b.independence_pvalue:.3f} "
                f"| {b.conditional_coverage_pvalue:.3f} | {b.es_statistic:.3f} "
                f"| {b.es_pvalue:.3f} | {b.zone} ({b.zone_exceptions}) | {cpu:.1f} |",
                flush=True,
            )


def main() -> None:
    if "--models-table" in sys.argv:
        _models_table()
        return
    if "--grid" in sys.argv:
        _grid()
        return
    print(f"load average at start: {os.getloadavg()}")
    series = {"index2": real_index(2), "index1": real_index(1)}
    for name, mod in series.items():
        r = np.diff(np.log(mod.load()["Adj Close"].to_numpy()))
        rows = [
            _run(r, "errdist GJR + skewed error law", None, _errdist_var),
            _run(
                r,
                "errdist GJR + error law (skew 0)",
                lambda y: ConstantMean(
                    y,
                    volatility=GARCH(1, 1, 1),
                    distribution=SkewedErrorInnovations(False),
                    rescale=False,
                ),
                _errdist_sym_var,
            ),
            _run(r, "arch GJR + skew-t (reference)", _arch_factory(SkewStudent), _skewt_var),
            _run(r, "arch GJR + GED (nu > 1.01)", _arch_factory(GeneralizedError), _ged_var),
        ]
        print(
            f"\n{name}: {len(r):,} returns, {rows[0]['n']:,} forecasts, 99 % one-day VaR, "
            f"refit every {REFIT} days on {FIT_WINDOW} days"
        )
        print(
            f"{'model':<36}{'exc':>5}{'rate':>8}{'|rate-1%|':>11}{'Kupiec p':>10}"
            f"{'indep p':>9}{'cc p':>7}{'wall s':>8}{'CPU s':>7}{'warn':>5}"
        )
        for x in rows:
            print(
                f"{x['model']:<36}{x['exc']:>5}{100 * x['rate']:>7.2f}%"
                f"{100 * abs(x['rate'] - 0.01):>10.2f}%{x['kupiec']:>10.3f}{x['ind']:>9.3f}"
                f"{x['cc']:>7.3f}{x['wall']:>8.1f}{x['cpu']:>7.1f}{x['warn']:>5}"
            )
        ours, ref = rows[0], rows[2]
        closer = abs(ours["rate"] - 0.01) <= abs(ref["rate"] - 0.01)
        passes = ours["kupiec"] > 0.05 and ours["ind"] > 0.05
        print(
            f"targets: passes Kupiec and independence: {passes}; at least as close to 1 % as "
            f"skew-t: {closer} (distance ratio errdist/skew-t = "
            f"{abs(ours['rate'] - 0.01) / max(abs(ref['rate'] - 0.01), 1e-12):.2f}); "
            f"CPU ratio errdist/skew-t = {ours['cpu'] / ref['cpu']:.2f}"
        )
    if "--no-cli" not in sys.argv:
        _cli_timing()


if __name__ == "__main__":
    main()
