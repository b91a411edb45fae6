"""After a plain ``pip install .`` (no ``headless`` extra) the workbook commands say in one
line what to install, instead of ending in a traceback."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]

# Makes the headless extra's packages unimportable, as after `pip install .` alone.
_BLOCK = """
import sys
class _Block:
    def find_spec(self, name, path=None, target=None):
        if name.split(".")[0] in {"formulas", "xlsxwriter", "openpyxl", "defusedxml"}:
            raise ModuleNotFoundError(f"No module named {name!r}", name=name)
        return None
sys.meta_path.insert(0, _Block())
from errdist.cli import main
sys.exit(main(sys.argv[1:]))
"""


def _run(*args: str, cwd: Path) -> subprocess.CompletedProcess[str]:
    env = {**os.environ, "PYTHONPATH": str(ROOT / "udfs")}
    return subprocess.run(
        [sys.executable, "-c", _BLOCK, *args],
        capture_output=True,
        text=True,
        cwd=cwd,
        env=env,
        timeout=300,
    )


@pytest.mark.parametrize(
    "args",
    [
        ("check", "book.xlsx"),
        ("refresh", "--prices", "prices.csv", "--out", "out.xlsx"),
        ("freeze", "book.xlsx", "--out", "copy.xlsx"),
    ],
)
def test_workbook_commands_name_the_missing_extra(args: tuple[str, ...], tmp_path: Path) -> None:
    (tmp_path / "book.xlsx").write_bytes(
        (ROOT / "workbook_template" / "errdist-monthly-risk.xlsx").read_bytes()
    )
    (tmp_path / "prices.csv").write_text("date,price\n2024-01-02,100\n")
    proc = _run(*args, cwd=tmp_path)
    assert proc.returncode == 2, proc.stderr
    assert "Traceback" not in proc.stderr
    lines = proc.stderr.strip().splitlines()
    assert 'pip install "errdist[headless]"' in lines[-1], proc.stderr
    assert not (tmp_path / "out.xlsx").exists() and not (tmp_path / "copy.xlsx").exists()


def test_demo_prints_the_fit_table_and_the_hint(tmp_path: Path) -> None:
    proc = _run("demo", cwd=tmp_path)
    assert proc.returncode == 0, proc.stderr
    assert "Traceback" not in proc.stderr
    assert "mle" in proc.stdout and "errdist[headless]" in proc.stdout
    assert not (tmp_path / "errdist-demo.xlsx").exists()
