"""The panel on a real Dask cluster: a ``dask scheduler`` and two ``dask worker`` processes
started here on 127.0.0.1 (free ports), stopped by PID at the end.

The cluster's table must equal the serial one cell for cell: the seeds are per series, and
the blocks (of any size) land in input order.
"""

from __future__ import annotations

import os
import shutil
import signal
import socket
import subprocess
import sys
import time
from pathlib import Path

import pandas as pd
import pytest

import errdist
from errdist.panel import compute_panel, default_options, execute, read_panel
from panel_data import simulated_wide, write

pytestmark = pytest.mark.cluster

distributed = pytest.importorskip(
    "distributed", reason="dask.distributed is not installed (pip install errdist[cluster])"
)

UDFS = str(Path(errdist.__file__).resolve().parent.parent)


def _free_port() -> int:
    with socket.socket(socket.AF_INET, socket.SOCK_STREAM) as s:
        s.bind(("127.0.0.1", 0))
        return int(s.getsockname()[1])


def _dask_cli() -> str:
    exe = Path(sys.executable).parent / "dask"
    if exe.exists():
        return str(exe)
    found = shutil.which("dask")
    if not found:
        pytest.skip("the `dask` command is not installed next to this Python")
    return found


def _stop(procs: list[subprocess.Popen]) -> None:
    for p in reversed(procs):  # workers first, then the scheduler
        if p.poll() is None:
            os.kill(p.pid, signal.SIGTERM)
    for p in reversed(procs):
        try:
            p.wait(timeout=20)
        except subprocess.TimeoutExpired:
            os.kill(p.pid, signal.SIGKILL)
            p.wait(timeout=10)


@pytest.fixture(scope="module")
def cluster(tmp_path_factory):
    """Address of a scheduler with two single-threaded workers, all on 127.0.0.1."""
    dask = _dask_cli()
    port = _free_port()
    address = f"tcp://127.0.0.1:{port}"
    env = dict(os.environ)
    env["PYTHONPATH"] = os.pathsep.join(filter(None, [UDFS, env.get("PYTHONPATH", "")]))
    logs = tmp_path_factory.mktemp("dask-logs")
    procs: list[subprocess.Popen] = []
    try:
        procs.append(
            subprocess.Popen(
                [dask, "scheduler", "--host", "127.0.0.1", "--port", str(port), "--no-dashboard"],
                env=env,
                stdout=subprocess.DEVNULL,
                stderr=open(logs / "scheduler.log", "wb"),  # noqa: SIM115
            )
        )
        for k in range(2):
            procs.append(
                subprocess.Popen(
                    [
                        dask,
                        "worker",
                        address,
                        "--host",
                        "127.0.0.1",
                        "--nthreads",
                        "1",
                        "--nworkers",
                        "1",
                        "--no-dashboard",
                        "--name",
                        f"panel-test-{k}",
                    ],
                    env=env,
                    stdout=subprocess.DEVNULL,
                    stderr=open(logs / f"worker{k}.log", "wb"),  # noqa: SIM115
                )
            )
        client = None
        deadline = time.monotonic() + 90
        while client is None:
            try:
                client = distributed.Client(address, timeout="5s")
            except OSError:
                if time.monotonic() > deadline or procs[0].poll() is not None:
                    raise
                time.sleep(0.5)
        client.wait_for_workers(2, timeout=90)
        assert len(client.scheduler_info()["workers"]) == 2
        client.close()
        yield address
    finally:
        _stop(procs)
        assert all(p.poll() is not None for p in procs)


def test_cluster_table_equals_serial_table_cell_for_cell(cluster, tmp_path, monkeypatch):
    w = simulated_wide(n_series=7, n_prices=300, seed=11).astype(object)
    w.loc[40, "S03"] = None  # one series refused at input
    panel = read_panel(write(w, tmp_path / "w.csv"))
    opts = default_options(gof_samples=19)
    serial = compute_panel(panel, opts, workers=0)
    on_cluster = compute_panel(panel, opts, scheduler=cluster, block_size=2)
    pd.testing.assert_frame_equal(on_cluster, serial, check_exact=True)
    # Other blocks, same numbers: nothing depends on how the panel was split.
    again = compute_panel(panel, opts, scheduler=cluster, block_size=5)
    pd.testing.assert_frame_equal(again, serial, check_exact=True)
    # Scattered in chunks of 4 series: blocks of 3 cross the chunk boundaries.
    monkeypatch.setattr(execute, "CHUNK_SERIES", 4)
    chunked = compute_panel(panel, opts, scheduler=cluster, block_size=3)
    pd.testing.assert_frame_equal(chunked, serial, check_exact=True)
    assert (serial["status"] == "ok").sum() == 6
    assert serial["gof_pvalue"].notna().sum() == 6


def test_command_on_a_local_cluster_writes_the_serial_table(tmp_path):
    """``errdist panel --workers 2`` (a LocalCluster of 2 processes) = ``--workers 0``."""
    from errdist.cli import main

    prices = write(simulated_wide(n_series=3, n_prices=120, seed=5), tmp_path / "p.csv")
    common = ["panel", "--prices", str(prices), "--gof-samples", "19", "--models", "none"]
    assert main([*common, "--out", str(tmp_path / "a.xlsx"), "--workers", "0"]) == 0
    assert main([*common, "--out", str(tmp_path / "b.xlsx"), "--workers", "2"]) == 0
    assert (tmp_path / "a.csv").read_bytes() == (tmp_path / "b.csv").read_bytes()
