"""Benchmark of the worksheet layer (not collected by pytest).

    python tests/benchmarks/bench_sheet.py [--repeat 7]

Measures, side by side in one run (best of ``--repeat`` timings):

1. one scalar ERRDIST_CDF call through the sheet layer - the function of
   ``errdist.sheet.xlwings_udfs`` called with Python floats, as xlwings calls it for single
   cells - against one scalar ``scipy.stats.gennorm.cdf`` call (target: ratio <= 1/20);
2. a 10,000-cell ERRDIST_CDF spill in one call (a column handed over as xlwings does: a list of
   10,000 one-element rows) against 10,000 scalar calls - of ``scipy.stats.gennorm.cdf``
   (target: ratio <= 1/50) and, for information, of ERRDIST_CDF itself;
3. whole-column references (1,000,000 rows, as xlwings hands them over): reading a data
   column, ERRDIST_FIT / ERRDIST_RETURNS / ERRDIST_PDF on it, and the slowest catalog function
   given such a column in its first number or data argument (target: every call answers
   within one second, a value or a coded text).
"""

from __future__ import annotations

import argparse
import platform
import sys
import time
import timeit
from collections.abc import Callable
from typing import Any

import numpy as np
import scipy
import scipy.stats as st

from errdist.sheet import cells
from errdist.sheet import xlwings_udfs as udfs
from errdist.sheet.catalog import CATALOG

LOC, SCALE, SHAPE = 0.001, 0.012, 1.3


def best(fn: Callable[[], Any], number: int, repeat: int) -> float:
    """Best time of one call, in seconds."""
    return min(timeit.repeat(fn, number=number, repeat=repeat)) / number


def once(fn: Callable[[], Any], repeat: int) -> tuple[float, Any]:
    times, out = [], None
    for _ in range(repeat):
        start = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - start)
    return min(times), out


def fmt(seconds: float) -> str:
    if seconds < 1e-3:
        return f"{seconds * 1e6:.2f} µs"
    if seconds < 1:
        return f"{seconds * 1e3:.2f} ms"
    return f"{seconds:.2f} s"


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--repeat", type=int, default=7)
    args = parser.parse_args(argv)
    r = args.repeat
    print(
        f"errdist worksheet layer benchmark - Python {platform.python_version()}, "
        f"numpy {np.__version__}, scipy {scipy.__version__}, {platform.machine()}"
    )
    ok = True

    # 1. scalar call
    x = 0.0123
    ours = best(lambda: udfs.ERRDIST_CDF(x, LOC, SCALE, SHAPE), 20000, r)
    ref = best(lambda: st.gennorm.cdf(x, SHAPE, loc=LOC, scale=SCALE), 2000, r)
    assert (
        abs(udfs.ERRDIST_CDF(x, LOC, SCALE, SHAPE) - st.gennorm.cdf(x, SHAPE, LOC, SCALE)) < 1e-15
    )
    ratio = ours / ref
    ok &= ratio <= 1 / 20
    print("\n| call | errdist | reference | ratio | target |\n|---|---:|---:|---:|---|")
    print(
        f"| scalar ERRDIST_CDF vs scalar gennorm.cdf | {fmt(ours)} | {fmt(ref)} | "
        f"{ratio:.3f} (1/{1 / ratio:.0f}) | ≤ 1/20 {'met' if ratio <= 1 / 20 else 'MISSED'} |"
    )

    # 2. 10,000-cell spill
    rng = np.random.default_rng(20261202)
    xs = rng.normal(0.0, 0.02, 10_000)
    column = [[v] for v in xs.tolist()]
    spill, out = once(lambda: udfs.ERRDIST_CDF(column, LOC, SCALE, SHAPE), max(r, 15))
    np.testing.assert_allclose(
        [row[0] for row in out], st.gennorm.cdf(xs, SHAPE, LOC, SCALE), rtol=1e-12
    )
    xs_list = xs.tolist()

    def scipy_loop() -> None:
        for v in xs_list:
            st.gennorm.cdf(v, SHAPE, loc=LOC, scale=SCALE)

    def ours_loop() -> None:
        f = udfs.ERRDIST_CDF
        for v in xs_list:
            f(v, LOC, SCALE, SHAPE)

    loop_ref, _ = once(scipy_loop, 3)
    loop_ours, _ = once(ours_loop, r)
    ratio = spill / loop_ref
    ok &= ratio <= 1 / 50
    print(
        f"| 10,000-cell ERRDIST_CDF spill vs 10,000 scalar gennorm.cdf | {fmt(spill)} | "
        f"{fmt(loop_ref)} | {ratio:.4f} (1/{1 / ratio:.0f}) | ≤ 1/50 "
        f"{'met' if ratio <= 1 / 50 else 'MISSED'} |"
    )
    print(
        f"| 10,000-cell ERRDIST_CDF spill vs 10,000 scalar ERRDIST_CDF | {fmt(spill)} | "
        f"{fmt(loop_ours)} | {spill / loop_ours:.3f} (1/{loop_ours / spill:.0f}) | (information) |"
    )
    core, _ = once(lambda: __import__("errdist").cdf(xs, LOC, SCALE, SHAPE), max(r, 15))
    print(
        f"| of which the core's array cdf (10,000 points) | {fmt(core)} | | "
        f"{core / spill:.2f} of the spill | (information) |"
    )

    # 3. whole columns
    million = 1_000_000
    data_col = [[0.001 * ((i * 7919) % 41 - 20)] for i in range(1000)] + [[None]] * (million - 1000)
    prices_col = [[100.0 + 0.01 * (i % 50)] for i in range(1000)] + [[None]] * (million - 1000)
    numbers_col = [[v] for v in rng.normal(0.0, 0.02, million).tolist()]
    print("\n| whole-column call (1,000,000 rows) | time | target |\n|---|---:|---|")
    rows = [
        ("read a data column (cells.as_data)", lambda: cells.as_data(data_col, "data")),
        ("read a column of 10⁶ numbers", lambda: cells.as_data(numbers_col, "data")),
        ("ERRDIST_FIT(A:A), 1,000 numbers", lambda: udfs.ERRDIST_FIT(data_col)),
        ("ERRDIST_FIT_REPORT(A:A), 1,000 numbers", lambda: udfs.ERRDIST_FIT_REPORT(data_col)),
        ("ERRDIST_RETURNS(A:A), 1,000 prices", lambda: udfs.ERRDIST_RETURNS(prices_col)),
        (
            "ERRDIST_PDF of 10⁶ numbers (10⁶-cell spill)",
            lambda: udfs.ERRDIST_PDF(numbers_col, LOC, SCALE, SHAPE),
        ),
    ]
    for label, fn in rows:
        t, _ = once(fn, 3)
        ok &= t <= 1.0
        print(f"| {label} | {fmt(t)} | ≤ 1 s {'met' if t <= 1.0 else 'MISSED'} |")

    worst: tuple[float, str] = (0.0, "")
    for name, entry in CATALOG.items():
        idx = next((i for i, p in enumerate(entry.params) if p.kind in ("number", "range")), None)
        if idx is None:
            continue
        call_args: list[Any] = [
            p.example if not isinstance(p.example, list) else p.example for p in entry.params
        ]
        call_args[idx] = data_col
        t, out = once(lambda n=name, a=call_args: getattr(udfs, n)(*a), 2)
        worst = max(worst, (t, f"{name}({entry.params[idx].name}=A:A)"))
    ok &= worst[0] <= 1.0
    print(
        f"| slowest catalog call with a whole column: {worst[1]} | {fmt(worst[0])} | ≤ 1 s "
        f"{'met' if worst[0] <= 1.0 else 'MISSED'} |"
    )
    print("\nall targets met" if ok else "\nsome targets MISSED")
    return 0


if __name__ == "__main__":
    sys.exit(main())
