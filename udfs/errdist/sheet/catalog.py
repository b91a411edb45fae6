"""THE catalog of errdist's worksheet functions.

One :class:`~errdist.sheet.entry.Entry` per worksheet function: its name, the core callable,
its parameters (name, kind ``number | range | text | flag``, default, description of at most
255 characters, a valid example), the shape of its result, a summary of at most 255
characters and the category "Error distribution". Everything else is derived from this table,
never typed twice:

- ``errdist.sheet.xlwings_udfs`` - the xlwings functions with real signatures and
  ``@xw.func`` / ``@xw.arg`` / ``@xw.ret`` decorations (built by :mod:`errdist.sheet.udfs`);
- ``errdist vba`` - the VBA module text for manual import (:mod:`errdist.sheet.vba`);
- ``docs/functions.md`` - the function reference (``python -m errdist.sheet.docs``);
- :func:`evaluate` - the registry the headless workbook engine calls;
- the harness, bad-input and fuzz tests, which are parametrised over :data:`CATALOG`.

Adding a worksheet function
---------------------------
Write the core function first (in the module that holds its subject). Then add ONE block at
the end of this file (or of the risk section)::

    add(
        Entry(
            name="ERRDIST_MYFUNC",
            core="errdist.mymodule:my_function",     # or the callable itself
            params=(
                number("x", "Where to evaluate ...", example=0.5),
                number("scale", "Scale a > 0 ...", example=1.0),
                flag("upper", "TRUE gives ...", default=False),
            ),
            result="spill",           # "scalar" | "spill" | "table" | "column"
            summary="One sentence for the function wizard.",
            # call=_adapter,          # only when the core is not called as core(*args)
            # header=("a", "b"),      # tables: labels shown when the `header` flag is TRUE
            # vectorized=False,       # when the core takes scalars only
        )
    )

Rules the tests enforce for every entry: the name starts with ``ERRDIST_``; descriptions and
summary are at most 255 characters; every parameter has a valid ``example`` (the harness calls
the function with the examples, and the bad-input matrix replaces one example at a time);
optional parameters come last; number parameters of a non-``spill`` entry are ``spill=False``.
Then run ``python -m errdist.sheet.docs`` to regenerate ``docs/functions.md``. Nothing else
needs editing: xlwings functions, VBA wrappers, the engine registry and the tests pick the
entry up by themselves.

The helpers below the table (``_cdf``, ``_fit_row``...) adapt converted cell arguments to the
core's signatures; they hold no statistics.
"""

from __future__ import annotations

import math
import sys
from typing import Any

import numpy as np

from errdist import estimate, law
from errdist.data import returns
from errdist.errors import ErrdistError
from errdist.sheet.cells import SheetError, sheet_error
from errdist.sheet.entry import (
    CATEGORY,
    MISSING,
    REQUIRED,
    Entry,
    Param,
    data_range,
    flag,
    number,
    text,
)

__all__ = [
    "CATALOG",
    "CATEGORY",
    "MISSING",
    "REQUIRED",
    "Entry",
    "Param",
    "SheetError",
    "add",
    "data_range",
    "evaluate",
    "flag",
    "get",
    "names",
    "number",
    "text",
]

#: Name -> entry, in the order of the function reference.
CATALOG: dict[str, Entry] = {}


def add(entry: Entry) -> Entry:
    """Add ``entry`` to :data:`CATALOG` (names are unique)."""
    if entry.name in CATALOG:
        raise ValueError(f"{entry.name} is already in the catalog")
    CATALOG[entry.name] = entry
    return entry


def get(name: str) -> Entry:
    """The entry of worksheet function ``name`` (case-insensitive)."""
    try:
        return CATALOG[name.upper()]
    except KeyError:
        raise SheetError("#VALUE!", f"unknown function {name}") from None


def names() -> list[str]:
    """The worksheet function names, in catalog order."""
    return list(CATALOG)


def evaluate(name: str, *cell_args: Any) -> Any:
    """Evaluate worksheet function ``name`` on cell values, as the headless engine does.

    Parameters
    ----------
    name : str
        ``"ERRDIST_PDF"`` etc. (case-insensitive).
    *cell_args
        Cell values as the engine hands them over: scalars (float, int, str, bool, None for a
        blank), 2-D lists or numpy arrays for ranges, error values as ``'#N/A'``-style texts;
        :data:`MISSING` (or fewer arguments) for omitted optional arguments.

    Returns
    -------
    scalar or list of rows
        NaN results are ``None`` (a blank cell). A spill in which single cells are out of
        their domain holds :class:`SheetError` objects in those cells.

    Raises
    ------
    SheetError
        The call as a whole fails; ``code`` is ``"#NUM!"``, ``"#VALUE!"`` or ``"#N/A"``.
    """
    return get(name).evaluate(cell_args)


# =====================================================================================
# Shared parameter descriptions
# =====================================================================================

_LOC = "Location m: the centre (mean and median) of the law, in the units of the data."
_SCALE = "Scale a > 0, in the units of the data. For shape 2 the standard deviation is a/sqrt(2)."
_SHAPE = "Shape b > 0: 2 is the normal law, 1 the Laplace law; below 2 the tails are heavier."
_DATA = "Range of numbers (e.g. returns). Blank cells are skipped; text or error cells are refused."


def _loc(example: float = 0.0, *, spill: bool = True) -> Param:
    return number("loc", _LOC, example=example, spill=spill)


def _scale(example: float = 1.0, *, spill: bool = True) -> Param:
    return number("scale", _SCALE, example=example, spill=spill)


def _shape(example: float = 1.5, *, spill: bool = True) -> Param:
    return number("shape", _SHAPE, example=example, spill=spill)


def _law(
    loc: float = 0.0, scale: float = 1.0, shape: float = 1.5, *, spill: bool = True
) -> tuple[Param, Param, Param]:
    """The law's parameters ``loc, scale, shape`` with these examples."""
    return _loc(loc, spill=spill), _scale(scale, spill=spill), _shape(shape, spill=spill)


_EXAMPLE_DATA = [
    [0.0123],
    [-0.0089],
    [0.0031],
    [None],
    [-0.0245],
    [0.0067],
    [0.0154],
    [-0.0012],
    [0.0078],
    [-0.0301],
    [0.0019],
    [0.0042],
]
_EXAMPLE_PRICES = [[100.0], [101.2], [None], [99.7], [100.4], [102.9]]


# =====================================================================================
# Adapters: converted cell arguments -> core calls
# =====================================================================================


_cdf_core = law.cdf
_sf_core = law.sf


def _cdf(x: Any, loc: Any, scale: Any, shape: Any, upper: bool) -> Any:
    return (_sf_core if upper else _cdf_core)(x, loc, scale, shape)


def _whole(value: float, name: str, low: int, high: int) -> int:
    if not math.isfinite(value) or value != math.floor(value):
        raise SheetError("#NUM!", f"{name} must be a whole number, got {value:g}")
    if not low <= value <= high:
        raise SheetError("#NUM!", f"{name} must be between {low} and {high}, got {value:g}")
    return int(value)


_MAX_ROWS = 1_048_576  # rows of a worksheet


def _rand(count: float, loc: float, scale: float, shape: float, seed: Any) -> np.ndarray:
    n = _whole(count, "count", 1, _MAX_ROWS)
    s = None if seed is None else _whole(seed, "seed", 0, 2**63 - 1)
    return np.asarray(law.rvs(n, loc, scale, shape, seed=s), dtype=np.float64).reshape(-1, 1)


def _fit_row(data: np.ndarray, method: str, header: bool) -> list[list[Any]]:
    f = estimate.fit(data, method=method)
    return [[f.loc, f.scale, f.shape]]


def _fit_report(data: np.ndarray) -> list[list[Any]]:
    values, _ = estimate.clean_sample(data)
    blanks = _interior_blanks(data)
    mle = estimate.fit(values, method="mle")
    rows: list[list[Any]] = [
        ["n used", values.size],
        ["blanks skipped", blanks],
        ["mean", estimate.sample_mean(values)],
        ["median", estimate.sample_median(values)],
        ["STDEV.S", estimate.sample_std(values)],
        ["SKEW", estimate.sample_skewness(values)],
        ["KURT", estimate.sample_excess_kurtosis(values)],
        ["MLE loc", mle.loc],
        ["MLE scale", mle.scale],
        ["MLE shape", mle.shape],
        ["MLE log-likelihood", mle.loglik],
        ["MLE AIC", mle.aic],
    ]
    labels = ["loc", "scale", "shape", "log-likelihood", "AIC"]
    try:
        mom = estimate.fit(values, method="moments")
    except ErrdistError as exc:
        note = sheet_error(exc).text
        rows += [[f"moments {label}", note] for label in labels]
    else:
        rows += [
            [f"moments {label}", v]
            for label, v in zip(
                labels, (mom.loc, mom.scale, mom.shape, mom.loglik, mom.aic), strict=True
            )
        ]
    rows.append(["MLE shape at search bound", bool(mle.at_bound)])
    rows.append(["MLE note", mle.warning or "none"])
    return rows


def _interior_blanks(data: np.ndarray) -> int:
    """Blank cells between the first and the last number (row-major)."""
    flat = np.isnan(np.asarray(data, dtype=np.float64).ravel())
    filled = np.flatnonzero(~flat)
    if filled.size == 0:
        return 0
    return int(flat[filled[0] : filled[-1] + 1].sum())


def _loglik(data: np.ndarray, loc: float, scale: float, shape: float) -> float:
    return estimate.loglik(data, loc, scale, shape)


def _returns(prices: np.ndarray, kind: str) -> np.ndarray:
    rows, cols = prices.shape
    if rows > 1 and cols > 1:
        raise SheetError("#VALUE!", f"prices must be a single row or column, got {rows}x{cols}")
    r = returns.returns_from_prices(prices.ravel(), kind=kind)  # type: ignore[arg-type]
    return r.reshape(-1, 1) if cols == 1 else r.reshape(1, -1)


def _version() -> str:
    import numpy
    import scipy

    import errdist

    try:
        from importlib.metadata import version

        xlwings_version = version("xlwings")
    except Exception:  # not installed: the headless engine still works
        xlwings_version = "not installed"
    py = ".".join(map(str, sys.version_info[:3]))
    return (
        f"errdist {errdist.__version__}; numpy {numpy.__version__}; scipy {scipy.__version__}; "
        f"xlwings {xlwings_version}; Python {py}"
    )


# =====================================================================================
# The law
# =====================================================================================

add(
    Entry(
        name="ERRDIST_PDF",
        core="errdist.law.symmetric:pdf",
        params=(
            number("x", "Value(s) at which to evaluate the density.", example=0.5),
            *_law(),
        ),
        result="spill",
        summary="Density f(x) of the error (generalized normal) distribution. Any argument "
        "may be a range: the result spills in the broadcast shape.",
    )
)

add(
    Entry(
        name="ERRDIST_CDF",
        core="errdist.law.symmetric:cdf",
        call=_cdf,
        params=(
            number("x", "Value(s) at which to evaluate the probability.", example=0.5),
            *_law(),
            flag(
                "upper",
                "FALSE or omitted: P(X <= x). TRUE: the upper tail P(X > x), accurate far "
                "into that tail.",
            ),
        ),
        result="spill",
        summary="Cumulative probability P(X <= x) of the error distribution, or the upper "
        "tail P(X > x) when upper is TRUE.",
        notes="`upper` TRUE uses `errdist.law.symmetric.sf`, so tail probabilities such as "
        "1e-300 keep their digits instead of rounding 1 − F(x) to 0.",
    )
)

add(
    Entry(
        name="ERRDIST_INV",
        core="errdist.law.symmetric:ppf",
        params=(
            number("p", "Probability(ies) strictly between 0 and 1.", example=0.99),
            *_law(),
        ),
        result="spill",
        summary="Quantile (inverse cumulative probability) of the error distribution: the x "
        "with P(X <= x) = p.",
    )
)

add(
    Entry(
        name="ERRDIST_RAND",
        core="errdist.law.symmetric:rvs",
        call=_rand,
        params=(
            number("count", "How many draws: a whole number from 1 up.", example=5, spill=False),
            *_law(spill=False),
            number(
                "seed",
                "Optional whole-number seed: the same seed gives the same draws. Omit it for "
                "fresh draws on every recalculation.",
                example=20261202,
                default=None,
                spill=False,
            ),
        ),
        result="column",
        summary="A column of random draws from the error distribution; reproducible when a "
        "seed is given.",
        notes="Through the xlwings add-in the function is not volatile (xlwings declares "
        "volatility per function, not per call): without a seed it draws again when its "
        "arguments change or on a full recalculation (Ctrl+Alt+F9). The VBA module written by "
        "`errdist vba` marks a call volatile only when the seed is omitted.",
    )
)

add(
    Entry(
        name="ERRDIST_VARIANCE",
        core="errdist.law.moments:variance",
        params=(_scale(), _shape()),
        result="spill",
        summary="Variance a^2 Gamma(3/b) / Gamma(1/b) of the error distribution with scale a "
        "and shape b (not Value-at-Risk: that is ERRDIST_VAR).",
    )
)

add(
    Entry(
        name="ERRDIST_KURT",
        core="errdist.law.moments:excess_kurtosis",
        params=(_shape(),),
        result="spill",
        summary="Excess kurtosis Gamma(5/b) Gamma(1/b) / Gamma(3/b)^2 - 3 of the error "
        "distribution with shape b (0 for the normal law, 3 for Laplace).",
    )
)

add(
    Entry(
        name="ERRDIST_SOLVE_SHAPE",
        core="errdist.estimate:solve_shape",
        params=(
            number(
                "excess_kurtosis",
                "Excess kurtosis (as KURT gives it); must be above -1.2.",
                example=1.2,
            ),
        ),
        result="spill",
        vectorized=False,
        summary="The shape b whose excess kurtosis equals the given value (method of "
        "moments). Any value above -1.2 has one.",
    )
)

add(
    Entry(
        name="ERRDIST_SOLVE_SCALE",
        core="errdist.estimate:solve_scale",
        params=(
            number("sd", "Standard deviation (> 0), e.g. from STDEV.S.", example=0.012),
            _shape(),
        ),
        result="spill",
        vectorized=False,
        summary="The scale a giving standard deviation sd for shape b: "
        "a = sd sqrt(Gamma(1/b) / Gamma(3/b)).",
    )
)

add(
    Entry(
        name="ERRDIST_FIT",
        core="errdist.estimate:fit",
        call=_fit_row,
        params=(
            data_range("data", _DATA, example=_EXAMPLE_DATA),
            text(
                "method",
                'Estimator: "mle" (maximum likelihood, default) or "moments" (loc = MEDIAN, '
                "scale and shape from STDEV.S and KURT).",
                choices=("mle", "moments"),
                default="mle",
            ),
            flag("header", "TRUE adds a row of labels above the numbers."),
        ),
        result="table",
        header=("loc", "scale", "shape"),
        call_in_wizard=False,
        summary="Fits the error distribution to a data range; spills loc, scale and shape in "
        "a row.",
    )
)

add(
    Entry(
        name="ERRDIST_FIT_REPORT",
        core="errdist.estimate:fit",
        call=_fit_report,
        params=(data_range("data", _DATA, example=_EXAMPLE_DATA),),
        result="table",
        call_in_wizard=False,
        summary="A two-column labelled table: sample statistics, both fits (MLE and moments) "
        "with log-likelihood and AIC, and whether the MLE shape hit its search bound.",
        notes="Rows: n used; blanks skipped (blank cells between the first and last number); "
        "mean; median; STDEV.S; SKEW; KURT; MLE loc, scale, shape, log-likelihood, AIC; the "
        "same five for the moments fit; MLE shape at search bound (TRUE/FALSE); MLE note. "
        "When the moments fit is impossible (KURT <= -1.2) its five rows show the reason "
        "instead of numbers and the rest of the table stands.",
    )
)

add(
    Entry(
        name="ERRDIST_LOGLIK",
        core="errdist.estimate:loglik",
        call=_loglik,
        params=(data_range("data", _DATA, example=_EXAMPLE_DATA), *_law(scale=0.01)),
        result="spill",
        vectorized=False,
        summary="Log-likelihood sum of ln f(x) of a data range under the error distribution; "
        "ranges of loc, scale or shape spill a profile.",
    )
)

add(
    Entry(
        name="ERRDIST_RETURNS",
        core="errdist.data.returns:returns_from_prices",
        call=_returns,
        params=(
            data_range(
                "prices",
                "A column (or row) of prices > 0 in time order. A blank price leaves both "
                "returns that touch it blank.",
                example=_EXAMPLE_PRICES,
            ),
            text(
                "kind",
                '"log" (default): ln(p_t / p_t-1); "simple": p_t / p_t-1 - 1.',
                choices=("log", "simple"),
                default="log",
            ),
        ),
        result="column",
        summary="Returns from a column of prices, one row shorter and aligned with it; log "
        'returns unless kind is "simple".',
    )
)

add(
    Entry(
        name="ERRDIST_VERSION",
        core=_version,
        params=(),
        result="scalar",
        summary="The versions of errdist, numpy, scipy, xlwings and Python in use, as one "
        "text (for audit trails).",
    )
)


# =====================================================================================
# Risk (entries added by the risk helpers, one block each, below this line)
# =====================================================================================


# =====================================================================================
# Risk measures and backtesting (one self-contained block; owner: risk)
# =====================================================================================

_CONFIDENCE = "Confidence as a fraction strictly between 0 and 1, e.g. 0.99 for 99%."
_VAR_RETURNS = [[v] for v in (0.0123, -0.0089, 0.0031, None, -0.0245, 0.0067, 0.0154)] + [
    [v] for v in (-0.0012, 0.0078, -0.0301, 0.0019, 0.0042)
]
_VAR_FORECASTS = [[0.021]] * 9 + [[None], [0.022], [0.022]]


def _risk_params(*, loc_example: float = 0.0005) -> tuple[Param, ...]:
    return (
        number("confidence", _CONFIDENCE, example=0.99),
        *_law(loc_example, 0.01, 1.3),
        number(
            "horizon_days",
            'Optional horizon in days, >= 1 (default 1); a whole number with horizon_rule "iid".',
            example=10,
            default=1.0,
            spill=False,
        ),
        number(
            "amount",
            "Optional position value > 0: the result is then money (amount x return loss). "
            "Omitted: a return, e.g. 0.025 for a 2.5% loss.",
            example=1_000_000.0,
            default=None,
        ),
        text(
            "horizon_rule",
            '"sqrt" (default): centred one-day quantile x sqrt(days), location x days. '
            '"iid": exact law of the sum of i.i.d. one-day returns (the fat tail is not simply '
            "scaled).",
            choices=("sqrt", "iid"),
            default="sqrt",
        ),
    )


def _backtest_table(
    returns_: np.ndarray, var_forecasts: np.ndarray, confidence: float, header: bool
) -> list[list[Any]]:
    from errdist.checks.backtest import backtest

    r, v = returns_.ravel(), var_forecasts.ravel()
    # The cell reader trims trailing blank rows, so ranges of equal height can arrive with
    # different lengths: the shorter one is blank beyond its end (pairs dropped and counted).
    if r.size != v.size:
        size = max(r.size, v.size)
        r = np.concatenate([r, np.full(size - r.size, np.nan)])
        v = np.concatenate([v, np.full(size - v.size, np.nan)])
    res = backtest(r, v, confidence)
    rows: list[list[Any]] = []
    for label, value in res.rows():
        if label == "plus factor" and value is None:
            value = "none: the table is for 250 days at 99%"
        rows.append([label, value])
    return rows


def _rolling_cells(returns_: np.ndarray, window: float, confidence: float, method: str) -> Any:
    from errdist.checks.rolling import rolling_var

    return rolling_var(returns_, _whole(window, "window", 4, _MAX_ROWS), confidence, method)


add(
    Entry(
        name="ERRDIST_VAR",
        core="errdist.risk:value_at_risk",
        params=_risk_params(),
        result="spill",
        summary="Value-at-Risk: the loss not exceeded with the given confidence, as a positive "
        "return (or money with amount), from the error distribution of one-day returns.",
        notes="VaR = -q where q is the (1 - confidence) quantile of the horizon return. "
        'Horizon rules: "sqrt" scales the centred quantile by sqrt(days) and the location by '
        'days (a convention, exact only for the normal law); "iid" computes the law of the sum '
        "of independent one-day returns numerically. Both assume independent days. See "
        "`docs/risk.md`.",
    )
)

add(
    Entry(
        name="ERRDIST_ES",
        core="errdist.risk:expected_shortfall",
        params=_risk_params(),
        result="spill",
        summary="Expected Shortfall: the mean loss on the days beyond the VaR at the given "
        "confidence, as a positive return (or money with amount), in closed form.",
        notes="ES = a Gamma(2/b) Q(2/b, z) / (2 Gamma(1/b) (1 - confidence)) - m for one day, "
        "with z = |(q - m)/a|^b (derivation in `docs/risk.md`); horizon rules as for "
        "ERRDIST_VAR.",
    )
)

add(
    Entry(
        name="ERRDIST_BACKTEST",
        core="errdist.checks.backtest:backtest",
        call=_backtest_table,
        params=(
            data_range(
                "returns",
                "Column of realised returns in time order. Blank cells drop their pair.",
                example=_VAR_RETURNS,
            ),
            data_range(
                "var_forecasts",
                "Column of the VaR forecast (positive loss) for each of those days, same "
                "height. Blank cells drop their pair.",
                example=_VAR_FORECASTS,
            ),
            number("confidence", _CONFIDENCE, example=0.99, spill=False),
            flag("header", "TRUE adds a row of labels (measure, value) above the table."),
        ),
        result="table",
        header=("measure", "value"),
        call_in_wizard=False,
        summary="Backtest of VaR forecasts: exceptions (return < -VaR), Kupiec and "
        "Christoffersen likelihood-ratio tests with p-values, Basel traffic-light zone and plus "
        "factor, as a two-column labelled table.",
        notes="Rows: observations; exceptions; expected exceptions; pairs dropped (a blank in "
        "either column); LR POF (Kupiec) and its chi-squared(1) p-value; LR IND "
        "(Christoffersen) and p-value; LR CC = POF + IND and its chi-squared(2) p-value; zone "
        "(green / yellow / red by the cumulative binomial probability, 95% and 99.99%); plus "
        "factor (BCBS 1996 table for 250 days at 99%, quoted from memory; otherwise a note). "
        "See `docs/backtesting.md`.",
    )
)

add(
    Entry(
        name="ERRDIST_ROLLING_VAR",
        core="errdist.checks.rolling:rolling_var",
        call=_rolling_cells,
        params=(
            data_range(
                "returns",
                "Column of returns in time order. Blank cells are skipped inside each window.",
                example=_VAR_RETURNS,
            ),
            number(
                "window",
                "Number of past returns per fit: a whole number >= 4, smaller than the column.",
                example=8,
                spill=False,
            ),
            number("confidence", _CONFIDENCE, example=0.95, spill=False),
            text(
                "method",
                '"mle" (default, maximum likelihood) or "moments" (MEDIAN, STDEV.S, KURT).',
                choices=("mle", "moments"),
                default="mle",
            ),
        ),
        result="column",
        call_in_wizard=False,
        summary="One-day VaR forecasts aligned with a column of returns: each day's VaR is "
        "fitted on the window of returns before it only; blank for the first window days.",
        notes="Feeds ERRDIST_BACKTEST directly with the same returns column. No look-ahead: "
        "the forecast in row t uses rows t - window to t - 1. A row keeps the orientation of "
        "its input. See `docs/backtesting.md`.",
    )
)


# =====================================================================================
# Model checking: goodness of fit, rival laws, chart points (one self-contained block)
# =====================================================================================


def _gof_table(
    data: np.ndarray,
    loc: float | None,
    scale: float | None,
    shape: float | None,
    statistic: str,
    samples: float,
    seed: float | None,
) -> list[list[Any]]:
    from errdist.checks.goodness import MAX_SAMPLES, goodness_of_fit

    n_samples = _whole(samples, "samples", 1, MAX_SAMPLES)
    s = None if seed is None else _whole(seed, "seed", 0, 2**63 - 1)
    r = goodness_of_fit(data, loc, scale, shape, statistic=statistic, samples=n_samples, seed=s)
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


def _compare_table(data: np.ndarray, header: bool) -> list[list[Any]]:
    from errdist.checks.rivals import compare

    return compare(data).to_numpy(dtype=object).tolist()


def _empirical_table(
    data: np.ndarray, loc: float, scale: float, shape: float, header: bool
) -> list[list[Any]]:
    from errdist.checks.empirical import empirical_points

    return empirical_points(data, loc, scale, shape).to_numpy(dtype=np.float64).tolist()


add(
    Entry(
        name="ERRDIST_GOF",
        core="errdist.checks.goodness:goodness_of_fit",
        call=_gof_table,
        params=(
            data_range("data", _DATA, example=_EXAMPLE_DATA),
            number(
                "loc",
                "Optional location of a law fixed in advance. Give loc, scale and shape "
                "together, or none of them to fit the law by maximum likelihood.",
                example=0.0,
                default=None,
                spill=False,
            ),
            number(
                "scale",
                "Optional scale a > 0 of a law fixed in advance (with loc and shape).",
                example=0.015,
                default=None,
                spill=False,
            ),
            number(
                "shape",
                "Optional shape b > 0 of a law fixed in advance (with loc and scale).",
                example=1.5,
                default=None,
                spill=False,
            ),
            text(
                "statistic",
                '"ad" Anderson-Darling (default, weighs the tails), "ks" Kolmogorov-Smirnov '
                'or "cvm" Cramer-von Mises.',
                choices=("ad", "ks", "cvm"),
                default="ad",
            ),
            number(
                "samples",
                "Simulated data sets for the p-value, a whole number 1 to 100000 (default 999).",
                example=99,
                default=999,
                spill=False,
            ),
            number(
                "seed",
                "Optional whole-number seed: the same seed gives the same p-value. Omit it for "
                "a fresh simulation on every recalculation.",
                example=20261202,
                default=None,
                spill=False,
            ),
        ),
        result="table",
        call_in_wizard=False,
        summary="Goodness of fit of the error distribution: EDF statistic and bootstrap "
        "p-value, refitting each simulated sample when the law was fitted. Two-column "
        "labelled table.",
        notes="Rows: statistic (its name); value; p-value = (1 + #{simulated >= value}) / "
        "(samples + 1); samples; refit (TRUE when loc, scale, shape were fitted by maximum "
        "likelihood and every simulated data set refitted, FALSE for a law given in full); "
        "loc, scale, shape (the law tested); n (numbers used). Giving only some of loc, "
        "scale and shape is refused (`#VALUE!`). See `docs/model-checking.md`.",
    )
)

add(
    Entry(
        name="ERRDIST_COMPARE",
        core="errdist.checks.rivals:compare",
        call=_compare_table,
        params=(
            data_range("data", _DATA, example=_EXAMPLE_DATA),
            flag("header", "TRUE adds a row of column labels above the table."),
        ),
        result="table",
        header=(
            "law",
            "loc",
            "scale",
            "shape_or_df",
            "loglik",
            "aic",
            "bic",
            "ks",
            "var99",
            "at_bound",
        ),
        call_in_wizard=False,
        summary="Fits the error, normal, Laplace, Student t and Cauchy laws by maximum "
        "likelihood; one row each with log-likelihood, AIC, BIC, KS distance and 99% VaR, "
        "best AIC first.",
        notes="Columns: law; loc; scale; shape_or_df (error-law shape, Student t degrees of "
        "freedom, blank otherwise); loglik; aic = 2k - 2 ln L; bic = k ln n - 2 ln L (k = 3 "
        "for the error law and t, 2 otherwise); ks = largest gap between the data's "
        "empirical distribution and the fitted law; var99 = one-day 99% VaR as a positive "
        "loss; at_bound = TRUE when the shape or degrees of freedom stopped at its search "
        "bound. See `docs/model-checking.md`.",
    )
)

add(
    Entry(
        name="ERRDIST_EMPIRICAL",
        core="errdist.checks.empirical:empirical_points",
        call=_empirical_table,
        params=(
            data_range("data", _DATA, example=_EXAMPLE_DATA),
            *_law(0.0, 0.015, 1.5, spill=False),
            flag("header", "TRUE adds a row of column labels above the table."),
        ),
        result="table",
        header=("return", "probability", "fitted_cdf", "fitted_quantile"),
        summary="Chart points: sorted data, plotting position (i-0.5)/n, fitted CDF at each "
        "point and fitted quantile at each position - for an ECDF-vs-fit chart and a QQ "
        "chart.",
        notes="One row per number, ascending. ECDF chart: return vs probability (points) and "
        "return vs fitted_cdf (line). QQ chart: fitted_quantile (x) vs return (y) with the "
        "45-degree line. Hazen plotting position; see `docs/model-checking.md`.",
    )
)
