"""``errdist backtest``: the long backtest of several VaR/ES models on a prices file.

Reads the prices file as ``errdist refresh`` does
(:func:`errdist.data.prices_io.read_prices`), takes daily log returns, runs
:func:`errdist.checks.model_backtest.backtest_models` and prints one row per model (``--format
table``) or one JSON object keyed by model name (``--format json``; fields in
``docs/backtesting.md``). Progress goes to standard error, at most every
:data:`PROGRESS_EVERY` seconds; results go to standard output. Bad input raises
``ValueError`` subclasses with a plain message, which the CLI prints without a traceback.
"""

from __future__ import annotations

import argparse
import json
import math
import sys
import time
from pathlib import Path
from typing import Any, TextIO

from errdist.errors import DomainError, InputTypeError, InsufficientDataError

__all__ = ["DEFAULT_MODELS", "add_parser", "format_table", "run_backtest"]

DEFAULT_MODELS = "symmetric,skewed,ewma,gjr"
PROGRESS_EVERY = 2.0
"""Seconds between progress lines on standard error."""


class _Ticker:
    """Prints ``model: done/total`` to a stream, at most every ``PROGRESS_EVERY`` seconds."""

    def __init__(self, stream: TextIO) -> None:
        self.stream = stream
        self.last = 0.0
        self.model = ""

    def __call__(self, model: str, done: int, total: int) -> None:
        now = time.perf_counter()
        if model != self.model:
            self.model = model
            self.last = now
            print(f"{model}: forecasting…", file=self.stream, flush=True)
            return
        if now - self.last >= PROGRESS_EVERY:
            self.last = now
            print(f"{model}: {100 * done / max(total, 1):.0f} %", file=self.stream, flush=True)


def add_parser(sub: Any) -> argparse.ArgumentParser:
    """Add the ``backtest`` sub-command to an ``argparse`` sub-parser collection."""
    p = sub.add_parser(
        "backtest",
        help="backtest one-day VaR/ES models over a long price history",
        description="Rolling one-day VaR/ES forecasts of several models, without look-ahead, "
        "checked against the returns that followed (exceptions, Kupiec, Christoffersen, "
        "traffic light of the last 250 days, Acerbi-Szekely ES test).",
    )
    p.add_argument("--prices", required=True, help="CSV or xlsx with dates and prices")
    p.add_argument("--confidence", default="0.99", help="VaR/ES confidence (default 0.99)")
    p.add_argument(
        "--models",
        default=DEFAULT_MODELS,
        help=f"comma-separated: symmetric, skewed, ewma, gjr, garch (default {DEFAULT_MODELS})",
    )
    p.add_argument("--refit", default="21", help="days between re-estimations (default 21)")
    p.add_argument("--window", default="250", help="days per unconditional fit (default 250)")
    p.add_argument(
        "--fit-window",
        dest="fit_window",
        default="1000",
        help="days per conditional-model estimation (default 1000)",
    )
    p.add_argument("--lambda", dest="lam", default="0.94", help="EWMA decay (default 0.94)")
    p.add_argument(
        "--simulations", default="1000", help="paths for the ES test p-value (default 1000)"
    )
    p.add_argument("--seed", default="20140101", help="seed of the ES test simulations")
    p.add_argument("--format", choices=("table", "json"), default="table")
    p.add_argument("--date-column", dest="date_column", default=None)
    p.add_argument("--price-column", dest="price_column", default=None)
    p.add_argument("--as-of", dest="as_of", default=None, help="last date to use (YYYY-MM-DD)")
    p.set_defaults(func=run_backtest)
    return p


def _number(name: str, text: Any, *, whole: bool = False) -> float:
    try:
        v = float(text)
    except (TypeError, ValueError):
        raise InputTypeError(f"{name} must be a number, got {text!r}") from None
    if not math.isfinite(v):
        raise DomainError(f"{name} must be finite, got {text!r}")
    if whole and not v.is_integer():
        raise DomainError(f"{name} must be a whole number, got {text!r}")
    return v


def _pct(v: float) -> str:
    return f"{100 * v:.2f}%"


def _p(v: float) -> str:
    return "n/a" if not math.isfinite(v) else f"{v:.3f}"


def format_table(results: dict[str, Any]) -> str:
    """The results as a fixed-width text table, one row per model."""
    head = (
        f"{'model':<10} {'n':>6} {'exc.':>5} {'rate':>7} {'Kupiec p':>9} {'indep. p':>9} "
        f"{'cond.cov p':>10} {'ES Z2':>7} {'ES p':>6} {'zone 250d':>12}"
    )
    lines = [head, "-" * len(head)]
    for name, b in results.items():
        lines.append(
            f"{name:<10} {b.n:>6} {b.exceptions:>5} {_pct(b.exception_rate):>7} "
            f"{_p(b.kupiec_pvalue):>9} {_p(b.independence_pvalue):>9} "
            f"{_p(b.conditional_coverage_pvalue):>10} {b.es_statistic:>7.3f} "
            f"{_p(b.es_pvalue):>6} {b.zone + f' ({b.zone_exceptions})':>12}"
        )
    return "\n".join(lines)


def _json_value(v: Any) -> Any:
    if isinstance(v, float) and not math.isfinite(v):
        return None
    return v


def run_backtest(args: argparse.Namespace) -> int:
    """``errdist backtest``: read prices, backtest the models, print the results."""
    from errdist.checks.model_backtest import backtest_models
    from errdist.data.prices_io import read_prices
    from errdist.data.returns import returns_from_prices

    confidence = _number("--confidence", args.confidence)
    if not 0.5 <= confidence < 1.0:
        raise DomainError(
            f"--confidence must be a fraction in [0.5, 1) such as 0.99, got {confidence:g}"
        )
    refit = int(_number("--refit", args.refit, whole=True))
    window = int(_number("--window", args.window, whole=True))
    fit_window = int(_number("--fit-window", args.fit_window, whole=True))
    lam = _number("--lambda", args.lam)
    sims = int(_number("--simulations", args.simulations, whole=True))
    seed = int(_number("--seed", args.seed, whole=True))
    if refit < 1:
        raise DomainError(f"--refit must be at least 1 day, got {refit}")
    if window < 20:
        raise DomainError(f"--window must be at least 20 days, got {window}")
    if fit_window < 250:
        raise DomainError(f"--fit-window must be at least 250 days, got {fit_window}")
    if sims < 1:
        raise DomainError(f"--simulations must be at least 1, got {sims}")
    if not 0.0 < lam < 1.0:
        raise DomainError(f"--lambda must be in (0, 1) such as 0.94, got {lam:g}")
    models = [m.strip().lower() for m in str(args.models).split(",") if m.strip()]
    if "gjr" in models or "garch" in models:
        from errdist.risk.arch_law import require_arch

        require_arch()

    src = Path(args.prices)
    prices = read_prices(
        src,
        date_column=getattr(args, "date_column", None),
        price_column=getattr(args, "price_column", None),
        as_of=getattr(args, "as_of", None),
    )
    returns = returns_from_prices(prices["price"].to_numpy(dtype=float))
    first = max(window, fit_window)
    if returns.size <= first:
        raise InsufficientDataError(
            f"{src}: {len(prices):,} prices give {returns.size:,} returns; the first forecast "
            f"needs {first:,} earlier returns (--window {window}, --fit-window {fit_window}). "
            "Use a longer history or smaller windows."
        )
    dates = prices["date"]
    print(
        f"errdist backtest: {src} — {returns.size:,} daily log returns; one-day forecasts at "
        f"{confidence:g} from {dates.iloc[first + 1]:%Y-%m-%d} to {dates.iloc[-1]:%Y-%m-%d} "
        f"({returns.size - first:,} days)",
        file=sys.stderr,
        flush=True,
    )
    t0 = time.perf_counter()
    results = backtest_models(
        returns,
        models,
        confidence,
        window=window,
        fit_window=fit_window,
        refit=refit,
        lam=lam,
        simulations=sims,
        seed=seed,
        progress=_Ticker(sys.stderr),
    )
    elapsed = time.perf_counter() - t0
    if args.format == "json":
        payload = {
            name: {k: _json_value(v) for k, v in b.as_dict().items()} for name, b in results.items()
        }
        print(json.dumps(payload, indent=2))
    else:
        print(
            f"One-day VaR/ES at {confidence:g}, {returns.size - first:,} forecast days "
            f"({dates.iloc[first + 1]:%Y-%m-%d} to {dates.iloc[-1]:%Y-%m-%d}); window {window}, "
            f"fit window {fit_window}, refit every {refit} days."
        )
        print(format_table(results))
        for name, b in results.items():
            if b.warning:
                print(f"note ({name}): {b.warning}")
        print(
            "A p-value below 0.05 rejects the model at 5 %. ES Z2 < 0 means losses beyond VaR "
            "were worse than the ES forecast. Past coverage does not guarantee future "
            "coverage; see docs/backtesting.md."
        )
    print(f"done in {elapsed:.1f} s", file=sys.stderr, flush=True)
    return 0
