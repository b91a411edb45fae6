"""Many series at once: ``errdist panel``, on dask.distributed when it is installed.

Modules: :mod:`~errdist.panel.inputs` (wide / long prices tables, validated per series),
:mod:`~errdist.panel.job` (the work on one series and on a block), :mod:`~errdist.panel.models`
(the registry of backtested VaR models), :mod:`~errdist.panel.execute` (serial and Dask
backends), :mod:`~errdist.panel.progress` (progress bar), :mod:`~errdist.panel.table` (ranked
table, CSV / Parquet), :mod:`~errdist.panel.overview` (overview workbook),
:mod:`~errdist.panel.command` (the command).
"""

from __future__ import annotations

from errdist.panel.command import compute_panel, default_options
from errdist.panel.inputs import PanelInput, SeriesData, read_panel
from errdist.panel.job import JobOptions, series_row, series_seed
from errdist.panel.models import MODELS, Model, register

__all__ = [
    "MODELS",
    "JobOptions",
    "Model",
    "PanelInput",
    "SeriesData",
    "compute_panel",
    "default_options",
    "read_panel",
    "register",
    "series_row",
    "series_seed",
]
