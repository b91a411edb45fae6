"""Benchmark: the cost of ``import errdist`` against ``import scipy.stats``, and ``errdist version``.

Run: ``python tests/benchmarks/bench_import.py [--repeat N]``.
Each statement runs in a fresh interpreter (``python -c``), alternating, ``--repeat`` times;
prints the best and median wall time and the ratio errdist / scipy.stats. Target
(docs/performance.md, "Import"): ``import errdist`` <= 0.6 x ``import scipy.stats``. Also
times the first use of a law function (``errdist.cdf``) and the ``errdist version`` command.
"""

from __future__ import annotations

import argparse
import os
import platform
import statistics
import subprocess
import sys
import time
from pathlib import Path

UDFS = Path(__file__).resolve().parents[2] / "udfs"

CASES = {
    "import scipy.stats": "import scipy.stats",
    "import errdist": "import errdist",
    "import errdist; errdist.cdf(0.1)": "import errdist; errdist.cdf(0.1)",
    "errdist version": "import sys; sys.argv = ['errdist', 'version']; "
    "import errdist.cli; errdist.cli.main(['version'])",
    "python (empty)": "pass",
}


def run(stmt: str) -> float:
    env = dict(os.environ, PYTHONPATH=str(UDFS))
    start = time.perf_counter()
    subprocess.run([sys.executable, "-c", stmt], check=True, env=env, stdout=subprocess.DEVNULL)
    return time.perf_counter() - start


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--repeat", type=int, default=9)
    args = parser.parse_args()
    times: dict[str, list[float]] = {name: [] for name in CASES}
    for stmt in CASES.values():  # warm the file cache once
        run(stmt)
    for _ in range(args.repeat):
        for name, stmt in CASES.items():
            times[name].append(run(stmt))
    print(
        f"Python {platform.python_version()}  {platform.machine()}  {args.repeat} fresh runs each"
    )
    print(f"{'statement':36s} {'best [ms]':>10s} {'median [ms]':>12s} {'ratio (median)':>15s}")
    ref = statistics.median(times["import scipy.stats"])
    for name, ts in times.items():
        med = statistics.median(ts)
        print(f"{name:36s} {min(ts) * 1e3:10.1f} {med * 1e3:12.1f} {med / ref:15.2f}")
    print("ratio = median / median of 'import scipy.stats' (target for 'import errdist': <= 0.6)")


if __name__ == "__main__":
    main()
