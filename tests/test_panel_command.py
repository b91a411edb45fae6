"""``errdist panel`` end to end: files written, overview workbook, fallback, Ctrl-C."""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pandas as pd
import pytest

import errdist
from errdist.cli import main
from errdist.panel import command
from errdist.workbook import guide_text
from panel_data import simulated_wide, write

openpyxl = pytest.importorskip("openpyxl", reason="openpyxl (headless extra) is not installed")

UDFS = str(Path(errdist.__file__).resolve().parent.parent)


@pytest.fixture()
def prices(tmp_path):
    w = simulated_wide(n_series=4, n_prices=280).astype(object)
    w.loc[100, "S02"] = "n/a"
    return write(w, tmp_path / "fund-prices.csv")


def test_command_writes_overview_and_table(prices, tmp_path, capsys):
    out = tmp_path / "panel.xlsx"
    rc = main(
        ["panel", "--prices", str(prices), "--out", str(out), "--workers", "0",
         "--gof-samples", "19"]
    )  # fmt: skip
    assert rc == 0
    text = capsys.readouterr()
    assert "4 series: 3 computed, 1 failed" in text.out
    assert "3/3 series 100%" in text.err
    table = pd.read_csv(tmp_path / "panel.csv")
    assert list(table["rank"].iloc[:3]) == [1, 2, 3]
    assert "the price is not a number" in table["reason"].iloc[3]

    book = openpyxl.load_workbook(out)
    assert book.sheetnames == ["Overview", "VaR chart", "Guide"]
    ws = book["Overview"]
    heads = [c.value for c in ws[5]]
    assert ws.auto_filter.ref.startswith("A5:")
    assert ws.freeze_panes == "C6"
    col = heads.index("ES 99% 1 day") + 1
    assert ws.cell(6, col).number_format == "0.000%"  # the monthly workbook's pct3
    assert ws.cell(6, col).value == pytest.approx(table["es_99_1d"].iloc[0], rel=1e-15)
    assert ws.cell(6, 2).value == table["series"].iloc[0]
    assert len(book["VaR chart"]._charts) == 1
    guide = "\n".join(str(c.value) for row in book["Guide"].iter_rows() for c in row if c.value)
    for _, caution in guide_text.CAUTIONS[1:]:
        assert caution in guide


def test_existing_output_is_refused_before_any_work(prices, tmp_path):
    out = tmp_path / "panel.xlsx"
    out.write_bytes(b"keep")
    assert main(["panel", "--prices", str(prices), "--out", str(out), "--workers", "0"]) == 2
    assert out.read_bytes() == b"keep"
    assert not (tmp_path / "panel.csv").exists()


def test_parquet_table_and_unknown_model(prices, tmp_path, capsys):
    out, table = tmp_path / "p.xlsx", tmp_path / "p.parquet"
    args = ["panel", "--prices", str(prices), "--out", str(out), "--table", str(table)]
    assert main([*args, "--workers", "0", "--models", "nosuch"]) == 2
    assert "unknown model 'nosuch'" in capsys.readouterr().err
    assert main([*args, "--workers", "0", "--gof-samples", "0", "--models", "none"]) == 0
    frame = pd.read_parquet(table)
    assert "uncond_zone" not in frame and "gof_pvalue" not in frame
    assert frame["status"].tolist().count("ok") == 3


def test_without_dask_runs_serially_and_says_how_to_get_workers(
    prices, tmp_path, capsys, monkeypatch
):
    monkeypatch.setattr(command, "dask_available", lambda: False)
    out = tmp_path / "s.xlsx"
    assert main(["panel", "--prices", str(prices), "--out", str(out), "--gof-samples", "0",
                 "--workers", "2"]) == 0  # fmt: skip
    assert 'pip install "errdist[cluster]"' in capsys.readouterr().err
    assert out.exists()


def test_ctrl_c_stops_cleanly_and_writes_nothing(tmp_path):
    w = simulated_wide(n_series=40, n_prices=600)
    prices = write(w, tmp_path / "many.csv")
    out = tmp_path / "panel.xlsx"
    env = dict(os.environ, PYTHONPATH=UDFS)
    proc = subprocess.Popen(
        [sys.executable, "-m", "errdist.cli", "panel", "--prices", str(prices), "--out",
         str(out), "--workers", "0", "--block-size", "1"],
        stdout=subprocess.PIPE, stderr=subprocess.PIPE, env=env, text=True,
    )  # fmt: skip
    deadline = time.monotonic() + 120
    err = ""
    while time.monotonic() < deadline:  # wait for the first progress line
        line = proc.stderr.readline()
        err += line
        if line.startswith("panel ["):
            break
    os.kill(proc.pid, signal.SIGINT)
    rest_out, rest_err = proc.communicate(timeout=60)
    assert proc.returncode == 130, err + rest_err
    assert "interrupted; nothing written" in rest_err
    assert "Traceback" not in rest_err
    assert sorted(p.name for p in tmp_path.iterdir()) == ["many.csv"]
