"""The committed template workbook: no drift, every cached value recomputed and referenced.

- the committed file equals a fresh rebuild from the demo data, cell by cell (formulas and
  values), except the cells named in ``errdist.workbook.template.VOLATILE_CELLS``;
- the headless engine, evaluating the committed file, reproduces every cached value;
- every ERRDIST_ cell equals the Python core called directly (1e-12 relative);
- every built-in cell equals pandas / numpy / scipy applied to its inputs (1e-12 relative),
  and the built-in-only moments fit equals ``errdist.estimate.solve_shape`` (1e-10);
- the file is what a spreadsheet writes for spilled results (XML checked), names the UDF
  module on an xlwings.conf sheet, and uses no function the headless engine lacks.
"""

from __future__ import annotations

import re
import zipfile
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

pytest.importorskip("formulas", reason="the headless extra (formulas) is not installed")
pytest.importorskip("xlsxwriter", reason="XlsxWriter is not installed")
pytest.importorskip("openpyxl", reason="openpyxl is not installed")

from errdist.data.demo import FUND_NAME, simulate_prices  # noqa: E402
from errdist.workbook import template  # noqa: E402
from errdist.workbook.layout import Plan  # noqa: E402
from errdist.workbook.writer import write_plan  # noqa: E402
from template_reference import (  # noqa: E402
    Book,
    builtin_expected,
    close,
    core_expected,
    numeric,
    read_book,
)

ROOT = Path(__file__).resolve().parents[1]
TEMPLATE = ROOT / "workbook_template" / "errdist-monthly-risk.xlsx"


@pytest.fixture(scope="module")
def committed() -> Book:
    if not TEMPLATE.exists():
        pytest.fail(f"{TEMPLATE} is missing: python -m errdist.workbook.template")
    return read_book(TEMPLATE)


@pytest.fixture(scope="module")
def plan() -> Plan:
    return template.layout_workbook(simulate_prices(), fund_name=FUND_NAME)


@pytest.fixture(scope="module")
def rebuilt(tmp_path_factory: pytest.TempPathFactory) -> tuple[Book, template.BuildResult]:
    out = tmp_path_factory.mktemp("rebuild") / "rebuilt.xlsx"
    result = template.build_workbook(simulate_prices(), out, fund_name=FUND_NAME)
    return read_book(out), result


@pytest.fixture(scope="module")
def engine_values() -> dict[tuple[str, str], object]:
    from errdist.workbook.engine import evaluate_workbook

    return dict(evaluate_workbook(TEMPLATE))


_VOLATILE: dict[tuple[str, str], str] = {}


def _volatile() -> dict[tuple[str, str], str]:
    if not _VOLATILE:
        template.layout_workbook(simulate_prices(), fund_name=FUND_NAME)
        _VOLATILE.update(template.VOLATILE_CELLS)
    return _VOLATILE


# ------------------------------------------------------------------------------ drift


def test_committed_template_equals_a_fresh_rebuild(committed: Book, rebuilt) -> None:
    """Rebuild from the demo data; every formula and value must match the committed file."""
    fresh, _ = rebuilt
    volatile = _volatile()
    assert set(volatile) == {("Guide", a1) for (_, a1) in volatile}, volatile
    assert fresh.sheets == committed.sheets
    f_old = {(f.sheet, f.anchor): (f.text, f.ref) for f in committed.formulas}
    f_new = {(f.sheet, f.anchor): (f.text, f.ref) for f in fresh.formulas}
    assert f_old == f_new, "formulas differ: rebuild with python -m errdist.workbook.template"
    keys = set(committed.values) | set(fresh.values)
    diffs = [
        (k, committed.values.get(k), fresh.values.get(k))
        for k in sorted(keys)
        if k not in volatile and not close(committed.values.get(k), fresh.values.get(k))
    ]
    assert not diffs, f"{len(diffs)} cells differ from a rebuild, first: {diffs[:5]}"


def test_volatile_cells_are_named_and_hold_the_version(committed: Book) -> None:
    volatile = _volatile()
    assert volatile, "the template has a version cell; it must be listed as volatile"
    for (sheet, a1), why in volatile.items():
        assert why
        formula = next(f for f in committed.formulas if (f.sheet, f.anchor) == (sheet, a1))
        assert formula.text == "=ERRDIST_VERSION()"


def test_writing_is_deterministic(plan: Plan, tmp_path: Path) -> None:
    values = {(s, a1): 1.5 for s, a1, _ in plan.formula_cells()}
    a, b = tmp_path / "a.xlsx", tmp_path / "b.xlsx"
    write_plan(plan, a, values)
    write_plan(plan, b, values)
    assert a.read_bytes() == b.read_bytes()


# ------------------------------------------------------------------------------ values


def test_every_formula_cell_has_a_cached_value(committed: Book, plan: Plan) -> None:
    missing = []
    for sheet, a1, entry in plan.formula_cells():
        v = committed.values.get((sheet, a1))
        if v is None and not _may_be_blank(sheet, entry.formula):
            missing.append(f"{sheet}!{a1}")
    assert not missing, f"formula cells without a cached value: {missing[:10]}"


def _may_be_blank(sheet: str, formula: str) -> bool:
    # The rolling VaR has no forecast for the first window, and the rival laws without a
    # shape parameter leave that cell blank: blanks by design.
    # The forecasts are blank before the first forecast day and the model table's standard
    # error column is blank beside the figures that have none.
    return any(
        name in formula
        for name in (
            "ERRDIST_ROLLING_VAR",
            "ERRDIST_COMPARE",
            "ERRDIST_FORECASTS",
            "ERRDIST_COND_PARAMS",
        )
    )


def test_engine_reproduces_every_cached_value(committed: Book, engine_values) -> None:
    cells = [(f.sheet, a1) for f in committed.formulas for a1 in _a1s(f)]
    assert len(cells) > 1000
    volatile = _volatile()
    bad = []
    for key in cells:
        if key in volatile:
            continue
        if not close(engine_values.get(key), committed.values.get(key), rel=1e-12):
            bad.append((key, committed.values.get(key), engine_values.get(key)))
    assert not bad, f"{len(bad)} cached values differ from the engine, first: {bad[:5]}"


def _a1s(f) -> list[str]:
    from openpyxl.utils.cell import get_column_letter

    return [f"{get_column_letter(c)}{r}" for r, c in f.cells()]


def test_errdist_cells_equal_the_core(committed: Book) -> None:
    """Each ERRDIST_ result recomputed by the core from the cached inputs (1e-12)."""
    seen = set()
    for f in committed.formulas:
        if not f.name.startswith("ERRDIST_"):
            continue
        seen.add(f.name)
        expected = core_expected(committed, f)
        got = committed.result(f)
        assert got.shape == (len(expected), len(expected[0])), (f.sheet, f.anchor, f.text)
        for i, row in enumerate(expected):
            for j, want in enumerate(row):
                assert close(got[i, j], want, rel=1e-12), (
                    f"{f.sheet}!{f.anchor} {f.text} [{i},{j}]: cached {got[i, j]!r}, core {want!r}"
                )
    assert {"ERRDIST_RETURNS", "ERRDIST_FIT", "ERRDIST_FIT_REPORT"} <= seen


def test_builtin_cells_equal_pandas_and_scipy(committed: Book) -> None:
    """Every built-in formula recomputed with pandas/numpy/scipy from its inputs (1e-12)."""
    n_checked = 0
    for f in committed.formulas:
        if f.name.startswith("ERRDIST_"):
            continue
        if "ERRDIST_" in f.text:
            pytest.fail(f"{f.sheet}!{f.anchor}: ERRDIST_ nested inside a built-in formula")
        expected = np.asarray(builtin_expected(committed, f), dtype=object)
        got = committed.result(f)
        if expected.ndim == 0:
            expected = np.full(got.shape, expected.item(), dtype=object)
        expected = expected.reshape(got.shape)
        for (i, j), want in np.ndenumerate(expected):
            # Bisection/Newton residuals are ~1e-15 differences of ~2: judged absolutely.
            abs_tol = 1e-13 if "GAMMALN" in f.text and "-$B$" in f.text else 0.0
            assert close(got[i, j], want, rel=1e-12, abs_tol=abs_tol), (
                f"{f.sheet}!{f.anchor} {f.text} [{i},{j}]: cached {got[i, j]!r}, reference {want!r}"
            )
        n_checked += 1
    assert n_checked > 100


def test_sample_statistics_match_pandas(committed: Book, plan: Plan) -> None:
    """KURT vs pandas .kurt(), SKEW vs .skew(), STDEV.S vs .std() (Joanes & Gill 1998 G2/G1)
    on the returns computed independently from the demo prices with numpy."""
    prices = simulate_prices()["price"].to_numpy()
    r = pd.Series(np.log(prices[1:] / prices[:-1]))
    keys = plan.keys
    expected = {
        "kurt": r.kurt(),
        "skew": r.skew(),
        "sd": r.std(),
        "mean": r.mean(),
        "median": r.median(),
        "n_obs": float(r.count()),
    }
    for key, want in expected.items():
        sheet, a1 = keys[key].split("!")
        got = committed.value(sheet, a1)
        # The returns themselves agree to ~1 ulp with numpy's: 1e-10 on the moments.
        assert got == pytest.approx(want, rel=1e-10, abs=1e-18), key


def test_builtin_moments_fit_matches_solve_shape(committed: Book, plan: Plan) -> None:
    """The bisection + Newton cells (GAMMALN, EXP, LN only) solve the kurtosis equation."""
    from errdist.estimate import fit, solve_scale, solve_shape

    keys = plan.keys
    k = float(committed.value(*keys["kurt"].split("!")))
    sd = float(committed.value(*keys["sd"].split("!")))
    b = float(committed.value(*keys["hand_shape"].split("!")))
    a = float(committed.value(*keys["hand_scale"].split("!")))
    m = float(committed.value(*keys["hand_loc"].split("!")))
    assert b == pytest.approx(solve_shape(k), rel=1e-10)
    assert a == pytest.approx(solve_scale(sd, solve_shape(k)), rel=1e-10)
    data = numeric(committed.block("Returns", f"B2:B{len(simulate_prices())}")).ravel()
    mom = fit(data, method="moments")
    assert (m, a, b) == pytest.approx((mom.loc, mom.scale, mom.shape), rel=1e-10)


# ------------------------------------------------------------------------------ file


def _sheet_xml(path: Path, name: str) -> str:
    with zipfile.ZipFile(path) as z:
        wb = z.read("xl/workbook.xml").decode()
        rels = z.read("xl/_rels/workbook.xml.rels").decode()
        rid = re.search(rf'<sheet name="{re.escape(name)}" sheetId="\d+" r:id="(rId\d+)"', wb)
        assert rid, name
        target = re.search(rf'Id="{rid.group(1)}" [^>]*Target="([^"]+)"', rels)
        if target is None:
            target = re.search(rf'Target="([^"]+)"[^>]*Id="{rid.group(1)}"', rels)
        return z.read("xl/" + target.group(1)).decode()


def test_spills_are_stored_like_a_spreadsheet_stores_them(committed: Book) -> None:
    """Anchor: <f t="array" ref=…> with the cm dynamic-array marker; other cells of the
    range: plain values (numbers <v>, text t="str"), no formula."""
    xml = _sheet_xml(TEMPLATE, "Returns")
    n = len(simulate_prices()) - 1
    anchor = re.search(r'<c r="B2"[^>]*>(.*?)</c>', xml)
    assert anchor and 'cm="1"' in re.search(r'<c r="B2"[^>]*>', xml).group(0)
    assert f'<f t="array" ref="B2:B{n + 1}">ERRDIST_RETURNS(' in anchor.group(1)
    third = re.search(r'<c r="B3"([^>]*)>(.*?)</c>', xml)
    assert "<f" not in third.group(2) and re.fullmatch(r"<v>[-0-9.eE]+</v>", third.group(2))
    calib = _sheet_xml(TEMPLATE, "Calibration")
    header_cell = re.search(r'<c r="F5"([^>]*)>(.*?)</c>', calib)
    assert 't="str"' in header_cell.group(1) and header_cell.group(2) == "<v>scale</v>"
    with zipfile.ZipFile(TEMPLATE) as z:
        assert "xl/metadata.xml" in z.namelist()  # the dynamic-array metadata part


def test_xlwings_conf_sheet_names_the_udf_module(committed: Book) -> None:
    # xlwings' add-in reads keys from A1 down and values from column B (GetConfigFromSheet
    # in xlwings 0.37.8 addin/Config.bas); keys are matched upper-case ("UDF MODULES").
    assert committed.sheets[-1] == "xlwings.conf"
    assert committed.value("xlwings.conf", "A1").upper() == "UDF MODULES"
    assert committed.value("xlwings.conf", "B1") == "errdist.sheet.xlwings_udfs"
    assert committed.value("xlwings.conf", "A2") is None  # no stray key under A1
    import errdist.sheet.xlwings_udfs  # noqa: F401 - the named module imports


def test_only_functions_the_engine_supports(committed: Book) -> None:
    import formulas

    known = {k.upper() for k in formulas.get_functions()}
    banned = {"SEQUENCE", "LET", "AGGREGATE", "UNIQUE", "LAMBDA", "OFFSET", "INDIRECT"}
    for f in committed.formulas:
        for name in re.findall(r"([A-Za-z_][A-Za-z0-9_.]*)\(", re.sub(r'"[^"]*"', "", f.text)):
            bare = name.upper().removeprefix("_XLFN.")
            assert bare not in banned, (f.sheet, f.anchor, f.text)
            assert bare.startswith("ERRDIST_") or name.upper() in known, (f.sheet, name)


def test_template_holds_every_section(committed: Book) -> None:
    """The final template uses every function family of the catalog it was built with."""
    used = {f.name for f in committed.formulas}
    wanted = {
        "ERRDIST_RETURNS",
        "ERRDIST_FIT",
        "ERRDIST_FIT_REPORT",
        "ERRDIST_SOLVE_SHAPE",
        "ERRDIST_SOLVE_SCALE",
        "ERRDIST_PDF",
        "ERRDIST_VERSION",
    }
    later = {
        "ERRDIST_VAR",
        "ERRDIST_ES",
        "ERRDIST_GOF",
        "ERRDIST_COMPARE",
        "ERRDIST_EMPIRICAL",
        "ERRDIST_BACKTEST",
        "ERRDIST_ROLLING_VAR",
        "ERRDIST_SKEW_FIT",
        "ERRDIST_SKEW_VAR",
        "ERRDIST_SKEW_ES",
        "ERRDIST_SKEW_CDF",
        "ERRDIST_COND_VAR",
        "ERRDIST_COND_ES",
        "ERRDIST_COND_PARAMS",
        "ERRDIST_FORECASTS",
        "ERRDIST_ES_BACKTEST",
    }
    from errdist.sheet import catalog

    wanted |= later & set(catalog.CATALOG)
    assert wanted <= used, sorted(wanted - used)
    for name in ("KURT", "STDEV.S", "MEDIAN", "GAMMALN", "FREQUENCY", "NORM.S.INV"):
        assert any(name in f.text.upper() for f in committed.formulas), name


def test_build_refuses_too_short_history(tmp_path: Path) -> None:
    from errdist.errors import InsufficientDataError

    short = simulate_prices().iloc[:100]
    with pytest.raises(InsufficientDataError, match="at least"):
        template.build_workbook(short, tmp_path / "x.xlsx", fund_name="x")


def test_build_result_summary(rebuilt) -> None:
    _, result = rebuilt
    s = result.summary
    assert s["fund"] == FUND_NAME and s["n_returns"] == len(simulate_prices()) - 1
    assert 0.3 < s["mle"]["shape"] < 2.5 and 0.3 < s["moments"]["shape"] < 2.5
    assert set(result.timings) >= {"layout", "evaluate", "write", "total"}
