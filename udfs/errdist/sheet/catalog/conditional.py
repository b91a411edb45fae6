"""Catalog entries of conditional volatility models, rolling forecasts and the ES backtest.

Today's figures of a conditional model (ERRDIST_COND_VAR, ERRDIST_COND_ES, ERRDIST_COND_PARAMS),
rolling one-day forecasts aligned with a returns column (ERRDIST_FORECASTS) and the
Acerbi-Szekely ES backtest of such forecasts (ERRDIST_ES_BACKTEST).

A model fit (a GJR-GARCH estimation takes about a second) is kept for the last few distinct
calls, keyed on the returns and the options: a sheet asking for VaR and ES at four
confidences estimates the model once. The figures at each confidence come from the fitted law
(:func:`errdist.risk.conditional.law_risk`, as :func:`~errdist.risk.conditional.fit_gjr` computes
them), so they equal the core's ``value_at_risk`` / ``expected_shortfall`` at that confidence.
"""

from __future__ import annotations

import math
from collections import OrderedDict
from collections.abc import Callable
from typing import Any

import numpy as np

from errdist.errors import InputTypeError, InsufficientDataError
from errdist.sheet.catalog.shared import CONFIDENCE_DOC, MAX_ROWS, whole_number
from errdist.sheet.entry import Entry, data_range, flag, number, text

__all__ = ["ENTRIES", "EXAMPLE_RETURNS"]

MODELS = ("gjr", "ewma", "garch")
FORECAST_MODELS = ("gjr", "ewma", "garch", "skewed", "symmetric")
FORECAST_COLUMNS = ("var", "es", "mean", "std", "shape", "skew")
_CACHE_SIZE = 8


def _example_returns() -> list[list[Any]]:
    """300 invented daily returns (the demo scenario's simulation, seeded), 6 decimals."""
    from errdist.data.demo import simulate_returns

    r, _ = simulate_returns(300, seed=20261202)
    return [[round(float(v), 6)] for v in r]


EXAMPLE_RETURNS = _example_returns()
"""The catalog's example returns: 300 invented days (a conditional fit needs 250)."""

_ES_RETURNS = [[v] for v in (0.0123, -0.0089, 0.0031, -0.0245, 0.0067, 0.0154)] + [
    [v] for v in (-0.0012, 0.0078, -0.0301, 0.0019, 0.0042, -0.0151)
]
# var, es, mean, std, shape, skew of each day (invented forecast laws).
_ES_FORECASTS = [[0.0245, 0.0301, 0.0002, 0.0098, 1.3, -0.05]] * 12

_RETURNS_DOC = (
    "Column of daily returns in time order, oldest first (e.g. Returns!B2:B1261). Blank "
    "cells are skipped; at least 250 numbers."
)
_MODEL_DOC = (
    '"gjr" (default): GJR-GARCH(1,1) with the skewed error law, estimated by the arch package; '
    '"ewma": RiskMetrics EWMA volatility, skewed law fitted to the scaled returns; "garch": '
    "GARCH(1,1)."
)
_DECAY_DOC = "Optional EWMA decay factor in (0, 1), default 0.94 (RiskMetrics, daily); only "
_DECAY_DOC += 'used by "ewma".'

_fits: OrderedDict[tuple[Any, ...], Any] = OrderedDict()


def _remember(key: tuple[Any, ...], make: Callable[[], Any]) -> Any:
    """The value for ``key`` from the last :data:`_CACHE_SIZE` calls, or ``make()``."""
    if key in _fits:
        _fits.move_to_end(key)
        return _fits[key]
    value = make()
    _fits[key] = value
    while len(_fits) > _CACHE_SIZE:
        _fits.popitem(last=False)
    return value


def _column(data: np.ndarray) -> np.ndarray:
    return np.ascontiguousarray(np.asarray(data, dtype=np.float64).ravel())


def _fit(returns_: np.ndarray, model: str, decay: float) -> Any:
    from errdist.risk.conditional import fit_ewma, fit_gjr

    r = _column(returns_)
    key = ("fit", model, float(decay), r.tobytes())
    if model == "ewma":
        return _remember(key, lambda: fit_ewma(r, 0.99, lam=decay))
    return _remember(key, lambda: fit_gjr(r, 0.99, asymmetric=model == "gjr"))


def _risk_today(
    returns_: np.ndarray, confidence: float, model: str, decay: float
) -> tuple[float, float]:
    from errdist.risk.conditional import _confidence, law_risk

    c = _confidence(confidence)
    f = _fit(returns_, model, decay)
    return law_risk(c, f.mean, f.volatility, f.shape, f.skew)


def _cond_var(returns_: np.ndarray, confidence: float, model: str, decay: float) -> float:
    return _risk_today(returns_, confidence, model, decay)[0]


def _cond_es(returns_: np.ndarray, confidence: float, model: str, decay: float) -> float:
    return _risk_today(returns_, confidence, model, decay)[1]


def _cond_params(
    returns_: np.ndarray, model: str, confidence: float, decay: float, header: bool
) -> list[list[Any]]:
    var, es = _risk_today(returns_, confidence, model, decay)
    f = _fit(returns_, model, decay)
    rows: list[list[Any]] = [
        ["model", f.model, None],
        ["n", f.n, None],
        ["blanks skipped", f.n_dropped, None],
        ["confidence", float(confidence), None],
        ["volatility tomorrow", f.volatility, None],
        ["mean tomorrow", f.mean, None],
        ["VaR 1 day", var, None],
        ["ES 1 day", es, None],
        ["log-likelihood", f.loglik, None],
    ]
    for name, value, se in zip(f.param_names, f.params, f.std_errors, strict=True):
        rows.append([name, value, se if math.isfinite(se) else "set by the user"])
    rows.append(["at_bound", bool(f.at_bound), None])
    rows.append(["warning", f.warning or "none", None])
    return rows


def _forecasts(
    returns_: np.ndarray,
    model: str,
    confidence: float,
    window: float,
    fit_window: float,
    refit: float,
    decay: float,
    header: bool,
) -> list[list[Any]]:
    from errdist.risk.forecasts import rolling_forecasts

    w = whole_number(window, "window", 20, MAX_ROWS)
    fw = whole_number(fit_window, "fit_window", 250, MAX_ROWS)
    k = whole_number(refit, "refit", 1, MAX_ROWS)
    r = _column(returns_)
    filled = ~np.isnan(r)
    values = np.ascontiguousarray(r[filled])
    if values.size <= max(w, fw):
        raise InsufficientDataError(
            f"{values.size} returns leave no day to forecast: the first forecast needs "
            f"{max(w, fw)} earlier returns (window {w}, fit_window {fw})"
        )
    key = ("path", model, float(confidence), w, fw, k, float(decay), r.tobytes())

    def run() -> Any:
        return rolling_forecasts(
            values, model, confidence, window=w, fit_window=fw, refit=k, lam=decay
        )

    path = _remember(key, run)
    cols = np.column_stack([path.var, path.es, path.mean, path.std, path.shape, path.skew])
    out = np.full((r.size, len(FORECAST_COLUMNS)), np.nan)
    out[filled] = cols
    return out.tolist()


def _es_backtest(
    returns_: np.ndarray,
    forecasts: np.ndarray,
    confidence: float,
    simulations: float,
    seed: float,
    header: bool,
) -> list[list[Any]]:
    from errdist.checks.es_backtest import Z2_CRITICAL_5, es_backtest

    f = np.asarray(forecasts, dtype=np.float64)
    if f.ndim != 2 or f.shape[1] not in (2, 6):
        raise InputTypeError(
            "forecasts must have 2 columns (VaR, ES) or the 6 columns of ERRDIST_FORECASTS "
            f"(VaR, ES, mean, std, shape, skew); got {f.shape[1] if f.ndim == 2 else 1}"
        )
    sims = whole_number(simulations, "simulations", 1, 100_000)
    s = whole_number(seed, "seed", 0, 2**63 - 1)
    r = _column(returns_)
    # The cell reader trims trailing blank rows: pad the shorter range with blanks.
    size = max(r.size, f.shape[0])
    r = np.concatenate([r, np.full(size - r.size, np.nan)])
    f = np.vstack([f, np.full((size - f.shape[0], f.shape[1]), np.nan)])
    keep = ~np.isnan(r) & ~np.isnan(f).any(axis=1)
    dropped = int(size - keep.sum())
    r, f = r[keep], f[keep]
    if r.size < 2:
        raise InsufficientDataError(
            f"the ES backtest needs at least 2 days with a return and a forecast, got {r.size}"
        )
    law = (f[:, 2], f[:, 3], f[:, 4], f[:, 5]) if f.shape[1] == 6 else None
    res = es_backtest(r, f[:, 0], f[:, 1], confidence, law=law, simulations=sims, seed=s)
    pvalue: Any = res.pvalue
    if pvalue is None:
        pvalue = "none: give the 6 forecast columns (the forecast laws) for a p-value"
    return [
        ["Z2 statistic", res.statistic],
        ["p-value", pvalue],
        ["days", res.n],
        ["exceptions", res.exceptions],
        ["expected exceptions", res.n * (1.0 - res.confidence)],
        ["simulations", res.simulations],
        [f"Z2 below {Z2_CRITICAL_5:.2f}", bool(res.reject_5)],
        ["pairs dropped", dropped],
        ["note", res.warning or "none"],
    ]


def _returns_param() -> Any:
    return data_range("returns", _RETURNS_DOC, example=EXAMPLE_RETURNS)


def _decay_param() -> Any:
    return number("decay", _DECAY_DOC, example=0.94, default=0.94, spill=False)


_COND_NOTES = (
    "The model is estimated on all the returns given; the figures are for the day after the "
    "last return: VaR = -(mean + volatility q), ES = -(mean + volatility e) with q and e the "
    "standardized law's quantile and tail mean. They change with the last days' returns. "
    "See `docs/risk.md`."
)

ENTRIES: tuple[Entry, ...] = (
    Entry(
        name="ERRDIST_COND_VAR",
        core="errdist.risk.conditional:fit_gjr",
        call=_cond_var,
        params=(
            _returns_param(),
            number("confidence", CONFIDENCE_DOC + " At least 0.5.", example=0.99, spill=False),
            text("model", _MODEL_DOC, choices=MODELS, default="gjr"),
            _decay_param(),
        ),
        result="scalar",
        call_in_wizard=False,
        summary="Tomorrow's one-day Value-at-Risk from a conditional volatility model "
        "(GJR-GARCH or EWMA with the skewed error law) fitted to a returns column, as a "
        "positive return.",
        notes=_COND_NOTES,
    ),
    Entry(
        name="ERRDIST_COND_ES",
        core="errdist.risk.conditional:fit_gjr",
        call=_cond_es,
        params=(
            _returns_param(),
            number("confidence", CONFIDENCE_DOC + " At least 0.5.", example=0.975, spill=False),
            text("model", _MODEL_DOC, choices=MODELS, default="gjr"),
            _decay_param(),
        ),
        result="scalar",
        call_in_wizard=False,
        summary="Tomorrow's one-day Expected Shortfall from a conditional volatility model "
        "(GJR-GARCH or EWMA with the skewed error law) fitted to a returns column, as a "
        "positive return.",
        notes=_COND_NOTES,
    ),
    Entry(
        name="ERRDIST_COND_PARAMS",
        core="errdist.risk.conditional:fit_gjr",
        call=_cond_params,
        params=(
            _returns_param(),
            text("model", _MODEL_DOC, choices=MODELS, default="gjr"),
            number(
                "confidence",
                "Optional confidence of the VaR and ES rows, default 0.99.",
                example=0.99,
                default=0.99,
                spill=False,
            ),
            _decay_param(),
            flag("header", "TRUE adds a row of labels (item, value, std_error) above."),
        ),
        result="table",
        header=("item", "value", "std_error"),
        call_in_wizard=False,
        summary="The fitted conditional model as a three-column table: tomorrow's volatility, "
        "mean, VaR and ES, then every parameter with its standard error.",
        notes="Rows: model; n; blanks skipped; confidence; volatility tomorrow; mean tomorrow; "
        "VaR 1 day; ES 1 day; log-likelihood; the parameters (GJR: mu, omega, alpha, gamma, "
        "beta, nu, skew in return units, arch's robust standard errors; EWMA: lambda - set by "
        "the user, no standard error - z_mean, z_std, nu, skew); at_bound; warning.",
    ),
    Entry(
        name="ERRDIST_FORECASTS",
        core="errdist.risk.forecasts:rolling_forecasts",
        call=_forecasts,
        params=(
            _returns_param(),
            text(
                "model",
                '"gjr" GJR-GARCH(1,1), "ewma", "garch" GARCH(1,1) (all with the skewed error '
                'law), "skewed" or "symmetric" (unconditional laws fitted to the window).',
                choices=FORECAST_MODELS,
            ),
            number("confidence", CONFIDENCE_DOC + " At least 0.5.", example=0.99, spill=False),
            number(
                "window",
                'Optional past days of each unconditional fit ("skewed", "symmetric"), a whole '
                "number >= 20 (default 250).",
                example=250,
                default=250,
                spill=False,
            ),
            number(
                "fit_window",
                "Optional past days of each conditional estimation, a whole number >= 250 "
                "(default 1000). All models start forecasting after max(window, fit_window).",
                example=250,
                default=1000,
                spill=False,
            ),
            number(
                "refit",
                "Optional days between estimations, a whole number >= 1 (default 21); "
                "volatility is filtered daily.",
                example=21,
                default=21,
                spill=False,
            ),
            _decay_param(),
            flag(
                "header",
                "TRUE adds a row of column labels above (the rows then start one "
                "row lower than the returns).",
            ),
        ),
        result="table",
        header=FORECAST_COLUMNS,
        call_in_wizard=False,
        summary="Rolling one-day VaR and ES forecasts without look-ahead, one row per return: "
        "var, es and the forecast law (mean, std, shape, skew); blank before the first "
        "forecast.",
        notes="Row t uses the returns before row t only. Feed the var column to "
        "ERRDIST_BACKTEST and all six columns to ERRDIST_ES_BACKTEST with the same returns "
        "column. Blank returns give blank rows. See `docs/backtesting.md`.",
    ),
    Entry(
        name="ERRDIST_ES_BACKTEST",
        core="errdist.checks.es_backtest:es_backtest",
        call=_es_backtest,
        params=(
            data_range(
                "returns",
                "Column of realised returns in time order. Blank cells drop their row.",
                example=_ES_RETURNS,
            ),
            data_range(
                "forecasts",
                "The forecasts of those days, same height: 2 columns (VaR, ES as positive "
                "losses) or the 6 columns of ERRDIST_FORECASTS (needed for the p-value).",
                example=_ES_FORECASTS,
            ),
            number("confidence", CONFIDENCE_DOC + " At least 0.5.", example=0.99, spill=False),
            number(
                "simulations",
                "Optional simulated histories for the p-value, 1 to 100000 (default 1000).",
                example=200,
                default=1000,
                spill=False,
            ),
            number(
                "seed",
                "Optional whole-number seed of the simulations (default 20140101): the same "
                "seed gives the same p-value.",
                example=7,
                default=20140101,
                spill=False,
            ),
            flag("header", "TRUE adds a row of labels (measure, value) above the table."),
        ),
        result="table",
        header=("measure", "value"),
        call_in_wizard=False,
        summary="Expected Shortfall backtest (Acerbi & Szekely 2014, Z2): 0 when the ES "
        "forecasts are right, negative when losses beyond the VaR were larger; simulation "
        "p-value under the forecast laws.",
        notes="Z2 = sum of r_t I_t / (T (1 - c) ES_t) + 1, I_t = 1 on exception days. "
        "p-value = (1 + #{simulated Z2 <= Z2}) / (simulations + 1), histories drawn from each "
        "day's forecast law. Rows: Z2 statistic; p-value; days; exceptions; expected "
        "exceptions; simulations; Z2 below -0.70 (published 5% threshold for 97.5% and 250 "
        "days, from memory); pairs dropped; note. See `docs/backtesting.md`.",
    ),
)
"""This subject's worksheet functions, in catalog order."""
