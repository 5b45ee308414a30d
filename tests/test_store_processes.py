"""No process outlives its command; every stop signal ends it the same way.

The runs here are real subprocesses; the tests wait on what the processes
write (store rows, signal masks) with generous timeouts, never on speed.
"""

from __future__ import annotations

import json
import os
import signal
import sqlite3
import subprocess
import sys
import time
from pathlib import Path

import pytest


def _children(pid: int) -> set[int]:
    """Process ids whose parent is ``pid`` (Linux /proc)."""
    out = set()
    for d in Path("/proc").iterdir():
        if not d.name.isdigit():
            continue
        try:
            stat = (d / "stat").read_text()
        except OSError:
            continue
        fields = stat[stat.rindex(")") + 2 :].split()
        if int(fields[1]) == pid:
            out.add(int(d.name))
    return out


def _alive(pid: int) -> bool:
    try:
        stat = Path(f"/proc/{pid}/stat").read_text()
    except OSError:
        return False
    return stat[stat.rindex(")") + 2] != "Z"


def _gone(pids, timeout=120.0) -> bool:
    deadline = time.monotonic() + timeout
    while time.monotonic() < deadline:
        if not any(_alive(p) for p in pids):
            return True
        time.sleep(0.1)
    return False


def _done_chunks(path) -> int:
    try:
        conn = sqlite3.connect(f"file:{path}?mode=ro", uri=True, timeout=0.2)
        try:
            return conn.execute("SELECT count(*) FROM chunks WHERE status = 'done'").fetchone()[0]
        finally:
            conn.close()
    except sqlite3.Error:
        return 0


def _handlers_installed(pid: int) -> bool:
    """Whether the process catches SIGTERM (the CLI installs its stop handlers first thing)."""
    try:
        for line in Path(f"/proc/{pid}/status").read_text().splitlines():
            if line.startswith("SigCgt:"):
                return bool(int(line.split()[1], 16) >> (signal.SIGTERM - 1) & 1)
    except OSError:
        pass
    return False


_ARGS = ["5x+1", "--to", "60000", "--chunk-size", "2000", "--workers", "2", "--json"]
_ARGS += ["--max-minutes", "100000"]  # timed by the stores, not refused by the estimate
_TOTAL = 30


def _scan(store, steps, **kw):
    return subprocess.Popen(
        [sys.executable, "-m", "cyclewright", "scan", *_ARGS, "--max-steps", str(steps)]
        + ["--store", str(store)],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
        start_new_session=True,
        **kw,
    )


def _midway(proc, store, at_least):
    """Wait until the run has finished ``at_least`` chunks and still runs with its workers."""
    deadline = time.monotonic() + 300
    while time.monotonic() < deadline and proc.poll() is None:
        workers = _children(proc.pid)
        if _done_chunks(store) >= at_least and len(workers) >= 2:
            return workers
        time.sleep(0.02)
    return None


def _essentials(doc):
    return (doc["counts"], doc["cycles"], doc["minima"], doc["unresolved"], doc["complete"])


def test_no_worker_outlives_sigterm_or_kill_9_and_the_rerun_is_whole(tmp_path):
    for steps in (3000, 6000, 12000, 24000):
        store = tmp_path / f"s{steps}.sqlite"
        # 1. SIGTERM to the main process only: one line, exit 128+15, workers gone
        proc = _scan(store, steps)
        workers = _midway(proc, store, 1)
        if workers is None:
            proc.communicate(timeout=600)
            continue  # finished too soon: a heavier scan
        proc.send_signal(signal.SIGTERM)
        out, err = proc.communicate(timeout=300)
        assert proc.returncode == 128 + signal.SIGTERM, err
        assert err.splitlines()[-1] == "error: interrupted" and "Traceback" not in err
        assert out == ""
        assert _gone(workers), "a worker outlived SIGTERM of its command"
        # 2. kill -9 of the main process only: the workers notice and end, and
        # the pipe they shared closes (communicate would wait forever otherwise)
        n = _done_chunks(store)
        if n >= _TOTAL - 2:
            continue
        proc = _scan(store, steps)
        workers = _midway(proc, store, n + 1)
        if workers is None:
            proc.communicate(timeout=600)
            continue
        os.kill(proc.pid, signal.SIGKILL)
        proc.communicate(timeout=300)
        assert _gone(workers), "a worker outlived kill -9 of its command"
        # 3. the re-run completes, equal to an uninterrupted run
        again = subprocess.run(
            [sys.executable, "-m", "cyclewright", "scan", *_ARGS, "--max-steps", str(steps)]
            + ["--store", str(store)],
            capture_output=True,
            text=True,
            timeout=900,
        )
        assert again.returncode == 0, again.stderr
        whole = subprocess.run(
            [sys.executable, "-m", "cyclewright", "scan", *_ARGS, "--max-steps", str(steps)]
            + ["--store", str(tmp_path / "whole.sqlite")],
            capture_output=True,
            text=True,
            timeout=900,
        )
        assert whole.returncode == 0, whole.stderr
        assert _essentials(json.loads(again.stdout)) == _essentials(json.loads(whole.stdout))
        # Lagarias 1985 (from memory): the positive 5x+1 cycles have minima 1, 13, 17
        assert json.loads(again.stdout)["minima"] == {"positive": [1, 13, 17]}
        conn = sqlite3.connect(store)
        statuses = [r[0] for r in conn.execute("SELECT status FROM runs ORDER BY id")]
        conn.close()
        assert statuses[-1] == "complete" and "running" not in statuses
        return
    pytest.fail("the scan always finished before it could be stopped")


def _stopped_at(cmd, env, delay, signum):
    """Start ``cmd``, wait until it catches SIGTERM (its handlers are in), then
    signal it after ``delay`` s; (return code, stdout, stderr lines but progress,
    the children it had)."""
    proc = subprocess.Popen(
        cmd,
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
        env=env,
        start_new_session=True,
    )
    deadline = time.monotonic() + 120
    while not _handlers_installed(proc.pid) and proc.poll() is None:
        assert time.monotonic() < deadline
        time.sleep(0.0005)
    time.sleep(delay)
    kids = _children(proc.pid)
    if signum == signal.SIGINT:  # Ctrl-C reaches the whole process group
        os.killpg(proc.pid, signum)
    else:
        proc.send_signal(signum)
    out, err = proc.communicate(timeout=300)
    assert "Traceback" not in err, (cmd, delay, err)
    lines = [x for x in err.splitlines() if not x.startswith(("progress:", "plan:"))]
    return proc.returncode, out, lines, kids


_LONG_SCAN = ["scan", "3x+1", "--to", "10^15", "--no-store", "--max-minutes", "100000000"]


@pytest.mark.parametrize("sig", ["SIGINT", "SIGTERM", "SIGHUP"])
def test_a_stop_signal_at_any_moment_ends_the_command(tmp_path, sig):
    # A scan far too long to finish; the signal arrives at growing delays
    # after the command has set up its handlers, from kernel loading on.
    env = dict(os.environ, NUMBA_CACHE_DIR=str(tmp_path / "numba"))
    signum = getattr(signal, sig)
    cmd = [sys.executable, "-m", "cyclewright", *_LONG_SCAN, "--workers", "2"]
    for delay in (0.0, 0.3, 1.0, 2.5):
        code, out, lines, kids = _stopped_at(cmd, env, delay, signum)
        assert code == 128 + signum, (delay, lines)
        assert lines == ["error: interrupted"] and out == "", (delay, lines)
        assert _gone(kids)


@pytest.mark.parametrize("sig", ["SIGTERM", "SIGINT"])
def test_one_worker_in_a_long_compiled_walk_still_stops_at_once(tmp_path, sig):
    # 5x+1 orbits grow (Lagarias 1985, from memory: most 5x+1 orbits diverge), so a
    # start walked for 10^7 steps is one long call into compiled and big-integer code,
    # during which Python runs no signal handler. Even with one worker the scan runs
    # it in a worker process: the command answers the signal, ends the worker and
    # says one line. The wait is for the worker to exist, never for a speed.
    env = dict(os.environ, NUMBA_CACHE_DIR=str(tmp_path / "numba"))
    signum = getattr(signal, sig)
    cmd = [sys.executable, "-m", "cyclewright", "scan", "5x+1", "--to", "1000"]
    cmd += ["--max-steps", "10^7", "--workers", "1", "--no-store", "--max-minutes", "1000000"]
    proc = subprocess.Popen(
        cmd,
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
        env=env,
        start_new_session=True,
    )
    deadline = time.monotonic() + 300
    kids: set[int] = set()
    while not kids and proc.poll() is None:
        assert time.monotonic() < deadline
        kids = _children(proc.pid)
        time.sleep(0.02)
    time.sleep(1.0)  # well inside the walk (it takes minutes)
    assert proc.poll() is None, proc.communicate()
    if signum == signal.SIGINT:
        os.killpg(proc.pid, signum)
    else:
        proc.send_signal(signum)
    try:
        out, err = proc.communicate(timeout=60)  # a safety net: it ends within a second
    except subprocess.TimeoutExpired:
        os.killpg(proc.pid, signal.SIGKILL)
        proc.communicate()
        pytest.fail("the scan kept running after the stop signal")
    lines = [x for x in err.splitlines() if not x.startswith(("progress:", "plan:"))]
    assert proc.returncode == 128 + signum, err
    assert lines[-1] == "error: interrupted" and "Traceback" not in err and out == ""
    assert _gone(kids)


# ----------------------------------------------------------------- Dask clusters
def _local_cluster(n_workers):
    distributed = pytest.importorskip("distributed")
    return distributed.LocalCluster(
        n_workers=n_workers,
        threads_per_worker=1,
        processes=False,
        protocol="tcp://",
        host="127.0.0.1",
        dashboard_address=None,
    )


def test_a_cluster_without_workers_is_waited_for_then_given_up(tmp_path, monkeypatch):
    from cyclewright.cycles.scan import scan
    from cyclewright.cycles.scan.executors import ClusterError

    monkeypatch.setenv("CYCLEWRIGHT_WORKER_WAIT", "2")
    lines = []
    with _local_cluster(0) as cluster:
        with pytest.raises(ClusterError, match="no workers for 2 s"):
            scan(
                "3x+1",
                5000,
                chunk_size=1000,
                store=tmp_path / "s.sqlite",
                executor="dask",
                scheduler=cluster.scheduler_address,
                notice=lines.append,
            )
    assert len(lines) == 1 and "has no workers; waiting up to 2 s" in lines[0]


def test_losing_the_scheduler_is_one_line_and_nothing_finished_is_lost(tmp_path):
    from cyclewright.cycles.scan import scan
    from cyclewright.cycles.scan.executors import ClusterError

    store = tmp_path / "s.sqlite"
    with _local_cluster(1) as cluster:

        def progress(event):
            if event.done:  # the first chunk is in: the scheduler goes away
                cluster.close()

        with pytest.raises(ClusterError, match="lost the Dask scheduler"):
            scan(
                "3x+1",
                40000,
                chunk_size=1000,
                store=store,
                executor="dask",
                scheduler=cluster.scheduler_address,
                progress=progress,
            )
    kept = _done_chunks(store)
    assert kept >= 1
    again = scan("3x+1", 40000, chunk_size=1000, store=store, workers=1)
    assert again.chunks_reused >= kept and again.counts["positive"]["drops"] == 39999


@pytest.mark.slow
def test_an_interrupt_in_the_first_milliseconds_ends_with_one_line(tmp_path):
    # The entry point (cyclewright.cli.console) handles stop signals from its
    # first line, before click, numpy or numba are imported: a Ctrl-C at any
    # moment from then on ends the command with one line, never a traceback.
    # The signal is sent only once the process catches SIGTERM (its handlers
    # are in place), so the test does not depend on the machine's speed;
    # what comes before that is the interpreter's own start-up.
    env = dict(os.environ, NUMBA_CACHE_DIR=str(tmp_path / "numba"))
    script = Path(sys.executable).parent / "cyclewright"
    entries = [[sys.executable, "-m", "cyclewright"]] + ([[str(script)]] if script.exists() else [])
    for entry in entries:
        for delay in (0.0, 0.001, 0.002, 0.005, 0.01, 0.02, 0.05, 0.1, 0.2):
            cmd = [*entry, *_LONG_SCAN, "--workers", "1"]
            code, out, lines, _ = _stopped_at(cmd, env, delay, signal.SIGINT)
            assert code == 130, (entry, delay, code, lines)
            assert lines == ["error: interrupted"] and out == "", (entry, delay, lines)


def test_the_entry_point_handles_signals_before_any_heavy_import():
    # what importing the entry point loads before its handlers go in: the
    # package shells and the standard library's signal module, nothing else
    probe = (
        "import sys; before = set(sys.modules); import cyclewright.cli.console; "
        "print(' '.join(sorted(set(sys.modules) - before)))"
    )
    got = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True, check=True)
    loaded = set(got.stdout.split())
    assert loaded <= {"cyclewright", "cyclewright.cli", "cyclewright.cli.console", "signal"}
    # the console script and python -m both start there
    assert (
        "cyclewright.cli.console:run" in (Path(__file__).parents[1] / "pyproject.toml").read_text()
    )
    main_py = Path(__file__).parents[1] / "cyclewright" / "__main__.py"
    assert "from cyclewright.cli.console import run" in main_py.read_text()


def test_the_parent_watch_sees_the_lifeline_close():
    # the fallback of every platform without PR_SET_PDEATHSIG: end of file
    # on the lifeline pipe (or getppid changing) is the parent's end
    from cyclewright.cycles.scan import executors

    r, w = os.pipe()
    try:
        assert not executors._parent_gone(os.getppid(), r, 0.01)  # write end still open
        os.close(w)
        w = None
        assert executors._parent_gone(os.getppid(), r, 60.0)  # at once, not after 60 s
        assert executors._parent_gone(os.getppid() + 1, None, 0.0)  # adopted: gone too
    finally:
        os.close(r)
        if w is not None:
            os.close(w)


@pytest.mark.slow
def test_without_pdeathsig_the_watch_thread_ends_the_workers(tmp_path):
    # CYCLEWRIGHT_PDEATHSIG=0 leaves out the Linux kernel's mechanism: the
    # workers must still end after kill -9 of their command (watch thread)
    env = dict(os.environ, CYCLEWRIGHT_PDEATHSIG="0")
    for steps in (3000, 12000, 48000):
        store = tmp_path / f"s{steps}.sqlite"
        proc = _scan(store, steps, env=env)
        workers = _midway(proc, store, 1)
        if workers is None:
            proc.communicate(timeout=600)
            continue  # finished too soon: a heavier scan
        os.kill(proc.pid, signal.SIGKILL)
        proc.communicate(timeout=300)  # the pipe the workers shared closes
        assert _gone(workers), "a worker outlived kill -9 of its command"
        return
    pytest.fail("the scan always finished before it could be killed")
