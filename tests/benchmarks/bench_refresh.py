"""Benchmark: ``errdist refresh`` on long price histories, and where the time goes.

For 5,000 and 20,000 daily prices (simulated with ``errdist.data.demo.simulate_returns``, the
invented demo scenario) it times each step of a refresh — read the CSV, lay out the workbook,
evaluate it headlessly (split into the engine's load / compile / calculate), write the final
file — and prints ratios against two references measured side by side in the same run:

- reading: ``pandas.read_csv`` of the same file (the cost of just parsing it);
- evaluating: ``openpyxl.load_workbook`` of the evaluated workbook (the cost of just reading
  the .xlsx that the engine must parse).

Run: ``python tests/benchmarks/bench_refresh.py [n ...]``.
"""

from __future__ import annotations

import sys
import tempfile
import time
from pathlib import Path

import numpy as np
import pandas as pd


def _prices_csv(folder: Path, n: int) -> Path:
    from errdist.data.demo import simulate_returns

    returns, _ = simulate_returns(n - 1, seed=20261202 + n)
    prices = 100.0 * np.exp(np.concatenate([[0.0], np.cumsum(returns)]))
    dates = pd.bdate_range(end="2026-11-30", periods=n)
    path = folder / f"bench-{n}.csv"
    pd.DataFrame({"Date": dates.strftime("%Y-%m-%d"), "Price": prices.round(4)}).to_csv(
        path, index=False
    )
    return path


def bench(n: int) -> dict[str, float]:
    from openpyxl import load_workbook

    from errdist.data.prices_io import read_prices
    from errdist.workbook import engine, template
    from errdist.workbook.atomic import atomic_path

    out: dict[str, float] = {}
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        src = _prices_csv(folder, n)
        t0 = time.perf_counter()
        prices = read_prices(src)
        out["read"] = time.perf_counter() - t0
        t0 = time.perf_counter()
        pd.read_csv(src)
        out["ref: pandas.read_csv"] = time.perf_counter() - t0

        details: dict[str, object] = {}

        def evaluate(path: Path):
            ev = engine.evaluate_details(path)
            details["ev"] = ev
            details["first"] = path.read_bytes()
            if ev.problems:
                raise engine.EngineError(ev.problems)
            return ev.values

        t0 = time.perf_counter()
        target = folder / "risk.xlsx"
        with atomic_path(target) as tmp_out:
            result = template.build_workbook(prices, tmp_out, fund_name="bench", evaluate=evaluate)
        total_build = time.perf_counter() - t0
        ev = details["ev"]
        out.update({f"engine {k}": v for k, v in ev.timings.items()})  # type: ignore[attr-defined]
        out["formula cells"] = float(len(ev.values))  # type: ignore[attr-defined]
        out["layout"] = result.timings.get("layout", float("nan"))
        out["evaluate (total)"] = result.timings.get("evaluate", float("nan"))
        out["write (both passes)"] = result.timings.get("write", float("nan"))
        out["build + atomic write"] = total_build
        first = folder / "first.xlsx"
        first.write_bytes(details["first"])  # type: ignore[arg-type]
        t0 = time.perf_counter()
        load_workbook(first)
        out["ref: openpyxl.load_workbook"] = time.perf_counter() - t0
        out["refresh total"] = out["read"] + total_build
    return out


def main(argv: list[str]) -> int:
    sizes = [int(a) for a in argv] or [5_000, 20_000]
    for n in sizes:
        r = bench(n)
        print(f"\n{n:,} prices, {int(r.pop('formula cells')):,} formula cells")
        for k, v in r.items():
            print(f"  {k:<28}{v:8.2f} s")
        print(
            f"  ratio read / pandas.read_csv          {r['read'] / r['ref: pandas.read_csv']:6.1f}"
        )
        eng = r["engine load"] + r["engine compile"] + r["engine calculate"]
        print(
            f"  ratio engine / openpyxl.load_workbook {eng / r['ref: openpyxl.load_workbook']:6.1f}"
        )
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
