"""``errdist panel``: read many series, compute each, write the overview and the table.

Steps: check the output paths (nothing is computed when they cannot be written) -> read and
validate the prices (:func:`errdist.panel.inputs.read_panel`) -> compute the usable series
(:func:`compute_panel`: Dask when installed, serial otherwise) with a progress bar -> rank
(:func:`errdist.panel.table.build_table`) -> write the table file and the overview workbook,
each atomically, only after every series is done. Ctrl-C before that writes nothing.
"""

from __future__ import annotations

import argparse
import os
import sys
import time
from pathlib import Path
from typing import Any

import pandas as pd

from errdist.panel.execute import (
    PARALLEL_HINT,
    PanelData,
    auto_block_size,
    dask_available,
    make_blocks,
    run_dask,
    run_serial,
)
from errdist.panel.inputs import PanelInput, read_panel
from errdist.panel.job import JobOptions
from errdist.panel.models import get_models
from errdist.panel.progress import Progress
from errdist.panel.table import build_table, require_table_writer, write_table
from errdist.workbook.atomic import atomic_path, check_target

__all__ = ["add_parser", "compute_panel", "default_options", "run_panel"]

DEFAULT_CONFIDENCES = (0.95, 0.975, 0.99)
"""VaR / ES confidences of the panel (the 97.5% is the FRTB ES level; Basel Committee 2019)."""


def default_options(**changes: Any) -> JobOptions:
    """The panel's settings: the monthly workbook's horizon (Risk sheet), backtest window and
    confidence (Backtest sheet), goodness-of-fit statistic, samples and seed (Fit check sheet),
    from :mod:`errdist.workbook.sheets`, with ``changes`` applied."""
    from errdist.workbook.sheets import backtest, fit_check, risk

    opts = {
        "confidences": DEFAULT_CONFIDENCES,
        "horizon": risk.HORIZON_DAYS,
        "horizon_rule": "sqrt",
        "gof_samples": fit_check.GOF_SAMPLES,
        "gof_statistic": fit_check.GOF_STATISTIC,
        "seed": fit_check.GOF_SEED,
        "rivals": True,
        "models": tuple(m.name for m in get_models(None)),
        "window": backtest.BACKTEST_WINDOW,
        "backtest_confidence": backtest.BACKTEST_CONFIDENCE,
        "zone_days": 250,
    }
    opts.update(changes)
    return JobOptions(**opts)


def compute_panel(
    panel: PanelInput,
    opts: JobOptions,
    *,
    workers: int | None = None,
    scheduler: str | None = None,
    client: Any = None,
    block_size: int | None = None,
    progress: Progress | None = None,
    say: Any = None,
) -> pd.DataFrame:
    """Compute every usable series of ``panel`` and return the ranked table.

    ``workers=0`` runs serially in this process; otherwise Dask runs the blocks (a local
    cluster of ``workers`` processes, the cluster at ``scheduler``, or ``client``). Without
    Dask installed it runs serially and ``say`` (a print function) is told how to get
    parallel workers.
    """
    get_models(list(opts.models))  # unknown model names fail before any work
    usable = panel.usable
    data = PanelData.from_series([s.name for s in usable], [s.returns for s in usable])  # type: ignore[misc]
    n_workers = workers if workers is not None else (os.cpu_count() or 1)
    size = block_size or auto_block_size(len(data), max(1, n_workers))
    blocks = make_blocks(len(data), size)
    on_done = progress.update if progress is not None else None
    parallel = client is not None or scheduler is not None or n_workers > 0
    if parallel and not dask_available():
        if scheduler is not None or client is not None:
            raise ImportError(PARALLEL_HINT.replace("running on one core. ", ""))
        if say is not None:
            say(PARALLEL_HINT)
        parallel = False
    try:
        if not parallel or not len(data):
            rows = run_serial(data, opts, blocks, on_done)
        else:
            rows = run_dask(
                data,
                opts,
                blocks,
                workers=max(1, n_workers),
                scheduler=scheduler,
                client=client,
                on_done=on_done,
            )
    finally:
        if progress is not None:
            progress.close()
    return build_table(panel, rows, opts)


def _models_arg(text: str) -> tuple[str, ...]:
    return tuple(m.name for m in get_models(text))


def add_parser(sub: Any) -> None:
    """Add the ``panel`` sub-command to the ``errdist`` parser."""
    p = sub.add_parser(
        "panel",
        help="fit, VaR/ES, fit check and backtest for many series at once (Dask when installed)",
    )
    p.add_argument("--prices", required=True, help="wide or long prices table: CSV, xlsx, Parquet")
    p.add_argument("--out", required=True, help="overview workbook to write (.xlsx)")
    p.add_argument(
        "--table",
        default=None,
        help="the same table as .csv or .parquet (default: the --out name with .csv)",
    )
    p.add_argument(
        "--workers",
        type=int,
        default=None,
        help="local worker processes (default: one per core; 0 runs in this process)",
    )
    p.add_argument("--scheduler", default=None, help="a running Dask scheduler, tcp://HOST:PORT")
    p.add_argument(
        "--models",
        default=None,
        help="models to backtest, comma-separated (uncond, ewma, gjr), or none (default: uncond; "
        "the conditional ewma and gjr need 1,000 returns before their first forecast)",
    )
    p.add_argument("--as-of", dest="as_of", default=None, help="last date for every series")
    p.add_argument("--layout", choices=("auto", "wide", "long"), default="auto")
    p.add_argument("--date-column", dest="date_column", default=None)
    p.add_argument("--series-column", dest="series_column", default=None)
    p.add_argument("--price-column", dest="price_column", default=None, help="long layout only")
    p.add_argument(
        "--gof-samples",
        dest="gof_samples",
        type=int,
        default=None,
        help="simulated data sets per goodness-of-fit test (default 199; 0 skips the test)",
    )
    p.add_argument(
        "--no-rivals", dest="rivals", action="store_false", help="skip the rival-law comparison"
    )
    p.add_argument("--horizon-rule", dest="horizon_rule", choices=("sqrt", "iid"), default="sqrt")
    p.add_argument(
        "--block-size",
        dest="block_size",
        type=int,
        default=None,
        help="series per task (default: about 8 tasks per worker, at most 50)",
    )
    p.add_argument(
        "--book-per-series",
        dest="book_per_series",
        default=None,
        metavar="DIR",
        help="also build one monthly workbook per series in DIR (as refresh; 10-25 s each)",
    )
    p.add_argument("--force", action="store_true", help="overwrite existing output files")
    p.set_defaults(func=run_panel)


def run_panel(args: argparse.Namespace) -> int:
    """``errdist panel`` (see the module docstring); returns the exit code."""
    t0 = time.perf_counter()
    out = Path(args.out)
    if out.suffix.lower() != ".xlsx":
        raise ValueError(f"--out must name an .xlsx file, got {out}")
    table_path = Path(args.table) if args.table else out.with_suffix(".csv")
    force = bool(args.force)
    src = Path(args.prices)
    for target in (out, table_path):
        if src.exists() and target.exists() and src.resolve() == target.resolve():
            raise ValueError(f"{target} is the prices file itself; choose another name")
        check_target(target, force=force)
    require_table_writer(table_path)
    changes: dict[str, Any] = {"horizon_rule": args.horizon_rule, "rivals": bool(args.rivals)}
    if args.gof_samples is not None:
        if args.gof_samples < 0:
            raise ValueError(f"--gof-samples must be 0 or more, got {args.gof_samples}")
        changes["gof_samples"] = args.gof_samples
    if args.models is not None:
        changes["models"] = _models_arg(args.models)
    opts = default_options(**changes)
    if args.workers is not None and args.workers < 0:
        raise ValueError(f"--workers must be 0 or more, got {args.workers}")

    def say(text: str) -> None:
        print(text, file=sys.stderr, flush=True)

    panel = read_panel(
        src,
        layout=args.layout,
        date_column=args.date_column,
        series_column=args.series_column,
        price_column=args.price_column,
        as_of=args.as_of,
    )
    say(
        f"read {len(panel.series):,} series from {src} ({panel.layout} layout, as of "
        f"{panel.as_of:%Y-%m-%d}): {len(panel.usable):,} usable, {len(panel.failed):,} refused"
    )
    books_dir = getattr(args, "book_per_series", None)
    if books_dir:
        from errdist.panel.books import check_books

        check_books(panel, books_dir, force=force)
    progress = Progress(len(panel.usable))
    table = compute_panel(
        panel,
        opts,
        workers=args.workers,
        scheduler=args.scheduler,
        block_size=args.block_size,
        progress=progress,
        say=say,
    )
    if books_dir:
        from errdist.panel.books import write_books

        books_progress = Progress(len(panel.usable), label="books")
        try:
            books = write_books(panel, books_dir, force=force, on_done=books_progress.update)
        finally:
            books_progress.close()
        table["book"] = [
            books.get(name, "") if st == "ok" else ""
            for name, st in zip(table["series"], table["status"], strict=True)
        ]
    from errdist.panel.overview import write_overview

    # Both files appear together: each is written to a temporary file first and both are
    # moved into place only when both are complete.
    with atomic_path(table_path, force=force) as tmp_table, atomic_path(out, force=force) as tmp:
        write_table(table, tmp_table, kind=table_path.suffix, atomic=False)
        write_overview(table, tmp, opts, source=str(src), as_of=panel.as_of, atomic=False)
    n_failed = int((table["status"] != "ok").sum())
    print(
        f"{len(table):,} series: {len(table) - n_failed:,} computed, {n_failed:,} failed "
        f"(reasons in the table)"
    )
    if len(table) and table["rank"].notna().any():
        top = table.iloc[0]
        from errdist.panel.table import rank_column

        key = rank_column(opts)
        print(f"largest {key}: {top['series']} ({float(top[key]):.3%})")
    print(f"wrote {out.resolve()} and {table_path.resolve()} in {time.perf_counter() - t0:.1f} s")
    return 0
