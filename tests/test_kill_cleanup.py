"""``errdist refresh`` and ``errdist check`` killed mid-run leave nothing behind for long.

SIGTERM: the command unwinds, removes its temporary files and exits with code 143; the
destination is not written. SIGKILL cannot be caught: whatever it leaves (the per-run
temporary folder, the hidden file beside the destination) carries the host and process id,
and the next errdist command in that folder removes it. Each test runs the real command in
a subprocess with its own temporary folder (TMPDIR) so leftovers can be counted.
"""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from real_series import index as real_index

pytest.importorskip("formulas", reason="formulas not installed")
pytest.importorskip("xlsxwriter", reason="XlsxWriter not installed")

ROOT = Path(__file__).resolve().parents[1]
TEMPLATE = ROOT / "workbook_template" / "errdist-monthly-risk.xlsx"


def _prices_csv(path: Path) -> Path:
    # Real data: the index 2 closes shipped with the arch package (`arch.data` index 2).
    closes = real_index(2).load()["Adj Close"].iloc[-800:]
    lines = ["date,price"] + [f"{d:%Y-%m-%d},{v!r}" for d, v in closes.items()]
    path.write_text("\n".join(lines) + "\n")
    return path


def _start(args: list[str], tmpdir: Path) -> subprocess.Popen:
    env = {**os.environ, "PYTHONPATH": str(ROOT / "udfs"), "TMPDIR": str(tmpdir)}
    return subprocess.Popen(
        [sys.executable, "-m", "errdist.cli", *args],
        env=env,
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
    )


def _wait_for_run_folder(tmpdir: Path, proc: subprocess.Popen, timeout: float = 60) -> None:
    """Wait until the command has made its per-run folder (it is under way)."""
    end = time.monotonic() + timeout
    while time.monotonic() < end:
        if any(p.name.startswith("errdist-run-") for p in tmpdir.iterdir()):
            time.sleep(1.5)  # well into the work
            return
        if proc.poll() is not None:
            pytest.fail(f"command ended early: {proc.communicate()}")
        time.sleep(0.05)
    pytest.fail("command never started its work")


def _leftovers(*folders: Path) -> list[str]:
    return sorted(
        p.name for f in folders for p in f.iterdir() if "errdist" in p.name and p.suffix != ".csv"
    )


@pytest.fixture
def dirs(tmp_path: Path) -> tuple[Path, Path]:
    tmpdir, out = tmp_path / "tmp", tmp_path / "out"
    tmpdir.mkdir()
    out.mkdir()
    return tmpdir, out


def test_refresh_sigterm_cleans_up(dirs: tuple[Path, Path]) -> None:
    tmpdir, out = dirs
    prices = _prices_csv(out / "index2.csv")
    proc = _start(["refresh", "--prices", str(prices), "--out", str(out / "m.xlsx")], tmpdir)
    _wait_for_run_folder(tmpdir, proc)
    proc.send_signal(signal.SIGTERM)
    _, err = proc.communicate(timeout=60)
    assert proc.returncode == 143, err
    assert "terminated; nothing written" in err and "Traceback" not in err
    assert sorted(p.name for p in out.iterdir()) == ["index2.csv"]  # no m.xlsx, no .tmp
    assert list(tmpdir.iterdir()) == []


def test_refresh_sigkill_leftovers_removed_by_next_run(dirs: tuple[Path, Path]) -> None:
    tmpdir, out = dirs
    prices = _prices_csv(out / "index2.csv")
    proc = _start(["refresh", "--prices", str(prices), "--out", str(out / "m.xlsx")], tmpdir)
    _wait_for_run_folder(tmpdir, proc)
    proc.kill()
    proc.communicate(timeout=60)
    assert proc.returncode == -signal.SIGKILL
    left = _leftovers(tmpdir, out)
    assert left, "SIGKILL left nothing: the test did not kill mid-run"
    assert all(f"-{proc.pid}-" in name for name in left), left  # recognisable: host and pid
    assert not (out / "m.xlsx").exists()
    # The next command writing into the same folder (and using the same TMPDIR) sweeps them.
    nxt = _start(["vba", "--out", str(out / "m.bas")], tmpdir)
    nxt.communicate(timeout=120)
    assert nxt.returncode == 0
    assert _leftovers(tmpdir, out) == []
    assert sorted(p.name for p in out.iterdir()) == ["index2.csv", "m.bas"]


@pytest.mark.parametrize("sig", [signal.SIGTERM, signal.SIGKILL])
def test_check_killed(dirs: tuple[Path, Path], sig: signal.Signals) -> None:
    tmpdir, out = dirs
    book = out / "book.xlsx"
    book.write_bytes(TEMPLATE.read_bytes())
    proc = _start(["check", str(book)], tmpdir)
    _wait_for_run_folder(tmpdir, proc, timeout=60)
    if proc.poll() is not None:
        pytest.skip("check finished before it could be signalled")
    proc.send_signal(sig)
    _, err = proc.communicate(timeout=60)
    assert book.read_bytes() == TEMPLATE.read_bytes()
    if sig == signal.SIGTERM:
        assert proc.returncode == 143, err
        assert list(tmpdir.iterdir()) == []  # the private copy of the book is gone too
    else:
        assert _leftovers(tmpdir)  # the run folder, holding the private copy
        nxt = _start(["vba"], tmpdir)
        nxt.communicate(timeout=120)
        assert _leftovers(tmpdir) == []
