"""Benchmark: errdist panel on dask.distributed (local worker processes).

Targets (issue 14):

1. 2,000 series x 1,260 daily returns, fits (MLE and moments) + VaR/ES at 95/97.5/99 % for 1
   and 10 days, no goodness of fit, no rivals, no backtest: < 30 s with 2 local workers.
   Reference side by side: the same work serially in this process.
2. Rolling backtests (window 250, 1,000 one-day VaR forecasts per series) on 200 series:
   2 workers >= 1.7x faster than 1 worker (both measured here, cluster start excluded).
3. Memory per worker (resident set size) after 50 and after 200 series: flat as series grow.

Data: a grid of invented error-law series (shapes 0.8 to 2.2, scales 0.5 % to 2.5 %, one seed
per series) plus the index 2 and index 1 returns shipped in ``arch`` (``arch.data``).
Also printed: the reading time of the 2,000-series wide CSV, and the per-series cost of the
rival-law comparison and of the goodness-of-fit bootstrap (199 samples), measured on a few
series, for the on-paper estimate in docs/panel.md.

Run: python tests/benchmarks/bench_panel.py  [--quick]
"""

from __future__ import annotations

import argparse
import os
import sys
import tempfile
import time
from pathlib import Path

import numpy as np
import pandas as pd

import errdist
from errdist.panel import default_options, read_panel
from errdist.panel.execute import PanelData, auto_block_size, make_blocks, run_dask, run_serial
from errdist.panel.job import series_row

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))  # tests/: real_series

SHAPES = (0.8, 1.0, 1.2, 1.5, 1.8, 2.2)
SCALES = (0.005, 0.01, 0.015, 0.025)


def _grid(n_series: int, n_returns: int, seed: int = 20261202) -> tuple[list[str], list]:
    names, series = [], []
    try:
        from real_series import index as real_index

        for label, mod in (("INDEX2", real_index(2)), ("INDEX1", real_index(1))):
            p = mod.load()["Adj Close"].to_numpy()
            series.append(np.diff(np.log(p))[-n_returns:])
            names.append(label)
    except ImportError:
        pass
    ss = np.random.SeedSequence(seed)
    for k, child in enumerate(ss.spawn(n_series - len(series))):
        b = SHAPES[k % len(SHAPES)]
        a = SCALES[(k // len(SHAPES)) % len(SCALES)]
        series.append(errdist.rvs(n_returns, 0.0002, a, b, seed=np.random.default_rng(child)))
        names.append(f"G{k:05d}")
    return names, series


def _client(workers: int):
    import logging

    from distributed import Client, LocalCluster

    cluster = LocalCluster(
        n_workers=workers,
        threads_per_worker=1,
        processes=True,
        dashboard_address=":0",  # any free port: 8787 may be taken by another cluster
        silence_logs=logging.ERROR,
    )
    return Client(cluster), cluster


def _rss_mb(client) -> list[float]:
    def rss() -> float:
        import psutil

        return psutil.Process().memory_info().rss / 1e6

    return sorted(client.run(rss).values())


def _cpu_s(client) -> float:
    def cpu() -> float:
        import psutil

        t = psutil.Process().cpu_times()
        return t.user + t.system

    return sum(client.run(cpu).values())


def _timed_dask(data, opts, workers: int, block_size: int | None = None):
    """(rows, wall seconds, worker RSS list in MB, worker CPU seconds) of one run."""
    client, cluster = _client(workers)
    try:
        client.run(lambda: __import__("errdist.panel.job"))  # imports warm on every worker
        blocks = make_blocks(len(data), block_size or auto_block_size(len(data), workers))
        cpu0 = _cpu_s(client)
        t0 = time.perf_counter()
        rows = run_dask(data, opts, blocks, client=client)
        elapsed = time.perf_counter() - t0
        cpu = _cpu_s(client) - cpu0
        return rows, elapsed, _rss_mb(client), cpu
    finally:
        client.close()
        cluster.close()


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--quick", action="store_true", help="smaller sizes (a smoke run)")
    ap.add_argument("--part", choices=("1", "2", "all"), default="all", help="targets to run")
    ap.add_argument("--series2", type=int, default=None, help="series of the backtest part")
    args = ap.parse_args()
    n1, n_ret = (200, 1260) if args.quick else (2000, 1260)
    n2 = args.series2 or (40 if args.quick else 200)
    print(
        f"machine: {os.cpu_count()} cores; errdist {errdist.__version__}; "
        f"load average {os.getloadavg()[0]:.1f}"
    )
    if args.part in ("1", "all"):
        _part1(n1, n_ret)
    if args.part in ("2", "all"):
        _part2(n2)


def _part1(n1: int, n_ret: int) -> None:
    # 1. Fits + VaR/ES.
    names, series = _grid(n1, n_ret)
    with tempfile.TemporaryDirectory() as tmp:
        dates = pd.bdate_range("2021-01-04", periods=n_ret + 1).strftime("%Y-%m-%d")
        prices = {
            n: 100 * np.exp(np.concatenate([[0], np.cumsum(r)]))
            for n, r in zip(names, series, strict=True)
        }
        frame = pd.DataFrame(prices)
        frame.insert(0, "date", dates)
        path = Path(tmp) / "wide.csv"
        frame.to_csv(path, index=False)
        size_mb = path.stat().st_size / 1e6
        t0 = time.perf_counter()
        panel = read_panel(path)
        t_read = time.perf_counter() - t0
    print(
        f"read + validate wide CSV, {n1:,} series x {n_ret + 1:,} prices "
        f"({size_mb:.0f} MB): {t_read:.1f} s"
    )
    data = PanelData.from_series([s.name for s in panel.usable], [s.returns for s in panel.usable])
    opts = default_options(gof_samples=0, rivals=False, models=())
    t0 = time.perf_counter()
    serial = run_serial(data, opts, make_blocks(len(data), 50))
    t_serial = time.perf_counter() - t0
    rows, t_dask, rss, cpu_dask = _timed_dask(data, opts, 2)
    same = all(
        rows[i]["es_99_1d"] == serial[i]["es_99_1d"]
        and rows[i]["mle_shape"] == serial[i]["mle_shape"]
        for i in serial
    )
    print(
        f"[1] fits + VaR/ES, {n1:,} series x {n_ret:,} returns: serial {t_serial:.1f} s "
        f"({t_serial / n1 * 1e3:.2f} ms/series); 2 workers {t_dask:.1f} s; "
        f"ratio serial/2 workers {t_serial / t_dask:.2f}x; target < 30 s: "
        f"{'OK' if t_dask < 30 else 'MISSED'}; identical results: {same}"
    )
    print(
        f"    worker CPU {cpu_dask:.1f} s in all ({cpu_dask / n1 * 1e3:.2f} ms/series); "
        f"load average {os.getloadavg()[0]:.1f} on {os.cpu_count()} cores"
    )
    print(f"    worker memory after {n1:,} series: {', '.join(f'{m:.0f} MB' for m in rss)}")

    # Per-series cost of the other steps (for the on-paper estimate).
    few = list(range(min(10, len(data))))
    for label, o in (
        ("rival laws", default_options(gof_samples=0, models=())),
        ("goodness of fit, 199 samples", default_options(rivals=False, models=())),
    ):
        t0 = time.perf_counter()
        for i in few:
            series_row(data.name(i), data.returns(i), o)
        per = (time.perf_counter() - t0) / len(few) - t_serial / n1
        print(f"    + {label}: {per * 1e3:.0f} ms per series (1,260 returns, one core)")


def _part2(n2: int) -> None:
    # 2. Rolling backtests: 1 worker vs 2 workers.
    names2, series2 = _grid(n2, 1250, seed=7)
    data2 = PanelData.from_series(names2, series2)
    opts2 = default_options(gof_samples=0, rivals=False, models=("uncond",))
    _, t1, rss1, cpu1 = _timed_dask(data2, opts2, 1, block_size=5)
    rows2, t2, rss2, cpu2 = _timed_dask(data2, opts2, 2, block_size=5)
    speed = t1 / t2
    print(
        f"[2] rolling backtests, {n2} series x 1,000 forecasts: 1 worker {t1:.1f} s "
        f"({t1 / n2 * 1e3:.0f} ms/series), 2 workers {t2:.1f} s; speedup {speed:.2f}x; "
        f"target >= 1.7x: {'OK' if speed >= 1.7 else 'MISSED'}"
    )
    print(
        f"    worker CPU: 1 worker {cpu1 / n2 * 1e3:.0f} ms/series, 2 workers "
        f"{cpu2 / n2 * 1e3:.0f} ms/series; load average {os.getloadavg()[0]:.1f}"
    )
    # 3. Memory per worker as series grow.
    small = PanelData.from_series(names2[: n2 // 4], series2[: n2 // 4])
    _, _, rss_small, _ = _timed_dask(small, opts2, 2, block_size=5)
    print(
        f"[3] worker memory (RSS) after {n2 // 4} series: "
        f"{', '.join(f'{m:.0f} MB' for m in rss_small)}; after {n2} series: "
        f"{', '.join(f'{m:.0f} MB' for m in rss2)}; 1 worker after {n2}: {rss1[0]:.0f} MB"
    )
    zones = pd.Series([r["uncond_zone"] for r in rows2.values()]).value_counts().to_dict()
    print(f"    zones over the last 250 forecasts: {zones}")


if __name__ == "__main__":
    main()
