"""The work on one series, and on a block of series (one Dask task).

For each series, with errdist's own single-series functions:

- both fits (:func:`errdist.fit`, ``"mle"`` and ``"moments"``);
- VaR and Expected Shortfall of the maximum-likelihood law at each confidence, for one day and
  for ``horizon`` days under ``horizon_rule`` (:func:`errdist.value_at_risk`,
  :func:`errdist.expected_shortfall`);
- the goodness-of-fit p-value (:func:`errdist.goodness_of_fit`, parametric bootstrap with
  ``gof_samples`` simulated data sets; 0 skips it — it is the heavy part);
- the best law by AIC among the error law and its rivals (:func:`errdist.compare`);
- for each model of :mod:`errdist.panel.models`, the rolling backtest of its one-day VaR:
  exceptions, Kupiec and Christoffersen p-values (all forecasts), exceptions and the
  traffic-light zone over the last ``zone_days`` forecasts (:func:`errdist.backtest`), as the
  monthly workbook's Backtest sheet shows them.

Random draws (the bootstrap) are seeded per series from ``seed`` and the series *name*
(:func:`series_seed`), never per worker or per block: the result of a series does not depend
on how the panel was split or where it ran.

A step that fails on a series leaves its columns blank and says why in ``notes``; when the
maximum-likelihood fit itself fails the series is ``failed`` with the reason.
"""

from __future__ import annotations

import math
import zlib
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

import errdist
from errdist.panel.models import Model, get_models

__all__ = ["JobOptions", "columns", "conf_tag", "run_block", "series_row", "series_seed"]


@dataclass(frozen=True)
class JobOptions:
    """What to compute for each series (defaults: :func:`errdist.panel.command.default_options`).

    Attributes
    ----------
    confidences : tuple of float
        VaR/ES confidences (fractions).
    horizon : int
        The longer horizon in days.
    horizon_rule : str
        ``"sqrt"`` or ``"iid"`` (see :func:`errdist.value_at_risk`).
    gof_samples : int
        Simulated data sets of the goodness-of-fit bootstrap; 0 skips the test.
    gof_statistic : str
        ``"ad"``, ``"ks"`` or ``"cvm"``.
    seed : int
        Base seed; each series' seed is :func:`series_seed` (seed, name).
    rivals : bool
        Fit the rival laws and report the best by AIC.
    models : tuple of str
        Names of the models to backtest (:data:`errdist.panel.models.MODELS`).
    window : int
        Rolling window of the backtests (returns).
    backtest_confidence : float
        Confidence of the backtested VaR.
    zone_days : int
        The traffic-light zone is read over this many last forecasts.
    """

    confidences: tuple[float, ...]
    horizon: int
    horizon_rule: str
    gof_samples: int
    gof_statistic: str
    seed: int
    rivals: bool
    models: tuple[str, ...]
    window: int
    backtest_confidence: float
    zone_days: int

    def model_objects(self) -> tuple[Model, ...]:
        return get_models(list(self.models))


def conf_tag(c: float) -> str:
    """Column tag of a confidence: 0.95 -> ``"95"``, 0.975 -> ``"97.5"``."""
    return f"{100 * c:.10g}"


SEED_BITS = 48
"""Bits of a series' seed: below 2**48 (15 digits), so a spreadsheet cell holds it exactly."""


def series_seed(seed: int, name: str) -> int:
    """The bootstrap seed of series ``name``: a function of the base seed and the name only.

    ``SeedSequence([seed, crc32(name)])`` -> one integer below ``2**48``; passing it to
    :func:`errdist.goodness_of_fit` (or ERRDIST_GOF in a worksheet, whose cells hold 15
    digits exactly) reproduces the series' p-value.
    """
    crc = zlib.crc32(name.encode("utf-8"))
    state = np.random.SeedSequence([int(seed), crc]).generate_state(2, dtype=np.uint32)
    return ((int(state[0]) << 16) ^ int(state[1])) & ((1 << SEED_BITS) - 1)


def columns(opts: JobOptions) -> list[str]:
    """The output columns, in order (the rows of :func:`series_row` hold all of them)."""
    cols = [
        "series",
        "status",
        "first_date",
        "last_date",
        "n",
        "mle_loc",
        "mle_scale",
        "mle_shape",
        "mle_loglik",
        "mle_aic",
        "at_bound",
        "moments_loc",
        "moments_scale",
        "moments_shape",
    ]
    for h in (1, opts.horizon):
        for c in opts.confidences:
            cols += [f"var_{conf_tag(c)}_{h}d", f"es_{conf_tag(c)}_{h}d"]
    if opts.gof_samples > 0:
        cols += ["gof_statistic", "gof_pvalue", "gof_samples", "gof_seed"]
    if opts.rivals:
        cols += ["best_law", "aic_gap"]
    for m in opts.models:
        cols += [
            f"{m}_forecasts",
            f"{m}_exceptions",
            f"{m}_expected",
            f"{m}_pof_pvalue",
            f"{m}_ind_pvalue",
            f"{m}_cc_pvalue",
            f"{m}_exceptions_last",
            f"{m}_zone",
        ]
    return [*cols, "notes", "reason"]


def _blank_row(name: str, opts: JobOptions) -> dict[str, Any]:
    row: dict[str, Any] = dict.fromkeys(columns(opts), math.nan)
    row.update(series=name, status="ok", reason="", notes="", at_bound=None)
    for key in ("first_date", "last_date", "best_law"):
        if key in row:
            row[key] = None
    for m in opts.models:
        row[f"{m}_zone"] = None
    return row


def series_row(name: str, returns: np.ndarray, opts: JobOptions) -> dict[str, Any]:
    """Everything the panel reports for one series (see the module docstring).

    Parameters
    ----------
    name : str
        Series name (seeds the bootstrap).
    returns : numpy.ndarray
        Daily returns, oldest first.
    opts : JobOptions

    Returns
    -------
    dict
        One value per :func:`columns` name; ``status`` is ``"ok"`` or ``"failed"``.
    """
    row = _blank_row(name, opts)
    notes: list[str] = []
    x = np.asarray(returns, dtype=np.float64)
    row["n"] = int(np.count_nonzero(~np.isnan(x)))
    try:
        mle = errdist.fit(x, "mle")
    except ValueError as exc:
        row.update(status="failed", reason=f"maximum-likelihood fit: {exc}")
        return row
    row.update(
        mle_loc=mle.loc,
        mle_scale=mle.scale,
        mle_shape=mle.shape,
        mle_loglik=mle.loglik,
        mle_aic=mle.aic,
        at_bound=bool(mle.at_bound),
    )
    if mle.warning:
        notes.append(mle.warning)
    try:
        mom = errdist.fit(x, "moments")
        row.update(moments_loc=mom.loc, moments_scale=mom.scale, moments_shape=mom.shape)
    except ValueError as exc:
        notes.append(f"moments fit: {exc}")
    conf = list(opts.confidences)
    try:
        for h in (1, opts.horizon):
            rule = "sqrt" if h == 1 else opts.horizon_rule
            law = (mle.loc, mle.scale, mle.shape)
            var = np.atleast_1d(errdist.value_at_risk(conf, *law, h, horizon_rule=rule))
            es = np.atleast_1d(errdist.expected_shortfall(conf, *law, h, horizon_rule=rule))
            for c, v, e in zip(conf, var, es, strict=True):
                row[f"var_{conf_tag(c)}_{h}d"] = float(v)
                row[f"es_{conf_tag(c)}_{h}d"] = float(e)
    except ValueError as exc:
        notes.append(f"VaR/ES: {exc}")
    if opts.gof_samples > 0:
        seed = series_seed(opts.seed, name)
        try:
            g = errdist.goodness_of_fit(
                x, statistic=opts.gof_statistic, samples=opts.gof_samples, seed=seed
            )
            row.update(
                gof_statistic=g.statistic,
                gof_pvalue=g.pvalue,
                gof_samples=opts.gof_samples,
                gof_seed=seed,
            )
        except ValueError as exc:
            notes.append(f"goodness of fit: {exc}")
    if opts.rivals:
        try:
            table = errdist.compare(x)
            best = table.iloc[0]
            gn = table[table["law"] == "generalized normal"].iloc[0]
            row.update(best_law=str(best["law"]), aic_gap=float(gn["aic"] - best["aic"]))
        except ValueError as exc:
            notes.append(f"rival laws: {exc}")
    for model in opts.model_objects():
        _backtest_into(row, notes, model, x, opts)
    row["notes"] = "; ".join(notes)
    return row


def _backtest_into(
    row: dict[str, Any], notes: list[str], model: Model, x: np.ndarray, opts: JobOptions
) -> None:
    m, w, c = model.name, opts.window, opts.backtest_confidence
    if x.size <= w:
        notes.append(f"{m} backtest: needs more than the {w}-return window, got {x.size} returns")
        return
    try:
        var = model.forecast(x, w, c)
        r, v = x[w:], var[w:]
        full = errdist.backtest(r, v, c)
        last = errdist.backtest(r[-opts.zone_days :], v[-opts.zone_days :], c)
    except ValueError as exc:
        notes.append(f"{m} backtest: {exc}")
        return
    row.update(
        {
            f"{m}_forecasts": full.n,
            f"{m}_exceptions": full.exceptions,
            f"{m}_expected": full.expected,
            f"{m}_pof_pvalue": full.pof.pvalue,
            f"{m}_ind_pvalue": full.independence.pvalue,
            f"{m}_cc_pvalue": full.conditional_coverage.pvalue,
            f"{m}_exceptions_last": last.exceptions,
            f"{m}_zone": last.zone,
        }
    )


def run_block(
    data: Any, indices: Sequence[int], opts: JobOptions, offset: int = 0
) -> list[tuple[int, dict[str, Any]]]:
    """The rows of the series ``indices`` of ``data`` (a :class:`~errdist.panel.execute.PanelData`):
    one Dask task. Returns ``(offset + index, row)`` pairs (``offset``: where ``data`` starts
    in the whole panel)."""
    return [(offset + i, series_row(data.name(i), data.returns(i), opts)) for i in indices]
