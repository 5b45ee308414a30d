"""The Dask executor: a LocalCluster on 127.0.0.1 gives the local executor's results."""

from __future__ import annotations

import socket
import threading
import time

import pytest

from cyclewright import maps
from cyclewright.cycles.errors import InputError
from cyclewright.cycles.scan import scan

distributed = pytest.importorskip("distributed")


@pytest.fixture(autouse=True)
def _data_dir(tmp_path, monkeypatch):
    monkeypatch.setenv("CYCLEWRIGHT_DATA_DIR", str(tmp_path / "data"))


@pytest.fixture(scope="module")
def cluster():
    with distributed.LocalCluster(
        n_workers=1,
        threads_per_worker=2,
        processes=False,
        protocol="tcp://",
        host="127.0.0.1",
        dashboard_address=None,
    ) as c:
        yield c


def _same(a, b):
    assert a.counts == b.counts
    assert a.cycles == b.cycles
    assert a.unresolved_first == b.unresolved_first
    assert a.unresolved_count == b.unresolved_count


def test_dask_equals_local(cluster, tmp_path):
    m = maps.get("3x+13")
    kw = dict(side="both", chunk_size=2500)
    local = scan(m, 20000, store=False, workers=2, **kw)
    remote = scan(
        m,
        20000,
        store=tmp_path / "d.sqlite",
        executor="dask",
        scheduler=cluster.scheduler_address,
        **kw,
    )
    _same(local, remote)
    assert remote.executor.startswith("dask")
    # OEIS A226607 (k = 13)
    assert [c.minimum for c in remote.cycles if c.lagarias_primitive and c.minimum > 0] == [
        1,
        131,
        211,
        227,
        251,
        259,
        283,
        287,
        319,
    ]
    again = scan(
        m,
        20000,
        store=tmp_path / "d.sqlite",
        executor="dask",
        scheduler=cluster.scheduler_address,
        **kw,
    )
    assert again.chunks_reused == again.chunks_total


def test_dask_with_unresolved_starts(cluster):
    m = maps.get("5x+1")
    local = scan(m, 4000, store=False, workers=1, chunk_size=1000, max_steps=300)
    remote = scan(
        m,
        4000,
        store=False,
        chunk_size=1000,
        max_steps=300,
        executor="dask",
        scheduler=cluster.scheduler_address,
    )
    _same(local, remote)
    assert remote.unresolved_count["positive"] > 0


def test_refused_connection_is_a_clear_error():
    s = socket.socket()
    s.bind(("127.0.0.1", 0))
    port = s.getsockname()[1]
    s.close()
    t0 = time.monotonic()
    with pytest.raises(InputError, match="cannot reach the Dask scheduler"):
        scan(maps.get("3x+1"), 100, store=False, executor="dask", scheduler=f"127.0.0.1:{port}")
    assert time.monotonic() - t0 < 15


@pytest.mark.slow
def test_silent_listener_times_out():
    # A socket that accepts TCP but never speaks the scheduler protocol.
    from cyclewright.cycles.scan.executors import DaskExecutor

    srv = socket.socket()
    srv.bind(("127.0.0.1", 0))
    srv.listen(8)
    port = srv.getsockname()[1]
    conns = []
    stop = threading.Event()

    def accept():
        srv.settimeout(0.2)
        while not stop.is_set():
            try:
                conns.append(srv.accept()[0])
            except OSError:
                pass

    th = threading.Thread(target=accept, daemon=True)
    th.start()
    try:
        t0 = time.monotonic()
        with pytest.raises(InputError, match="cannot reach the Dask scheduler"):
            DaskExecutor(f"tcp://127.0.0.1:{port}", timeout=1.0)
        assert time.monotonic() - t0 < 15
    finally:
        stop.set()
        th.join()
        for c in conns:
            c.close()
        srv.close()


def test_bad_address():
    with pytest.raises(InputError):
        scan(maps.get("3x+1"), 100, store=False, executor="dask", scheduler="tcp://nowhere")
