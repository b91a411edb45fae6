""".xlsx prices read with python-calamine give the same table as with openpyxl.

openpyxl (the reference reader of the file format) and python-calamine must yield the same
dates, prices, file rows and messages; calamine is used when installed because it is several
times faster on price files (measured side by side below, printed, not asserted).
"""

from __future__ import annotations

import datetime as dt
import time

import numpy as np
import pandas as pd
import pytest

pytest.importorskip("python_calamine", reason="python-calamine is not installed")
xlsxwriter = pytest.importorskip("xlsxwriter", reason="XlsxWriter not installed")

from errdist.data import prices_io  # noqa: E402
from errdist.errors import InputTypeError  # noqa: E402


def _book(path, n: int = 400, bad_row: int | None = None, newest_first: bool = False):
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("Prices")
    fmt = wb.add_format({"num_format": "dd/mm/yyyy"})
    ws.write_row(0, 0, ["Valuation date", "NAV", "Comment"])
    dates = pd.bdate_range("2023-01-02", periods=n)
    rng = np.random.default_rng(7)
    prices = 100 * np.exp(np.cumsum(rng.normal(0, 0.01, n)))
    order = range(n - 1, -1, -1) if newest_first else range(n)
    for r, i in enumerate(order, start=1):
        ws.write_datetime(r, 0, dates[i].to_pydatetime(), fmt)
        if bad_row == r + 1:
            ws.write_string(r, 1, "n/a")
        else:
            ws.write_number(r, 1, float(prices[i]))
        if i % 50 == 0:
            ws.write_string(r, 2, "month end")
    wb.close()
    return path


def _read(path, calamine: bool, monkeypatch):
    monkeypatch.setattr(prices_io, "USE_CALAMINE", calamine)
    return prices_io.read_prices(path)


@pytest.mark.parametrize("newest_first", [False, True])
def test_same_table_as_openpyxl(tmp_path, monkeypatch, newest_first):
    path = _book(tmp_path / "p.xlsx", newest_first=newest_first)
    t0 = time.perf_counter()
    a = _read(path, True, monkeypatch)
    t1 = time.perf_counter()
    b = _read(path, False, monkeypatch)
    t2 = time.perf_counter()
    pd.testing.assert_frame_equal(a, b)
    assert a.attrs == b.attrs
    assert a["date"].iloc[0] == pd.Timestamp(dt.date(2023, 1, 2))
    print(f"calamine {t1 - t0:.3f} s, openpyxl {t2 - t1:.3f} s")


def test_same_message_for_a_text_price(tmp_path, monkeypatch):
    path = _book(tmp_path / "p.xlsx", bad_row=120)
    messages = []
    for calamine in (True, False):
        with pytest.raises(InputTypeError) as info:
            _read(path, calamine, monkeypatch)
        messages.append(str(info.value))
    assert messages[0] == messages[1] and "120" in messages[0]
