"""Benchmark: ``errdist check --engine libreoffice`` on the demo workbook (target < 60 s).

Builds the demo workbook (``errdist demo``), then times side by side in one run:

- ``check_report(engine="libreoffice")``: the whole audit with LibreOffice recomputing live
  (private profile install, soffice start, load, ``calculateAll()``, read every formula cell
  through UNO, stop), split into LibreOffice's own steps;
- ``check_report(engine="formulas")``: the same audit with the headless ``formulas`` engine
  (the default), the reference;
- a bare ``soffice --headless --convert-to pdf`` of the same book with a fresh private profile
  (the cost of starting LibreOffice and laying the book out at all), the outside reference.

Run: ``python tests/benchmarks/bench_check_libreoffice.py`` (needs libreoffice-calc,
python3-uno, libreoffice-script-provider-python).
"""

from __future__ import annotations

import subprocess
import tempfile
import time
from pathlib import Path


def main() -> int:
    from errdist.cli import main as cli
    from errdist.workbook.check import check_report

    with tempfile.TemporaryDirectory(prefix="errdist-bench-lo-") as tmp:
        folder = Path(tmp)
        book = folder / "demo.xlsx"
        assert cli(["demo", "--out", str(book)]) == 0
        t0 = time.perf_counter()
        lo = check_report(book, engine="libreoffice")
        t_lo = time.perf_counter() - t0
        t0 = time.perf_counter()
        ref = check_report(book, engine="formulas")
        t_ref = time.perf_counter() - t0
        t0 = time.perf_counter()
        subprocess.run(
            [
                "soffice",
                "--headless",
                "--norestore",
                f"-env:UserInstallation={(folder / 'plain').as_uri()}",
                "--convert-to",
                "pdf",
                "--outdir",
                str(folder),
                str(book),
            ],
            capture_output=True,
            check=True,
            timeout=600,
        )
        t_pdf = time.perf_counter() - t0
    print(
        f"demo workbook: {lo.cells:,} formula cells; {len(lo.mismatches)} mismatches (LO), "
        f"{len(ref.mismatches)} (formulas); {lo.engine}"
    )
    print(f"check --engine libreoffice   {t_lo:7.1f} s   (target < 60 s)")
    for k, v in lo.timings.items():
        print(f"    {k:<32}{v:7.2f} s")
    print(f"check --engine formulas      {t_ref:7.1f} s   ratio LO/formulas {t_lo / t_ref:5.2f}")
    print(
        f"soffice --convert-to pdf     {t_pdf:7.1f} s   ratio LO check/convert {t_lo / t_pdf:5.2f}"
    )
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
