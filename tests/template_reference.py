"""Reference checks of a workbook's cells, shared by the template and LibreOffice tests.

- :func:`read_book` reads an .xlsx file's formulas and cached values (openpyxl, read only —
  the file is never saved).
- :func:`core_expected` recomputes an ERRDIST_ cell's whole result with the Python core
  called directly (``errdist.estimate.fit``, ``errdist.risk.value_at_risk`` …), from the cached
  values of the cells it refers to — not through the worksheet layer or the engine.
- :func:`builtin_expected` recomputes a built-in formula with pandas / numpy / scipy, from the
  cached values of its inputs: KURT = ``pandas.Series.kurt`` (bias-adjusted G2, Joanes & Gill
  1998), SKEW = ``pandas.Series.skew`` (adjusted G1), STDEV.S = ``Series.std`` (n − 1),
  MEDIAN, AVERAGE, GAMMALN = ``scipy.special.gammaln``, NORM.S.INV / NORM.S.DIST / NORM.DIST =
  ``scipy.stats.norm``, FREQUENCY = ``pandas.cut`` on right-closed bins (the spreadsheet's
  definition: counts of values in (previous bin, bin], then those above the last bin).
"""

from __future__ import annotations

import datetime as _dt
import math
import re
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd
from openpyxl import load_workbook
from openpyxl.utils.cell import get_column_letter, range_boundaries
from openpyxl.utils.datetime import to_excel
from openpyxl.worksheet.formula import ArrayFormula
from scipy import special, stats

ERRORS = ("#DIV/0!", "#N/A", "#NAME?", "#NULL!", "#NUM!", "#REF!", "#VALUE!")


@dataclass
class Formula:
    """One formula of the workbook: its text (leading ``=``), and the range it fills."""

    sheet: str
    anchor: str
    text: str
    ref: str  # "B2" or "B2:D5"

    @property
    def name(self) -> str:
        """The outermost function name ("" for a formula that is not a single call)."""
        m = re.match(r"^=([A-Za-z_][A-Za-z0-9_.]*)\(", self.text)
        if not m or _matching_paren(self.text, m.end() - 1) != len(self.text) - 1:
            return ""
        return m.group(1).upper().removeprefix("_XLFN.")

    def cells(self) -> list[tuple[int, int]]:
        """(row, col) 1-based of every cell the formula fills."""
        c0, r0, c1, r1 = range_boundaries(self.ref)
        return [(r, c) for r in range(r0, r1 + 1) for c in range(c0, c1 + 1)]

    @property
    def shape(self) -> tuple[int, int]:
        c0, r0, c1, r1 = range_boundaries(self.ref)
        return r1 - r0 + 1, c1 - c0 + 1


@dataclass
class Book:
    """Formulas and cached values of a workbook."""

    path: Path
    sheets: list[str]
    formulas: list[Formula] = field(default_factory=list)
    values: dict[tuple[str, str], Any] = field(default_factory=dict)

    def value(self, sheet: str, a1: str) -> Any:
        return self.values.get((sheet, a1.replace("$", "")))

    def block(self, sheet: str, ref: str) -> np.ndarray:
        """Cached values of a range as a 2-D object array (None for blanks)."""
        c0, r0, c1, r1 = range_boundaries(ref.replace("$", ""))
        out = np.empty((r1 - r0 + 1, c1 - c0 + 1), dtype=object)
        for r in range(r0, r1 + 1):
            for c in range(c0, c1 + 1):
                out[r - r0, c - c0] = self.values.get((sheet, f"{get_column_letter(c)}{r}"))
        return out

    def result(self, f: Formula) -> np.ndarray:
        return self.block(f.sheet, f.ref)


def read_book(path: Path) -> Book:
    """Read formulas and cached values (openpyxl, read-only use; nothing is saved)."""
    wf = load_workbook(path, data_only=False)
    wv = load_workbook(path, data_only=True)
    book = Book(path, list(wf.sheetnames))
    for name in wf.sheetnames:
        for row_f, row_v in zip(wf[name].iter_rows(), wv[name].iter_rows(), strict=True):
            for cf, cv in zip(row_f, row_v, strict=True):
                if cv.value is not None:
                    v = cv.value
                    if isinstance(v, (_dt.datetime, _dt.date)):
                        v = float(to_excel(v))  # dates as the serial numbers stored
                    book.values[(name, cf.coordinate)] = v
                f = cf.value
                if isinstance(f, ArrayFormula):
                    book.formulas.append(Formula(name, cf.coordinate, f.text, f.ref))
                elif isinstance(f, str) and f.startswith("="):
                    book.formulas.append(Formula(name, cf.coordinate, f, cf.coordinate))
    return book


# ----------------------------------------------------------------------------- parsing

_REF = re.compile(
    r"(?:(?P<sheet>'(?:[^']|'')+'|[A-Za-z_][A-Za-z0-9_.]*)!)?"
    r"(?P<a>\$?[A-Z]{1,3}\$?[0-9]+)(?::(?P<b>\$?[A-Z]{1,3}\$?[0-9]+))?"
)


def _matching_paren(text: str, i: int) -> int:
    depth, in_str = 0, False
    for j in range(i, len(text)):
        ch = text[j]
        if ch == '"':
            in_str = not in_str
        elif in_str:
            continue
        elif ch == "(":
            depth += 1
        elif ch == ")":
            depth -= 1
            if depth == 0:
                return j
    return -1


def split_args(f: Formula) -> list[str]:
    """Top-level arguments of a single-call formula, as texts."""
    inner = f.text[f.text.index("(") + 1 : -1]
    args, depth, in_str, cur = [], 0, False, ""
    for ch in inner:
        if ch == '"':
            in_str = not in_str
        if not in_str and ch in "(":
            depth += 1
        if not in_str and ch in ")":
            depth -= 1
        if ch == "," and depth == 0 and not in_str:
            args.append(cur)
            cur = ""
        else:
            cur += ch
    args.append(cur)
    return [a.strip() for a in args] if inner.strip() else []


def _sheet_of(m: re.Match[str], default: str) -> str:
    s = m.group("sheet")
    if not s:
        return default
    return s[1:-1].replace("''", "'") if s.startswith("'") else s


def resolve(book: Book, f: Formula, arg: str) -> Any:
    """An argument's value: a 2-D float/object array for a range, a float, a str, a bool,
    or None for an omitted argument."""
    if arg == "":
        return None
    if arg.startswith('"'):
        return arg[1:-1].replace('""', '"')
    if arg.upper() in ("TRUE", "FALSE"):
        return arg.upper() == "TRUE"
    m = _REF.fullmatch(arg)
    if m:
        sheet = _sheet_of(m, f.sheet)
        ref = m.group("a") + (":" + m.group("b") if m.group("b") else "")
        blk = book.block(sheet, ref)
        if blk.size == 1:
            return blk[0, 0]
        return blk
    return float(arg)


def numeric(block: Any) -> np.ndarray:
    """Floats of a block, NaN for blanks."""
    arr = np.asarray(block, dtype=object)
    return np.array([np.nan if v is None else float(v) for v in arr.ravel()]).reshape(arr.shape)


# ----------------------------------------------------------------------------- core checks


def _table_rows(df: pd.DataFrame, header: bool) -> list[list[Any]]:
    rows = [list(df.columns)] if header else []
    return rows + [list(r) for r in df.itertuples(index=False)]


def _core_returns(book: Book, f: Formula, args: list[Any]) -> list[list[Any]]:
    from errdist.data.returns import returns_from_prices

    kind = args[1] if len(args) > 1 and args[1] is not None else "log"
    r = returns_from_prices(numeric(args[0]).ravel(), kind=kind)
    return [[v] for v in r]


def _core_fit(book: Book, f: Formula, args: list[Any]) -> list[list[Any]]:
    from errdist.estimate import fit

    method = args[1] if len(args) > 1 and args[1] is not None else "mle"
    header = bool(args[2]) if len(args) > 2 and args[2] is not None else False
    res = fit(numeric(args[0]).ravel(), method=method)
    rows = [["loc", "scale", "shape"]] if header else []
    return rows + [[res.loc, res.scale, res.shape]]


def _core_fit_report(book: Book, f: Formula, args: list[Any]) -> list[list[Any]]:
    from errdist import estimate

    x = numeric(args[0]).ravel()
    v = x[~np.isnan(x)]
    mle = estimate.fit(v, method="mle")
    mom = estimate.fit(v, method="moments")
    expected = {
        "n used": float(v.size),
        "blanks skipped": float(np.isnan(x).sum()),
        "mean": estimate.sample_mean(v),
        "median": estimate.sample_median(v),
        "STDEV.S": estimate.sample_std(v),
        "SKEW": estimate.sample_skewness(v),
        "KURT": estimate.sample_excess_kurtosis(v),
        "MLE loc": mle.loc,
        "MLE scale": mle.scale,
        "MLE shape": mle.shape,
        "MLE log-likelihood": mle.loglik,
        "MLE AIC": mle.aic,
        "moments loc": mom.loc,
        "moments scale": mom.scale,
        "moments shape": mom.shape,
        "moments log-likelihood": mom.loglik,
        "moments AIC": mom.aic,
        "MLE shape at search bound": bool(mle.at_bound),
        "MLE note": mle.warning or "none",
        "repeated values": float(mle.ties),
    }
    got = book.result(f)
    return [
        [label, expected.get(str(label), "<label not known to the test>")] for label in got[:, 0]
    ]


def _scalar(fn: Callable[..., Any]) -> Callable[[Book, Formula, list[Any]], list[list[Any]]]:
    def run(book: Book, f: Formula, args: list[Any]) -> list[list[Any]]:
        return [[fn(*args)]]

    return run


def _core_pdf(book: Book, f: Formula, args: list[Any]) -> list[list[Any]]:
    from errdist.law.symmetric import pdf

    x = numeric(args[0]) if isinstance(args[0], np.ndarray) else np.array([[float(args[0])]])
    return pdf(x, float(args[1]), float(args[2]), float(args[3])).tolist()


def _opt(args: list[Any], i: int, default: Any) -> Any:
    return args[i] if len(args) > i and args[i] is not None else default


def _core_risk(which: str) -> Callable[[Book, Formula, list[Any]], list[list[Any]]]:
    def run(book: Book, f: Formula, args: list[Any]) -> list[list[Any]]:
        from errdist import risk

        fn = risk.value_at_risk if which == "var" else risk.expected_shortfall
        h = _opt(args, 4, 1.0)
        amount = _opt(args, 5, None)
        rule = _opt(args, 6, "sqrt")
        return [
            [
                float(
                    fn(
                        float(args[0]),
                        float(args[1]),
                        float(args[2]),
                        float(args[3]),
                        horizon=float(h),
                        amount=None if amount is None else float(amount),
                        horizon_rule=rule,
                    )
                )
            ]
        ]

    return run


def _core_empirical(book: Book, f: Formula, args: list[Any]) -> list[list[Any]]:
    from errdist.checks.empirical import empirical_points

    df = empirical_points(numeric(args[0]).ravel(), float(args[1]), float(args[2]), float(args[3]))
    return _table_rows(df, bool(_opt(args, 4, False)))


def _core_compare(book: Book, f: Formula, args: list[Any]) -> list[list[Any]]:
    from errdist.checks.rivals import compare

    df = compare(numeric(args[0]).ravel())
    return _table_rows(df, bool(_opt(args, 1, False)))


def _core_version(book: Book, f: Formula, args: list[Any]) -> list[list[Any]]:
    import errdist

    got = str(book.result(f)[0, 0])
    # The version cell names the package version; its other parts are environment facts.
    assert got.startswith(f"errdist {errdist.__version__}"), got
    return [[got]]


def _core_gof(book: Book, f: Formula, args: list[Any]) -> list[list[Any]]:
    from errdist.checks.goodness import goodness_of_fit

    def num(v: Any) -> float | None:
        return None if v is None else float(v)

    r = goodness_of_fit(
        numeric(args[0]).ravel(),
        num(_opt(args, 1, None)),
        num(_opt(args, 2, None)),
        num(_opt(args, 3, None)),
        statistic=_opt(args, 4, "ad"),
        samples=int(_opt(args, 5, 999)),
        seed=None if _opt(args, 6, None) is None else int(args[6]),
    )
    return [
        ["statistic", r.statistic_name],
        ["value", r.statistic],
        ["p-value", r.pvalue],
        ["samples", r.samples],
        ["refit", bool(r.refit)],
        ["loc", r.loc],
        ["scale", r.scale],
        ["shape", r.shape],
        ["n", r.n],
    ]


def _core_backtest(book: Book, f: Formula, args: list[Any]) -> list[list[Any]]:
    from errdist.checks.backtest import backtest

    res = backtest(numeric(args[0]).ravel(), numeric(args[1]).ravel(), float(args[2]))
    rows: list[list[Any]] = [["measure", "value"]] if _opt(args, 3, False) else []
    got = book.result(f)
    offset = len(rows)
    for i, (label, value) in enumerate(res.rows()):
        if value is None:  # no plus factor off the 250-day table: a text says so
            value = got[i + offset, 1]
            assert isinstance(value, str) and value.startswith("none"), value
        rows.append([label, value])
    return rows


def _core_rolling(book: Book, f: Formula, args: list[Any]) -> list[list[Any]]:
    from errdist.checks.rolling import rolling_var

    out = rolling_var(numeric(args[0]).ravel(), int(args[1]), float(args[2]), _opt(args, 3, "mle"))
    return [[v] for v in out]


CORE: dict[str, Callable[[Book, Formula, list[Any]], list[list[Any]]]] = {
    "ERRDIST_RETURNS": _core_returns,
    "ERRDIST_FIT": _core_fit,
    "ERRDIST_FIT_REPORT": _core_fit_report,
    "ERRDIST_PDF": _core_pdf,
    "ERRDIST_VERSION": _core_version,
    "ERRDIST_VAR": _core_risk("var"),
    "ERRDIST_ES": _core_risk("es"),
    "ERRDIST_EMPIRICAL": _core_empirical,
    "ERRDIST_COMPARE": _core_compare,
    "ERRDIST_GOF": _core_gof,
    "ERRDIST_BACKTEST": _core_backtest,
    "ERRDIST_ROLLING_VAR": _core_rolling,
}
"""Core recomputation of each worksheet function used in the template."""


def _solve_shape(k: Any) -> float:
    from errdist.estimate import solve_shape

    return solve_shape(float(k))


def _solve_scale(sd: Any, b: Any) -> float:
    from errdist.estimate import solve_scale

    return solve_scale(float(sd), float(b))


CORE["ERRDIST_SOLVE_SHAPE"] = _scalar(_solve_shape)
CORE["ERRDIST_SOLVE_SCALE"] = _scalar(_solve_scale)


# --- the skewed law, conditional models, rolling forecasts and the ES backtest. Each cell is
# recomputed by the core functions directly (errdist.law.skewed, errdist.risk.conditional,
# errdist.risk.forecasts, errdist.checks.es_backtest) from the cached inputs, never through
# the catalog; the outside references of these functions (scipy, arch, mpmath, published
# recursions) are in tests/test_sheet_conditional.py and the core's own tests.


def _core_skew_fit(book: Book, f: Formula, args: list[Any]) -> list[list[Any]]:
    from errdist.law.skewed import fit_skewed

    res = fit_skewed(numeric(args[0]).ravel())
    head = ["loc", "scale", "shape", "skew", "n", "loglik", "aic", "at_bound", "warning"]
    row = [res.loc, res.scale, res.shape, res.skew, float(res.n), res.loglik, res.aic]
    row += [bool(res.at_bound), res.warning or "none"]
    return ([head] if _opt(args, 1, False) else []) + [row]


def _core_skew_risk(which: str) -> Callable[[Book, Formula, list[Any]], list[list[Any]]]:
    def run(book: Book, f: Formula, args: list[Any]) -> list[list[Any]]:
        from errdist.law import skewed

        fn = skewed.value_at_risk if which == "var" else skewed.expected_shortfall
        c, m, a, b, lam = (float(v) for v in args[:5])
        return [[fn(c, m, a, b, lam, float(_opt(args, 5, 1.0)), _opt(args, 6, None))]]

    return run


def _core_skew_cdf(book: Book, f: Formula, args: list[Any]) -> list[list[Any]]:
    from errdist.law import skewed

    x = numeric(args[0]) if isinstance(args[0], np.ndarray) else np.array([[float(args[0])]])
    fn = skewed.sf if _opt(args, 5, False) else skewed.cdf
    return np.asarray(fn(x, *(float(v) for v in args[1:5]))).tolist()


def _cond_fit(r: np.ndarray, model: str, c: float, decay: float) -> Any:
    from errdist.risk.conditional import fit_ewma, fit_gjr

    x = r[~np.isnan(r)]
    if model == "ewma":
        return fit_ewma(x, c, lam=decay)
    return fit_gjr(x, c, asymmetric=model == "gjr")


def _core_cond(which: str) -> Callable[[Book, Formula, list[Any]], list[list[Any]]]:
    def run(book: Book, f: Formula, args: list[Any]) -> list[list[Any]]:
        res = _cond_fit(
            numeric(args[0]).ravel(),
            str(_opt(args, 2, "gjr")),
            float(args[1]),
            float(_opt(args, 3, 0.94)),
        )
        return [[res.value_at_risk if which == "var" else res.expected_shortfall]]

    return run


def _core_cond_params(book: Book, f: Formula, args: list[Any]) -> list[list[Any]]:
    c = float(_opt(args, 2, 0.99))
    res = _cond_fit(
        numeric(args[0]).ravel(), str(_opt(args, 1, "gjr")), c, float(_opt(args, 3, 0.94))
    )
    rows: list[list[Any]] = [["item", "value", "std_error"]] if _opt(args, 4, False) else []
    rows += [
        ["model", res.model, None],
        ["n", float(res.n), None],
        ["blanks skipped", float(res.n_dropped), None],
        ["confidence", c, None],
        ["volatility tomorrow", res.volatility, None],
        ["mean tomorrow", res.mean, None],
        ["VaR 1 day", res.value_at_risk, None],
        ["ES 1 day", res.expected_shortfall, None],
        ["log-likelihood", res.loglik, None],
    ]
    for name, v, se in zip(res.param_names, res.params, res.std_errors, strict=True):
        rows.append([name, v, se if np.isfinite(se) else "set by the user"])
    rows += [["at_bound", bool(res.at_bound), None], ["warning", res.warning or "none", None]]
    return rows


def _core_forecasts(book: Book, f: Formula, args: list[Any]) -> list[list[Any]]:
    from errdist.risk.forecasts import rolling_forecasts

    r = numeric(args[0]).ravel()
    p = rolling_forecasts(
        r,
        str(args[1]),
        float(args[2]),
        window=int(_opt(args, 3, 250)),
        fit_window=int(_opt(args, 4, 1000)),
        refit=int(_opt(args, 5, 21)),
        lam=float(_opt(args, 6, 0.94)),
    )
    cols = np.column_stack([p.var, p.es, p.mean, p.std, p.shape, p.skew])
    return [[None if np.isnan(v) else float(v) for v in row] for row in cols]


def _core_es_backtest(book: Book, f: Formula, args: list[Any]) -> list[list[Any]]:
    from errdist.checks.es_backtest import es_backtest

    x = numeric(args[0]).ravel()
    fc = numeric(args[1])
    keep = ~np.isnan(x) & ~np.isnan(fc).any(axis=1)
    dropped = float(x.size - keep.sum())
    x, fc = x[keep], fc[keep]
    law = (fc[:, 2], fc[:, 3], fc[:, 4], fc[:, 5]) if fc.shape[1] == 6 else None
    c = float(args[2])
    res = es_backtest(
        x,
        fc[:, 0],
        fc[:, 1],
        c,
        law=law,
        simulations=int(_opt(args, 3, 1000)),
        seed=int(_opt(args, 4, 20140101)),
    )
    rows: list[list[Any]] = [["measure", "value"]] if _opt(args, 5, False) else []
    return rows + [
        ["Z2 statistic", res.statistic],
        ["p-value", res.pvalue],
        ["days", float(res.n)],
        ["exceptions", float(res.exceptions)],
        ["expected exceptions", res.n * (1 - c)],
        ["simulations", float(res.simulations)],
        ["Z2 below -0.70", bool(res.reject_5)],
        ["pairs dropped", dropped],
        ["note", res.warning or "none"],
    ]


CORE.update(
    {
        "ERRDIST_SKEW_FIT": _core_skew_fit,
        "ERRDIST_SKEW_VAR": _core_skew_risk("var"),
        "ERRDIST_SKEW_ES": _core_skew_risk("es"),
        "ERRDIST_SKEW_CDF": _core_skew_cdf,
        "ERRDIST_COND_VAR": _core_cond("var"),
        "ERRDIST_COND_ES": _core_cond("es"),
        "ERRDIST_COND_PARAMS": _core_cond_params,
        "ERRDIST_FORECASTS": _core_forecasts,
        "ERRDIST_ES_BACKTEST": _core_es_backtest,
    }
)


def register_core(name: str, fn: Callable[[Book, Formula, list[Any]], list[list[Any]]]) -> None:
    """Add a core recomputation (used for functions that land later)."""
    CORE[name] = fn


def core_expected(book: Book, f: Formula) -> list[list[Any]]:
    """The core's result for an ERRDIST_ formula, from the cached values of its inputs."""
    fn = CORE.get(f.name)
    if fn is None:
        raise KeyError(f"no core reference check for {f.name} ({f.sheet}!{f.anchor})")
    args = [resolve(book, f, a) for a in split_args(f)]
    return fn(book, f, args)


# ----------------------------------------------------------------------------- built-ins


def _frequency(data: np.ndarray, bins: np.ndarray) -> np.ndarray:
    d = pd.Series(numeric(data).ravel()).dropna()
    b = numeric(bins).ravel()
    edges = np.concatenate([[-np.inf], b, [np.inf]])
    counts = pd.cut(d, edges, right=True).value_counts(sort=False).to_numpy()
    return counts.astype(float).reshape(-1, 1)


def _series(x: Any) -> pd.Series:
    return pd.Series(numeric(x).ravel()).dropna()


def _if(cond: Any, a: Any, b: Any = False) -> Any:
    return np.where(cond, a, b) if isinstance(cond, np.ndarray) else (a if cond else b)


def _norm_s_dist(z: Any, cumulative: bool) -> Any:
    return stats.norm.cdf(z) if cumulative else stats.norm.pdf(z)


def _norm_dist(x: Any, m: Any, s: Any, cumulative: bool) -> Any:
    return stats.norm.cdf(x, m, s) if cumulative else stats.norm.pdf(x, m, s)


BUILTINS: dict[str, Callable[..., Any]] = {
    "KURT": lambda x: _series(x).kurt(),
    "SKEW": lambda x: _series(x).skew(),
    "STDEV.S": lambda x: _series(x).std(ddof=1),
    "MEDIAN": lambda x: _series(x).median(),
    "AVERAGE": lambda x: _series(x).mean(),
    "COUNT": lambda x: float(_series(x).count()),
    "MIN": lambda x: _series(x).min(),
    "MAX": lambda x: _series(x).max(),
    "SUM": lambda x: _series(x).sum(),
    "GAMMALN": lambda x: special.gammaln(x),
    "EXP": np.exp,
    "LN": np.log,
    "SQRT": np.sqrt,
    "ABS": np.abs,
    "ERFC": special.erfc,
    "IF": _if,
    "NA": lambda: np.nan,
    "ISBLANK": lambda v: v is None,
    "NORM.S.INV": lambda p: stats.norm.ppf(p),
    "NORM.S.DIST": _norm_s_dist,
    "NORM.DIST": _norm_dist,
    "FREQUENCY": _frequency,
}
"""Reference implementations of the built-ins the template uses (pandas / numpy / scipy)."""

_TOKEN = re.compile(
    r'(?P<str>"(?:[^"]|"")*")|(?P<func>(?:_xlfn\.)?[A-Z][A-Z0-9.]*(?=\())|'
    r"(?P<ref>(?:'(?:[^']|'')+'!|[A-Za-z_][A-Za-z0-9_.]*!)?\$?[A-Z]{1,3}\$?[0-9]+"
    r"(?::\$?[A-Z]{1,3}\$?[0-9]+)?)|(?P<bool>TRUE|FALSE)|(?P<num>[0-9]+(?:\.[0-9]*)?(?:[eE][-+]?[0-9]+)?)|"
    r"(?P<op><>|<=|>=|[-+*/^(),<>=&])|(?P<ws>\s+)"
)


def _to_python(book: Book, f: Formula, text: str) -> tuple[str, dict[str, Any]]:
    env: dict[str, Any] = {}
    out = []
    pos = 0
    body = text[1:]
    while pos < len(body):
        m = _TOKEN.match(body, pos)
        if not m:
            raise ValueError(f"cannot read {body[pos:]!r} in {f.sheet}!{f.anchor}")
        pos = m.end()
        kind, tok = m.lastgroup, m.group()
        if kind == "str":
            out.append(repr(tok[1:-1].replace('""', '"')))
        elif kind == "func":
            name = tok.upper().removeprefix("_XLFN.")
            if name not in BUILTINS:
                raise KeyError(f"no reference for built-in {name} ({f.sheet}!{f.anchor})")
            key = f"F{len(env)}"
            env[key] = BUILTINS[name]
            out.append(key)
        elif kind == "ref":
            rm = _REF.fullmatch(tok)
            assert rm is not None
            val = resolve(book, f, tok)
            key = f"R{len(env)}"
            if isinstance(val, np.ndarray):
                val = (
                    numeric(val)
                    if all(v is None or isinstance(v, (int, float)) for v in val.ravel())
                    else val
                )
            # a blank single cell stays None: only ISBLANK reads one in the template
            env[key] = val
            out.append(key)
        elif kind == "bool":
            out.append("True" if tok == "TRUE" else "False")
        elif kind == "num":
            out.append(tok)
        elif kind == "op":
            out.append({"^": "**", "=": "==", "<>": "!=", "&": "+"}.get(tok, tok))
        # whitespace dropped
    return "".join(out), env


def builtin_expected(book: Book, f: Formula) -> Any:
    """A built-in formula recomputed with pandas / numpy / scipy from its inputs' cached
    values (a scalar, or an array the shape of the formula's range)."""
    expr, env = _to_python(book, f, f.text)
    return eval(expr, {"__builtins__": {}}, env)  # noqa: S307 - our own formula texts


def close(a: Any, b: Any, rel: float = 1e-12, abs_tol: float = 0.0) -> bool:
    """Equality of cell values: numbers to a relative tolerance, text and errors exactly;
    NaN matches #N/A / #NUM! (an error or gap)."""
    blank_a, blank_b = a in (None, ""), b in (None, "")
    if blank_a or blank_b:
        other = b if blank_a else a
        return other in (None, "") or (isinstance(other, float) and math.isnan(other))
    if isinstance(a, (bool, np.bool_)) or isinstance(b, (bool, np.bool_)):
        return bool(a) == bool(b)
    fa, fb = _num(a), _num(b)
    if fa is not None and fb is not None:
        if math.isnan(fa) or math.isnan(fb):
            return math.isnan(fa) and math.isnan(fb)
        return abs(fa - fb) <= max(rel * max(abs(fa), abs(fb)), abs_tol)
    return str(a) == str(b)


def _num(v: Any) -> float | None:
    if v is None or isinstance(v, str) and v not in ERRORS:
        return None
    if isinstance(v, str):
        return math.nan
    try:
        return float(v)
    except (TypeError, ValueError):
        return None
