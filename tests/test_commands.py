"""``errdist demo / refresh / check``: exit codes, files written or not, messages.

The template builder is replaced by a small stand-in with the agreed signature
``build_workbook(prices, out_path, *, fund_name, as_of, evaluate) -> result with .summary``,
which writes a workbook, evaluates it with the given evaluator (the real headless engine) and
writes it again with cached values — so these tests exercise the engine and the file handling,
not the template's layout.
"""

from __future__ import annotations

import sys
import types
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

xlsxwriter = pytest.importorskip("xlsxwriter", reason="XlsxWriter not installed")
pytest.importorskip("formulas", reason="formulas not installed")

import errdist.workbook  # noqa: E402
from errdist import cli  # noqa: E402
from errdist.data.prices_io import MIN_RETURNS  # noqa: E402

CALLS: list[dict] = []


def _write(prices: pd.DataFrame, path: Path, values=None) -> None:
    n = len(prices)
    values = values or {}
    wb = xlsxwriter.Workbook(str(path), {"use_future_functions": True})
    ws = wb.add_worksheet("Prices")
    for i, p in enumerate(prices["price"]):
        ws.write_number(i, 0, float(p))
    ws.write_dynamic_array_formula(
        f"B2:B{n}", f"=LN(A2:A{n}/A1:A{n - 1})", None, values.get(("Prices", "B2"), 0)
    )
    for r in range(3, n + 1):
        if ("Prices", f"B{r}") in values:
            ws.write_number(r - 1, 1, values[("Prices", f"B{r}")])
    ws.write_formula("C1", f"=STDEV.S(B2:B{n})", None, values.get(("Prices", "C1"), 0))
    wb.close()


def fake_build_workbook(prices, out_path, *, fund_name, as_of=None, evaluate=None):
    CALLS.append({"fund_name": fund_name, "as_of": as_of, "n": len(prices)})
    out_path = Path(out_path)
    first = out_path.with_name(out_path.name + ".first.xlsx")
    _write(prices, first)
    try:
        values = evaluate(first)
    finally:
        first.unlink()
    _write(prices, out_path, values)
    r = np.diff(np.log(prices["price"].to_numpy()))
    summary = {
        "fund": fund_name,
        "first_date": str(prices["date"].iloc[0].date()),
        "last_date": str(prices["date"].iloc[-1].date()),
        "n_returns": len(r),
        "moments": {"loc": r.mean(), "scale": r.std(), "shape": 2.0},
        "mle": {"loc": r.mean(), "scale": r.std(), "shape": 2.0},
        "var99": 0.02,
        "es99": 0.025,
        "backtest_exceptions": 3.0,
        "backtest_zone": "green",
    }
    return types.SimpleNamespace(path=out_path, summary=summary, timings={})


@pytest.fixture(autouse=True)
def _fake_template(monkeypatch):
    fake = types.ModuleType("errdist.workbook.template")
    fake.build_workbook = fake_build_workbook
    monkeypatch.setitem(sys.modules, "errdist.workbook.template", fake)
    monkeypatch.setattr(errdist.workbook, "template", fake, raising=False)
    CALLS.clear()


def _prices_csv(path: Path, n: int = MIN_RETURNS + 20) -> Path:
    dates = pd.bdate_range("2026-01-01", periods=n)
    rng = np.random.default_rng(7)
    prices = 100 * np.exp(np.cumsum(rng.normal(0, 0.01, n)))
    pd.DataFrame({"Date": dates.strftime("%Y-%m-%d"), "Price": prices.round(4)}).to_csv(
        path, index=False
    )
    return path


def test_refresh_writes_workbook_and_summary(tmp_path, capsys):
    src = _prices_csv(tmp_path / "meridian_fund-prices.csv")
    out = tmp_path / "2026-11-risk.xlsx"
    code = cli.main(["refresh", "--prices", str(src), "--out", str(out)])
    assert code == 0
    assert out.exists()
    assert sorted(p.name for p in tmp_path.iterdir()) == sorted([src.name, out.name])
    assert CALLS[0]["fund_name"] == "meridian fund"
    text = capsys.readouterr().out
    assert "meridian fund" in text and "VaR 2.000%" in text and "green zone" in text
    assert f"wrote {out.resolve()}" in text
    # the written workbook's cached values agree with a recomputation
    assert cli.main(["check", str(out)]) == 0
    assert "formula cells match" in capsys.readouterr().out


def test_refresh_refuses_existing_file_without_force(tmp_path, capsys):
    src = _prices_csv(tmp_path / "p.csv")
    out = tmp_path / "risk.xlsx"
    out.write_bytes(b"last month")
    assert cli.main(["refresh", "--prices", str(src), "--out", str(out)]) == 2
    err = capsys.readouterr().err
    assert "exists; use --force to overwrite" in err
    assert out.read_bytes() == b"last month"
    assert CALLS == []  # refused before any work
    assert cli.main(["refresh", "--prices", str(src), "--out", str(out), "--force"]) == 0
    assert out.read_bytes()[:2] == b"PK"


def test_refresh_bad_prices_exit_2_names_rows_writes_nothing(tmp_path, capsys):
    src = _prices_csv(tmp_path / "p.csv")
    lines = src.read_text().splitlines()
    date, _ = lines[5].split(",")
    lines[5] = f"{date},-1"
    src.write_text("\n".join(lines) + "\n")
    out = tmp_path / "risk.xlsx"
    assert cli.main(["refresh", "--prices", str(src), "--out", str(out)]) == 2
    err = capsys.readouterr().err.strip()
    assert err.count("\n") == 0 and "row 6" in err and "must be > 0" in err
    assert not out.exists() and sorted(tmp_path.iterdir()) == [src]


def test_builder_failure_leaves_no_file(tmp_path, monkeypatch, capsys):
    def broken(prices, out_path, **kw):
        Path(out_path).write_bytes(b"half a workbook")
        raise ValueError("the workbook needs at least 260 prices")

    monkeypatch.setattr(sys.modules["errdist.workbook.template"], "build_workbook", broken)
    src = _prices_csv(tmp_path / "p.csv")
    out = tmp_path / "risk.xlsx"
    assert cli.main(["refresh", "--prices", str(src), "--out", str(out)]) == 2
    assert "at least 260 prices" in capsys.readouterr().err
    assert sorted(tmp_path.iterdir()) == [src]


def test_refresh_as_of_and_out_suffix(tmp_path, capsys):
    src = _prices_csv(tmp_path / "p.csv", n=MIN_RETURNS + 40)
    out = tmp_path / "risk.xlsx"
    assert (
        cli.main(["refresh", "--prices", str(src), "--out", str(out), "--as-of", "2026-02-20"]) == 0
    )
    assert CALLS[0]["as_of"] == "2026-02-20"
    assert CALLS[0]["n"] == len(pd.bdate_range("2026-01-01", "2026-02-20"))
    assert cli.main(["refresh", "--prices", str(src), "--out", str(tmp_path / "risk.csv")]) == 2
    assert ".xlsx" in capsys.readouterr().err


def test_demo_default_file_in_cwd(tmp_path, monkeypatch, capsys):
    monkeypatch.chdir(tmp_path)
    assert cli.main(["demo"]) == 0
    assert (tmp_path / "errdist-demo.xlsx").exists()
    out = capsys.readouterr().out
    from errdist.data.demo import FUND_NAME

    assert FUND_NAME in out and "1-day 99%" in out and "MLE" in out
    assert cli.main(["demo"]) == 2  # never over an existing file without --force
    assert "use --force" in capsys.readouterr().err
    assert cli.main(["demo", "--force", "--out", str(tmp_path / "again.xlsx")]) == 0


def test_check_exit_1_on_mismatch(tmp_path, capsys):
    src = _prices_csv(tmp_path / "p.csv")
    out = tmp_path / "risk.xlsx"
    assert cli.main(["refresh", "--prices", str(src), "--out", str(out)]) == 0
    import zipfile

    tampered = tmp_path / "tampered.xlsx"
    with zipfile.ZipFile(out) as zin, zipfile.ZipFile(tampered, "w") as zout:
        for info in zin.infolist():
            data = zin.read(info)
            if info.filename == "xl/worksheets/sheet1.xml":
                data = data.replace(b"<f>_xlfn.STDEV.S(", b"<f>_xlfn.STDEV.S(B2,")
            zout.writestr(info, data)
    capsys.readouterr()
    assert cli.main(["check", str(tampered)]) == 1
    text = capsys.readouterr().out
    assert "Prices!C1" in text and "1 of" in text
    assert cli.main(["check", str(tmp_path / "absent.xlsx")]) == 2


def test_progress_announces_slow_steps_while_they_run(monkeypatch):
    import io
    import time

    from errdist.workbook import commands

    monkeypatch.setattr(commands, "PROGRESS_AFTER", 0.02)
    stream = io.StringIO()
    progress = commands._Progress(stream)
    with progress.step("quick"):
        pass
    with progress.step("slow"):
        time.sleep(0.2)
        assert stream.getvalue() == "slow…\n"  # announced before the step ends
    lines = stream.getvalue().splitlines()
    assert lines[0] == "slow…"
    assert lines[1].startswith("slow: done in ")
    assert len(lines) == 2  # the quick step printed nothing
    assert set(progress.timings) == {"quick", "slow"}


def test_refresh_newest_first_file_is_reported(tmp_path, capsys):
    src = _prices_csv(tmp_path / "p.csv")
    lines = src.read_text().splitlines()
    src.write_text("\n".join(lines[:1] + lines[:0:-1]) + "\n")  # header, then newest first
    out = tmp_path / "risk.xlsx"
    assert cli.main(["refresh", "--prices", str(src), "--out", str(out)]) == 0
    n = len(lines) - 1
    assert f"(rows 2-{n + 1}, newest first," in capsys.readouterr().out
    assert CALLS[-1]["n"] == n


def test_too_short_for_the_workbook_names_the_file(tmp_path, monkeypatch, capsys):
    from errdist.errors import InsufficientDataError

    def short(prices, out_path, **kw):
        raise InsufficientDataError("the workbook needs at least 260 prices, got 45")

    monkeypatch.setattr(sys.modules["errdist.workbook.template"], "build_workbook", short)
    src = _prices_csv(tmp_path / "p.csv")
    out = tmp_path / "risk.xlsx"
    argv = ["refresh", "--prices", str(src), "--out", str(out), "--as-of", "2026-03-06"]
    assert cli.main(argv) == 2
    err = capsys.readouterr().err.strip()
    assert err.count("\n") == 0
    assert f"{src} up to --as-of 2026-03-06: the workbook needs at least 260 prices" in err
    assert sorted(tmp_path.iterdir()) == [src]


def test_refresh_reads_the_named_sheet_and_warns_of_repeated_prices(tmp_path, capsys):
    openpyxl = pytest.importorskip("openpyxl", reason="openpyxl is not installed")
    n = MIN_RETURNS + 20
    dates = pd.bdate_range("2026-01-01", periods=n)
    prices = 100 * np.exp(np.cumsum(np.random.default_rng(5).normal(0, 0.01, n)))
    prices[5:9] = prices[5]  # a NAV carried over four days
    wb = openpyxl.Workbook()
    wb.active.title = "Cover"
    wb.active.append(["Meridian fund, daily NAV"])
    ws = wb.create_sheet("NAV")
    ws.append(["Date", "NAV"])
    for d, p in zip(dates, prices, strict=True):
        ws.append([d.to_pydatetime(), float(p)])
    src = tmp_path / "nav.xlsx"
    wb.save(src)
    out = tmp_path / "risk.xlsx"
    assert cli.main(["refresh", "--prices", str(src), "--out", str(out)]) == 2
    err = capsys.readouterr().err
    assert "--sheet" in err and "'NAV'" in err and not out.exists()
    assert cli.main(["refresh", "--prices", str(src), "--sheet", "NAV", "--out", str(out)]) == 0
    captured = capsys.readouterr()
    assert CALLS[-1]["n"] == n and out.exists()
    assert f"from {src}, sheet 'NAV' (rows 2-{n + 1}" in captured.out
    # Sheet row 1 is the header: the four equal prices are sheet rows 7-10.
    assert "warning: " in captured.err and "rows 7-10 (4 x " in captured.err, captured.err
    assert "3 prices repeat the one before unchanged" in captured.err
