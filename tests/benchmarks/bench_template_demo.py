"""Demo wall time of the template workbook: build (lay out), evaluate, write.

Builds the demo fund's workbook (1,261 prices, 1,260 daily returns) with
``errdist.workbook.template.build_workbook`` a few times and prints the median time of each
step, the ratio to the 15 s target of the demo, and, as a reference measured side by side, the
time ``openpyxl.load_workbook`` takes merely to read the finished file.

Run: ``python tests/benchmarks/bench_template_demo.py [repeats]``
"""

from __future__ import annotations

import platform
import statistics
import sys
import tempfile
import time
from pathlib import Path

TARGET_SECONDS = 15.0


def main(repeats: int = 3) -> int:
    import openpyxl

    from errdist.data.demo import FUND_NAME, simulate_prices
    from errdist.workbook.template import build_workbook

    prices = simulate_prices()
    runs: list[dict[str, float]] = []
    with tempfile.TemporaryDirectory() as tmp:
        out = Path(tmp) / "demo.xlsx"
        for _ in range(repeats):
            t0 = time.perf_counter()
            result = build_workbook(prices, out, fund_name=FUND_NAME)
            wall = time.perf_counter() - t0
            runs.append({**result.timings, "wall": wall})
        t0 = time.perf_counter()
        openpyxl.load_workbook(out, data_only=True)
        openpyxl_read = time.perf_counter() - t0
        size_kb = out.stat().st_size / 1024
    med = {k: statistics.median(r[k] for r in runs) for k in runs[0]}
    print(
        f"Python {platform.python_version()} on {platform.machine()}, {repeats} runs, "
        f"{len(prices)} prices, file {size_kb:.0f} KB"
    )
    for step in ("layout", "evaluate", "write", "total", "wall"):
        print(f"  {step:<9} {med[step]:6.2f} s")
    print(f"  ratio to the {TARGET_SECONDS:.0f} s target: {med['wall'] / TARGET_SECONDS:.2f}")
    print(
        f"  reference: openpyxl.load_workbook of the result {openpyxl_read:.2f} s; "
        f"build / read = {med['wall'] / openpyxl_read:.1f}x"
    )
    return 0 if med["wall"] < TARGET_SECONDS else 1


if __name__ == "__main__":
    sys.exit(main(int(sys.argv[1]) if len(sys.argv) > 1 else 3))
