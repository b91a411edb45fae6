"""Where the per-series work runs: in this process, or on dask.distributed.

Backends
--------
serial
    Blocks of series one after the other in this process (no Dask needed).
dask
    A ``dask.distributed`` client: a ``LocalCluster`` of ``workers`` single-threaded worker
    processes by default, or a running cluster given by its scheduler address
    (``tcp://HOST:PORT``). The returns of the usable series are scattered **once**, in
    chunks of at most :data:`CHUNK_SERIES` series (:class:`PanelData` objects), so a worker
    holds only the chunks its tasks need and its memory does not grow with the panel; each
    task is one block of series
    (:func:`errdist.panel.job.run_block`), not one fit. Results come back as blocks finish
    and are put in input order, so the output does not depend on the number of workers or on
    which block ended first (each series' random draws are seeded by its name).

Ctrl-C (``KeyboardInterrupt``) cancels the outstanding tasks, closes the client (and the local
cluster) and is raised again: the caller writes nothing.
"""

from __future__ import annotations

import itertools
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

CHUNK_SERIES = 1000
"""Most series per scattered chunk (1,000 x 1,260 returns is about 10 MB)."""


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

    def slice(self, a: int, b: int) -> PanelData:
        """Series ``a`` to ``b - 1`` as a PanelData of their own (a copy of their values)."""
        b = min(b, len(self))
        lo, hi = int(self.offsets[a]), int(self.offsets[b])
        return PanelData(self.names[a:b], self.values[lo:hi].copy(), self.offsets[a : b + 1] - lo)


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
        dashboard_address=":0",  # any free port: 8787 may be taken by another cluster
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
        run = uuid.uuid4().hex[:12]  # keys unique on a shared scheduler
        chunks: dict[int, Any] = {}  # chunk number -> its scattered PanelData
        for k, b in enumerate(blocks):
            for c, part in itertools.groupby(b, key=lambda i: i // CHUNK_SERIES):
                if c not in chunks:
                    piece = data.slice(c * CHUNK_SERIES, (c + 1) * CHUNK_SERIES)
                    chunks[c] = client.scatter(piece, hash=False)
                local = [i - c * CHUNK_SERIES for i in part]
                futures.append(
                    client.submit(
                        run_block,
                        chunks[c],
                        local,
                        opts,
                        c * CHUNK_SERIES,
                        key=f"panel-{run}-{k}-{c}",
                    )
                )
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
