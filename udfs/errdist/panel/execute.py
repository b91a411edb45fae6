"""Where the per-series work runs: in this process, or on dask.distributed.

Backends
--------
serial
    Blocks of series one after the other in this process (no Dask needed).
dask
    A ``dask.distributed`` client: a ``LocalCluster`` of ``workers`` single-threaded worker
    processes by default, or a running cluster given by its scheduler address
    (``tcp://HOST:PORT``). The returns of every usable series are scattered **once**
    (:class:`PanelData`, one object); each task is one block of series
    (:func:`errdist.panel.job.run_block`), not one fit. Results come back as blocks finish
    and are put in input order, so the output does not depend on the number of workers or on
    which block ended first (each series' random draws are seeded by its name).

Ctrl-C (``KeyboardInterrupt``) cancels the outstanding tasks, closes the client (and the local
cluster) and is raised again: the caller writes nothing.
"""

from __future__ import annotations

import logging
import math
import uuid
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from errdist.panel.job import JobOptions, run_block

__all__ = [
    "PARALLEL_HINT",
    "PanelData",
    "dask_available",
    "make_blocks",
    "run_dask",
    "run_serial",
]

PARALLEL_HINT = (
    "dask.distributed is not installed: running on one core. For parallel workers install "
    'the cluster extra: pip install "errdist[cluster]"'
)
"""What the serial fallback says."""

Rows = dict[int, dict[str, Any]]


@dataclass
class PanelData:
    """The returns of many series in one object: one flat array and offsets.

    Sent to the workers once (a single scatter); :meth:`returns` is a view, no copy.
    """

    names: list[str]
    values: np.ndarray
    offsets: np.ndarray

    @classmethod
    def from_series(cls, names: Sequence[str], returns: Sequence[np.ndarray]) -> PanelData:
        sizes = np.array([len(r) for r in returns], dtype=np.int64)
        offsets = np.concatenate([[0], np.cumsum(sizes)])
        values = (
            np.concatenate([np.asarray(r, dtype=np.float64) for r in returns])
            if len(returns)
            else np.empty(0)
        )
        return cls(list(names), values, offsets)

    def __len__(self) -> int:
        return len(self.names)

    def name(self, i: int) -> str:
        return self.names[i]

    def returns(self, i: int) -> np.ndarray:
        return self.values[self.offsets[i] : self.offsets[i + 1]]


def dask_available() -> bool:
    """True when ``dask.distributed`` can be imported."""
    try:
        import distributed  # noqa: F401
    except ImportError:
        return False
    return True


def make_blocks(n: int, block_size: int) -> list[list[int]]:
    """Indices ``0..n-1`` in consecutive blocks of at most ``block_size``."""
    b = max(1, int(block_size))
    return [list(range(i, min(n, i + b))) for i in range(0, n, b)]


def auto_block_size(n: int, workers: int) -> int:
    """About 8 blocks per worker (so the load evens out), 1 to 50 series each."""
    return max(1, min(50, math.ceil(n / max(1, 8 * workers))))


def run_serial(
    data: PanelData,
    opts: JobOptions,
    blocks: Sequence[Sequence[int]],
    on_done: Callable[[int], None] | None = None,
) -> Rows:
    """Run every block in this process; ``on_done(k)`` after each block of ``k`` series."""
    out: Rows = {}
    for block in blocks:
        for i, row in run_block(data, block, opts):
            out[i] = row
        if on_done:
            on_done(len(block))
    return out


def _client(workers: int, scheduler: str | None) -> tuple[Any, Any]:
    from distributed import Client, LocalCluster

    if scheduler:
        return Client(scheduler, timeout="20s"), None
    cluster = LocalCluster(
        n_workers=max(1, int(workers)),
        threads_per_worker=1,
        processes=True,
        dashboard_address=None,
        silence_logs=logging.ERROR,
    )
    return Client(cluster), cluster


def run_dask(
    data: PanelData,
    opts: JobOptions,
    blocks: Sequence[Sequence[int]],
    *,
    workers: int = 2,
    scheduler: str | None = None,
    client: Any = None,
    on_done: Callable[[int], None] | None = None,
) -> Rows:
    """Run the blocks on dask.distributed (see the module docstring).

    Parameters
    ----------
    data : PanelData
    opts : JobOptions
    blocks : sequence of index lists
    workers : int
        Worker processes of the local cluster (ignored with ``scheduler`` or ``client``).
    scheduler : str, optional
        Address of a running scheduler, ``tcp://HOST:PORT``.
    client : distributed.Client, optional
        An existing client to use (not closed here).
    on_done : callable, optional
        Called with the number of series of each finished block.
    """
    from distributed import as_completed

    own = client is None
    cluster = None
    if own:
        client, cluster = _client(workers, scheduler)
    futures: list[Any] = []
    try:
        data_future = client.scatter(data, hash=False)
        run = uuid.uuid4().hex[:12]  # keys unique on a shared scheduler
        futures = [
            client.submit(run_block, data_future, list(b), opts, key=f"panel-{run}-{k}")
            for k, b in enumerate(blocks)
        ]
        out: Rows = {}
        for fut in as_completed(futures):
            part = fut.result()
            for i, row in part:
                out[i] = row
            if on_done:
                on_done(len(part))
        return out
    except BaseException:
        if futures:
            client.cancel(futures)
        raise
    finally:
        if own:
            client.close()
            if cluster is not None:
                cluster.close()
