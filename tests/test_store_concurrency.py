"""Stores shared by processes: safe creation, busy stores, chunks claimed and shared.

Every test here starts real processes and waits on what they print or write,
with generous timeouts; none depends on the speed of the machine.
"""

from __future__ import annotations

import json
import os
import sqlite3
import subprocess
import sys
import time

from cyclewright import maps
from cyclewright.cycles.scan import scan

_GO = """
import json, os, sys, time
from pathlib import Path
from cyclewright.cycles.scan import scan
flag, name, side, store, to = sys.argv[1:6]
deadline = time.monotonic() + 120
while not Path(flag).exists() and time.monotonic() < deadline:
    time.sleep(0.001)
r = scan(name, int(to), side=side, store=store, workers=1, chunk_size=int(sys.argv[6]))
print(json.dumps({"counts": r.counts, "minima": r.minima, "computed": r.computed,
                  "path": r.store_path}))
"""


def _start(flag, name, side, store, to, chunk, env=None):
    return subprocess.Popen(
        [sys.executable, "-c", _GO, str(flag), name, side, str(store), str(to), str(chunk)],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
        env=env,
    )


def _finish(procs):
    out = []
    for p in procs:
        stdout, stderr = p.communicate(timeout=600)
        assert p.returncode == 0, stderr
        out.append(json.loads(stdout))
    return out


def test_three_processes_two_maps_one_new_store(tmp_path):
    # Two processes create the same new store (3x+1, one per side) while a
    # third creates another map's store in the same new directory; each starts
    # the moment a flag file appears.
    for trial in range(3):
        d = tmp_path / f"stores{trial}"
        d.mkdir()
        flag = tmp_path / f"go{trial}"
        procs = [
            _start(flag, "3x+1", "positive", d, 3000, 500),
            _start(flag, "3x+1", "negative", d, 3000, 500),
            _start(flag, "3x-1", "positive", d, 3000, 500),
        ]
        time.sleep(0.5)
        flag.touch()
        pos, neg, other = _finish(procs)
        # 3x+1: one positive cycle (minimum 1), negative cycles of minima -1, -5,
        # -17 (Lagarias 1985); 3x-1 positive: minima 1, 5, 17 (its conjugate).
        assert pos["minima"] == {"positive": [1]}
        assert neg["minima"] == {"negative": [-1, -5, -17]}
        assert other["minima"] == {"positive": [1, 5, 17]}
        assert pos["path"] == neg["path"] != other["path"]
        assert sorted(p.name for p in d.iterdir()) == sorted(
            {os.path.basename(pos["path"]), os.path.basename(other["path"])}
        )


def test_two_runs_of_one_range_share_the_chunks(tmp_path):
    # With chunk claims, two runs of the same range at once compute every
    # start exactly once between them, whatever their timing.
    store = tmp_path / "shared.sqlite"
    flag = tmp_path / "go"
    procs = [_start(flag, "3x+7", "both", store, 20000, 500) for _ in range(2)]
    time.sleep(0.5)
    flag.touch()
    a, b = _finish(procs)
    assert a["counts"] == b["counts"] and a["minima"] == b["minima"]
    assert a["computed"] + b["computed"] == 2 * 20000
    alone = scan(maps.get("3x+7"), 20000, side="both", store=False, workers=1)
    assert a["counts"] == alone.counts and a["minima"] == {
        k: list(v) for k, v in alone.minima.items()
    }


def test_a_busy_store_is_waited_for_and_never_called_corrupt(tmp_path):
    store = tmp_path / "busy.sqlite"
    scan(maps.get("3x+1"), 100, store=store, workers=1)
    holder = sqlite3.connect(store, isolation_level=None)
    holder.execute("BEGIN EXCLUSIVE")
    args = [sys.executable, "-m", "cyclewright", "scan", "3x+1", "--to", "200"]
    args += ["--workers", "1", "--store", str(store)]
    # 1. the lock is released once the waiting message is out: the scan completes
    p = subprocess.Popen(args, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    line = p.stderr.readline()
    assert "is busy" in line and "waiting up to" in line and "corrupt" not in line
    holder.execute("COMMIT")
    stdout, stderr = p.communicate(timeout=600)
    assert p.returncode == 0, stderr
    assert "corrupt" not in stderr and "error" not in stderr
    # 2. held beyond the wait: one clear line to give up, exit 2, nothing changed
    holder.execute("BEGIN EXCLUSIVE")
    env = dict(os.environ, CYCLEWRIGHT_STORE_WAIT="1")
    try:
        q = subprocess.run(args, capture_output=True, text=True, timeout=600, env=env)
    finally:
        holder.execute("COMMIT")
        holder.close()
    assert q.returncode == 2 and q.stdout == ""
    lines = q.stderr.splitlines()
    assert len(lines) == 2 and "waiting up to 1 s" in lines[0]
    assert lines[1].startswith("error: store ") and "is busy" in lines[1]
    assert "corrupt" not in q.stderr


def test_a_run_killed_midway_is_marked_and_its_claims_taken_over(tmp_path):
    store = tmp_path / "stale.sqlite"
    scan(maps.get("3x+1"), 100, store=store, workers=1)
    conn = sqlite3.connect(store)
    # a run of a process that no longer exists, with a claim on a chunk
    dead = subprocess.run(
        [sys.executable, "-c", "import os; print(os.getpid())"], capture_output=True, text=True
    )
    pid = int(dead.stdout)
    host = __import__("socket").gethostname()
    conn.execute(
        "INSERT INTO runs (scan_id, lo, hi, chunk_size, code_version, pid, host, started_at,"
        " heartbeat, status) VALUES (1, 1, 300, 100, 'x', ?, ?, 'then', 0, 'running')",
        (pid, host),
    )
    rid = conn.execute("SELECT max(id) FROM runs").fetchone()[0]
    conn.execute("INSERT INTO claims VALUES (1, 100, 199, ?)", (rid,))
    conn.commit()
    conn.close()
    (tmp_path / f".stale.sqlite.{pid}.tmp").write_bytes(b"left over")
    r = scan(maps.get("3x+1"), 300, store=store, workers=1, chunk_size=100)
    assert (
        r.counts["positive"]["drops"] == 299
    )  # every start reaches 1 (common practice, no source)
    conn = sqlite3.connect(store)
    assert (
        conn.execute("SELECT status FROM runs WHERE id = ?", (rid,)).fetchone()[0] == "interrupted"
    )
    assert conn.execute("SELECT count(*) FROM claims").fetchone()[0] == 0
    conn.close()
    assert not (tmp_path / f".stale.sqlite.{pid}.tmp").exists()
