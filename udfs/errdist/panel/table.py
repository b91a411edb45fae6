"""The panel's result table: one row per series, ranked, and its CSV / Parquet file.

Rows are ranked by the one-day Expected Shortfall at the highest confidence (largest loss
first; ``rank`` 1 is the riskiest series). Series that failed — at input validation or at the
maximum-likelihood fit — follow, in input order, with ``status`` ``failed`` and the
``reason``; nothing is dropped.
"""

from __future__ import annotations

import math
import os
from collections.abc import Mapping
from pathlib import Path
from typing import Any

import pandas as pd

from errdist.errors import InputTypeError
from errdist.panel.inputs import PanelInput
from errdist.panel.job import JobOptions, _blank_row, columns, conf_tag
from errdist.workbook.atomic import atomic_path

__all__ = ["TABLE_SUFFIXES", "build_table", "rank_column", "require_table_writer", "write_table"]

TABLE_SUFFIXES = (".csv", ".parquet")
"""File types of the table file."""

INT_COLUMNS = ("n", "gof_samples", "gof_seed")
"""Whole-number columns (blank where not computed)."""
_INT_SUFFIXES = ("_forecasts", "_exceptions", "_exceptions_last")


def rank_column(opts: JobOptions) -> str:
    """The column the rows are ranked by: one-day ES at the highest confidence."""
    return f"es_{conf_tag(max(opts.confidences))}_1d"


def build_table(
    panel: PanelInput, rows: Mapping[int, dict[str, Any]], opts: JobOptions
) -> pd.DataFrame:
    """Every series of ``panel`` as one row: computed rows for the usable series (``rows``,
    keyed by position among the usable series), failed rows with the reason for the others.
    Ranked (see the module docstring); the first column is ``rank``."""
    out = []
    usable_pos = 0
    for s in panel.series:
        if s.reason:
            row = _blank_row(s.name, opts)
            row.update(status="failed", reason=s.reason)
        else:
            row = dict(rows[usable_pos])
            usable_pos += 1
            row["first_date"] = s.first_date
            row["last_date"] = s.last_date
        row["_index"] = s.index
        out.append(row)
    frame = pd.DataFrame(out, columns=[*columns(opts), "_index"])
    key = rank_column(opts)
    ok = (frame["status"] == "ok") & frame[key].notna()
    ranked = frame[ok].sort_values([key, "_index"], ascending=[False, True], kind="stable")
    rest = frame[~ok].sort_values("_index", kind="stable")
    table = pd.concat([ranked, rest], ignore_index=True).drop(columns="_index")
    for col in table.columns:
        if col in INT_COLUMNS or any(col.endswith(s) for s in _INT_SUFFIXES):
            table[col] = table[col].astype("Int64")
    table["at_bound"] = table["at_bound"].astype("boolean")
    rank = pd.Series([i + 1 for i in range(len(ranked))] + [None] * len(rest), dtype="Int64")
    table.insert(0, "rank", rank)
    return table


def require_table_writer(path: str | os.PathLike[str]) -> None:
    """Refuse an unknown table type, or Parquet without pyarrow, before any work is done."""
    suffix = Path(path).suffix.lower()
    if suffix not in TABLE_SUFFIXES:
        raise InputTypeError(f"--table must name a .csv or .parquet file, got {path}")
    if suffix == ".parquet":
        try:
            import pyarrow  # noqa: F401
        except ImportError:
            raise InputTypeError(
                "writing Parquet needs pyarrow: pip install errdist[parquet], or use a .csv table"
            ) from None


def _csv_ready(table: pd.DataFrame) -> pd.DataFrame:
    out = table.copy()
    for col in ("first_date", "last_date"):
        out[col] = [None if d is None or d is pd.NaT else d.isoformat() for d in out[col]]
    return out


def _parquet_ready(table: pd.DataFrame) -> pd.DataFrame:
    out = table.copy()
    for col in out.columns:
        if out[col].dtype == object and col not in ("first_date", "last_date"):
            vals = [v for v in out[col] if v is not None and not _is_nan(v)]
            if vals and all(isinstance(v, bool) for v in vals):
                out[col] = out[col].astype("boolean")
            elif vals and all(isinstance(v, str) for v in vals) or not vals:
                out[col] = out[col].astype("string")
    return out


def _is_nan(v: Any) -> bool:
    return isinstance(v, float) and math.isnan(v)


def write_table(
    table: pd.DataFrame,
    path: str | os.PathLike[str],
    *,
    force: bool = False,
    kind: str | None = None,
    atomic: bool = True,
) -> Path:
    """Write the table as CSV (shortest round-trip floats, ISO dates) or Parquet.

    ``kind`` (``".csv"`` / ``".parquet"``) defaults to the file's suffix. With ``atomic``
    the file is written through :func:`errdist.workbook.atomic.atomic_path`; without, straight
    to ``path`` (the caller's temporary file).
    """
    suffix = (kind or Path(path).suffix).lower()
    require_table_writer(Path(path).with_suffix(suffix))
    if atomic:
        with atomic_path(path, force=force) as tmp:
            return write_table(table, tmp, kind=suffix, atomic=False)
    if suffix == ".parquet":
        _parquet_ready(table).to_parquet(path, index=False)
    else:
        _csv_ready(table).to_csv(path, index=False)
    return Path(path)
