"""End to end: ``errdist demo`` with the real template, then ``errdist check`` on its output."""

from __future__ import annotations

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
    assert sorted(p.name for p in tmp_path.iterdir()) == ["demo.xlsx"]
    # every cached value in the written file agrees with a fresh headless recomputation
    assert cli.main(["check", str(out)]) == 0
    assert "formula cells match" in capsys.readouterr().out
