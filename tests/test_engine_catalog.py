"""The headless engine with the real worksheet-function catalog, checked against scipy."""

from __future__ import annotations

import numpy as np
import pytest
from scipy import stats

xlsxwriter = pytest.importorskip("xlsxwriter", reason="XlsxWriter not installed")
pytest.importorskip("formulas", reason="formulas not installed")
catalog = pytest.importorskip("errdist.sheet.catalog", reason="worksheet catalog not present")

from errdist.workbook import engine  # noqa: E402

X = [-2.5, -0.7, 0.0, 0.4, 1.9]


def test_every_catalog_function_is_registered():
    registered = engine.register_functions()
    assert set(registered) == {n.upper() for n in catalog.names()}
    from formulas.functions import get_functions

    functions = get_functions()
    for name in registered:
        assert name in functions and "_XLUDF." + name in functions


def test_catalog_functions_in_a_workbook(tmp_path):
    path = tmp_path / "cat.xlsx"
    rng = np.random.default_rng(11)
    # reference sample from scipy.stats.gennorm (same law: beta = shape)
    data = stats.gennorm.rvs(1.3, loc=0.001, scale=0.01, size=300, random_state=rng)
    wb = xlsxwriter.Workbook(str(path), {"use_future_functions": True})
    ws = wb.add_worksheet("S")
    for i, v in enumerate(X):
        ws.write_number(i, 0, v)
    for i, v in enumerate(data):
        ws.write_number(i, 1, float(v))
    ws.write_dynamic_array_formula("C1:C5", "=ERRDIST_PDF(A1:A5,0,1,1.5)")
    ws.write_formula("D1", "=ERRDIST_CDF(A2,0.1,0.8,1.2)")
    ws.write_formula("D2", "=ERRDIST_PDF(0,0,-1,2)")
    ws.write_formula("D3", "=_xludf.ERRDIST_CDF(A2,0.1,0.8,1.2)")
    ws.write_dynamic_array_formula("E1:G2", f'=ERRDIST_FIT(B1:B{len(data)},"mle",TRUE)')
    wb.close()

    ev = engine.evaluate_details(path)
    assert ev.problems == []
    v = ev.values
    # scipy.stats.gennorm has the same density: beta/(2 scale Gamma(1/beta)) exp(-|z|^beta)
    for i, x in enumerate(X):
        assert v[("S", f"C{i + 1}")] == pytest.approx(stats.gennorm.pdf(x, 1.5), rel=1e-12)
    assert v[("S", "D1")] == pytest.approx(stats.gennorm.cdf(-0.7, 1.2, 0.1, 0.8), rel=1e-12)
    assert v[("S", "D3")] == v[("S", "D1")]
    assert v[("S", "D2")] == "#NUM!"  # scale <= 0: a real error value, not text
    assert any("scale" in m for m in ev.messages)
    assert [v[("S", c)] for c in ("E1", "F1", "G1")] == ["loc", "scale", "shape"]
    loc, scale, shape = (v[("S", c)] for c in ("E2", "F2", "G2"))
    # The MLE must be at least as likely as scipy's own gennorm.fit (reference optimiser).
    b_ref, loc_ref, scale_ref = stats.gennorm.fit(data)
    ll_ours = stats.gennorm.logpdf(data, shape, loc, scale).sum()
    ll_ref = stats.gennorm.logpdf(data, b_ref, loc_ref, scale_ref).sum()
    assert ll_ours >= ll_ref - 1e-7
    assert shape == pytest.approx(b_ref, rel=0.05)


def test_omitted_arguments_mean_not_given(tmp_path):
    """``f(a,,b)``: the spreadsheet (through xlwings) passes "not given" for the empty slot,
    so the parameter's default applies; ``formulas`` alone would read it as 0."""
    path = tmp_path / "omitted.xlsx"
    wb = xlsxwriter.Workbook(str(path), {"use_future_functions": True})
    ws = wb.add_worksheet("S")
    ws.write_formula("A1", '=ERRDIST_VAR(0.99,0,1,2,10,,"iid")')
    ws.write_formula("A2", "=ERRDIST_VAR(0.99,0,1,2,,)")
    ws.write_formula("A3", "=ERRDIST_VAR(0.99,0,1,2,10,0)")  # a real 0 stays 0: #NUM!
    ws.write_formula("A4", "=SUM(1,,2)")  # built-ins keep the spreadsheet's rule (empty = 0)
    wb.close()
    v = engine.evaluate_workbook(path)
    # Normal law (shape 2, scale 1 -> sigma = 1/sqrt(2)); for the normal both horizon rules
    # give sqrt(10) * sigma * z_0.99 (scipy.stats.norm as the reference).
    sigma = 1 / np.sqrt(2)
    assert v[("S", "A1")] == pytest.approx(np.sqrt(10) * sigma * stats.norm.ppf(0.99), rel=1e-6)
    assert v[("S", "A2")] == pytest.approx(sigma * stats.norm.ppf(0.99), rel=1e-12)
    assert v[("S", "A3")] == "#NUM!"
    assert v[("S", "A4")] == 3


def test_mark_omitted_arguments_skips_strings_and_builtins():
    mark = engine.mark_omitted_arguments
    lit = f'"{engine.OMITTED}"'
    assert mark("=ERRDIST_FIT(A1:A9,,TRUE)") == f"=ERRDIST_FIT(A1:A9,{lit},TRUE)"
    assert mark("=ERRDIST_VERSION()") == "=ERRDIST_VERSION()"
    assert mark("=ERRDIST_CDF(IF(A1,1,),0,1,2)") == "=ERRDIST_CDF(IF(A1,1,),0,1,2)"
    assert mark('=ERRDIST_X("a,,b",,{1,,2})') == f'=ERRDIST_X("a,,b",{lit},{{1,,2}})'
    assert mark("=SUM(1,,2)") == "=SUM(1,,2)"
