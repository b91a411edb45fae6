"""End to end: ``errdist demo`` with the real template, then ``errdist check`` on its output."""

from __future__ import annotations

import re

import pytest

pytest.importorskip("xlsxwriter", reason="XlsxWriter not installed")
pytest.importorskip("formulas", reason="formulas not installed")

from errdist import cli  # noqa: E402


def test_demo_then_check(tmp_path, capsys):
    try:
        from errdist.workbook import template  # noqa: F401
    except ImportError as exc:  # the template builder is another module's job
        pytest.skip(f"template builder not importable: {exc}")
    out = tmp_path / "demo.xlsx"
    assert cli.main(["demo", "--out", str(out)]) == 0
    text = capsys.readouterr().out
    assert "1-day 99%" in text and str(out.resolve()) in text
    # The backtest line says which days it covers, and its count is the exceptions of the
    # last 250 forecasts, counted here from the Backtest sheet's daily rows (return below
    # -VaR) as read by openpyxl. The 250-day window: Basel Committee (1996), "Supervisory
    # framework for the use of backtesting", the traffic-light table.
    found = re.search(r"backtest, last 250 days: (\d+) exceptions of the 99% VaR, (\w+) zone", text)
    assert found, text
    openpyxl = pytest.importorskip("openpyxl")
    ws = openpyxl.load_workbook(out, data_only=True, read_only=True)["Backtest"]
    pairs = [
        (r[1], r[2])
        for r in ws.iter_rows(min_row=8, max_col=3, values_only=True)
        if isinstance(r[1], float) and isinstance(r[2], float)
    ]
    assert len(pairs) > 250
    assert int(found.group(1)) == sum(-ret > var for ret, var in pairs[-250:])
    assert int(found.group(1)) != sum(-ret > var for ret, var in pairs)  # not the whole run
    assert sorted(p.name for p in tmp_path.iterdir()) == ["demo.xlsx"]
    # every cached value in the written file agrees with a fresh headless recomputation
    assert cli.main(["check", str(out)]) == 0
    assert "formula cells match" in capsys.readouterr().out
