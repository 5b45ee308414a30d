"""The results store: atomic chunks, refusal without touching the file, resume after kill -9."""

from __future__ import annotations

import hashlib
import json
import os
import signal
import sqlite3
import subprocess
import sys
import time

import numpy as np
import pytest

from cyclewright import maps
from cyclewright.cycles.errors import InputError, StoreError
from cyclewright.cycles.scan import scan
from cyclewright.cycles.scan.store import SCHEMA_VERSION, ScanStore, data_dir, default_store_path


@pytest.fixture(autouse=True)
def _data_dir(tmp_path, monkeypatch):
    monkeypatch.setenv("CYCLEWRIGHT_DATA_DIR", str(tmp_path / "data"))
    monkeypatch.setenv("CYCLEWRIGHT_CONFIG_DIR", str(tmp_path / "config"))


def _fingerprint(path):
    st = os.stat(path)
    with open(path, "rb") as fh:
        return hashlib.sha256(fh.read()).hexdigest(), st.st_mtime_ns, st.st_size


def _siblings(path):
    return sorted(p.name for p in path.parent.iterdir())


# ----------------------------------------------------------------- round trip
def test_round_trip(tmp_path):
    m = maps.get("3x+1")
    path = tmp_path / "s.sqlite"
    with ScanStore(path, m) as st:
        sid = st.scan_id("negative", 1000, None)
        assert st.scan_id("negative", 1000, None) == sid
        assert st.scan_id("negative", 1000, 50) != sid  # the length bound is part of the key
        rec = {"minimum": -5, "length": 3, "elements": [-5, -7, -10]}
        st.record_chunk(
            sid,
            1,
            10,
            {"drops": 8, "cycles": 1, "other_cycle": 0, "unresolved": 1},
            [rec],
            np.array([9], dtype=np.int64),
            np.array([True]),
            sieved=0,
            sieve_depth=0,
            seconds=0.1,
            version="test",
        )
    with ScanStore(path, m) as st:
        done = st.finished(sid, [(1, 10), (11, 20)])
        assert list(done) == [(1, 10)]
        assert done[(1, 10)].counts["drops"] == 8
        assert st.cycles(sid, 1, 10) == [rec]
        assert list(st.unresolved(sid)) == [(-9, True)]
        assert st.unresolved_summary(sid, [(1, 10)]) == (1, 1, [-9])
        info = st.summary()
        assert info["schema_version"] == SCHEMA_VERSION and info["map_key"] == m.key
    # the file is a store of this kind: application id and schema version in the header
    conn = sqlite3.connect(path)
    assert conn.execute("PRAGMA user_version").fetchone()[0] == SCHEMA_VERSION
    conn.close()


def test_default_location_follows_env(tmp_path, monkeypatch):
    monkeypatch.setenv("CYCLEWRIGHT_DATA_DIR", str(tmp_path / "elsewhere"))
    assert data_dir() == tmp_path / "elsewhere"
    p = default_store_path(maps.get("5x+1"))
    assert p.parent == tmp_path / "elsewhere" / "scans" and p.suffix == ".sqlite"
    assert default_store_path(maps.get("3x+1")) != default_store_path(maps.get("3x-1"))


# ----------------------------------------------------------------- refusals leave the file as it was
def _made_store(tmp_path, name="3x+1"):
    path = tmp_path / "made.sqlite"
    scan(maps.get(name), 100, store=path, workers=1)
    return path


def test_refuses_another_map_definition(tmp_path):
    path = _made_store(tmp_path)
    before, names = _fingerprint(path), _siblings(path)
    with pytest.raises(StoreError, match="map definition differs"):
        scan(maps.get("3x-1"), 100, store=path, workers=1)
    with pytest.raises(StoreError, match="3x\\+1"):
        ScanStore(path, maps.get("5x+1"))
    assert _fingerprint(path) == before and _siblings(path) == names


def test_refuses_corrupt_files(tmp_path):
    junk = tmp_path / "junk.sqlite"
    junk.write_bytes(os.urandom(5000))
    empty = tmp_path / "empty.sqlite"
    empty.write_bytes(b"")
    good = _made_store(tmp_path)
    truncated = tmp_path / "trunc.sqlite"
    data = good.read_bytes()
    truncated.write_bytes(data[:100] + os.urandom(len(data) - 100))
    for p in (junk, empty, truncated):
        before = _fingerprint(p)
        with pytest.raises(StoreError):
            ScanStore(p, maps.get("3x+1"))
        assert _fingerprint(p) == before


def _edit(path, *statements):
    conn = sqlite3.connect(path)
    for sql in statements:
        conn.execute(sql)
    conn.commit()
    conn.close()


def _refused_untouched(path, match, opener):
    before = _fingerprint(path)
    with pytest.raises(StoreError, match=match):
        opener(path)
    assert _fingerprint(path) == before


def test_refuses_foreign_database_and_other_versions(tmp_path):
    foreign = tmp_path / "foreign.sqlite"
    _edit(foreign, "CREATE TABLE t (x)")
    _refused_untouched(
        foreign, "not a cyclewright scan store", lambda p: ScanStore(p, maps.get("3x+1"))
    )

    newer = _made_store(tmp_path)
    _edit(newer, f"PRAGMA user_version = {SCHEMA_VERSION + 1}")
    _refused_untouched(
        newer, "incompatible version", lambda p: scan(maps.get("3x+1"), 100, store=p, workers=1)
    )

    _edit(
        newer,
        f"PRAGMA user_version = {SCHEMA_VERSION}",
        "UPDATE meta SET value = '999' WHERE key = 'semantics'",
    )
    _refused_untouched(newer, "semantics", lambda p: ScanStore(p, maps.get("3x+1")))


def test_refuses_unwritable_paths(tmp_path):
    with pytest.raises(StoreError, match="does not exist"):
        ScanStore(tmp_path / "missing" / "s.sqlite", maps.get("3x+1"))
    assert not (tmp_path / "missing").exists()
    with pytest.raises(StoreError, match="not a regular file"):
        ScanStore(tmp_path, maps.get("3x+1"))


def test_read_only_store_serves_finished_scans_and_refuses_the_rest(tmp_path, monkeypatch):
    # The operating system's answer is simulated (root may write anywhere), so
    # the check runs under every user. A store that cannot be written is read:
    # a finished scan comes back, anything needing a write is refused with the
    # file untouched.
    path = _made_store(tmp_path)
    reference = scan(maps.get("3x+1"), 100, store=False, workers=1)
    before = _fingerprint(path)
    ro = tmp_path / "ro"
    ro.mkdir()
    real_access = os.access
    denied = {str(path), str(ro)}

    def access(p, mode, *a, **kw):
        if str(p) in denied and mode & os.W_OK:
            return False
        return real_access(p, mode, *a, **kw)

    monkeypatch.setattr(os, "access", access)
    with ScanStore(path, maps.get("3x+1")) as st:
        assert st.readonly
    again = scan(maps.get("3x+1"), 100, store=path, workers=1)
    assert (again.counts, again.cycles) == (reference.counts, reference.cycles)
    assert again.chunks_reused == again.chunks_total and again.computed == 0
    with pytest.raises(StoreError, match="not writable"):
        scan(maps.get("3x+1"), 200, store=path, workers=1)
    with pytest.raises(StoreError, match="not writable"):
        scan(maps.get("3x+1"), 100, store=path, workers=1, side="negative")
    assert _fingerprint(path) == before
    with pytest.raises(StoreError, match="not writable"):
        ScanStore(ro / "s.sqlite", maps.get("3x+1"))
    assert list(ro.iterdir()) == []


def test_bad_range_creates_no_store(tmp_path):
    path = tmp_path / "never.sqlite"
    with pytest.raises(InputError):
        scan(maps.get("3x+1"), 2**63, store=path)
    with pytest.raises(InputError):
        scan(maps.get("3x+1"), 10, start=11, store=path)
    assert not path.exists()


# ----------------------------------------------------------------- resume
@pytest.mark.slow
def test_rerun_and_longer_range_reuse_chunks(tmp_path):
    path = tmp_path / "r.sqlite"
    m = maps.get("3x+13")
    a = scan(m, 999, store=path, workers=1, chunk_size=100, side="both")
    assert a.chunks_reused == 0 and a.computed == 1998
    b = scan(m, 999, store=path, workers=1, chunk_size=100, side="both")
    assert b.chunks_reused == b.chunks_total == 20 and b.computed == 0
    assert (b.counts, b.cycles) == (a.counts, a.cycles)
    c = scan(m, 1499, store=path, workers=1, chunk_size=100, side="both")
    assert c.chunks_reused == 20 and c.computed == 1000
    fresh = scan(m, 1499, store=False, workers=1, side="both")
    assert (c.counts, c.cycles) == (fresh.counts, fresh.cycles)
    # a different cap is a different scan: nothing reused
    d = scan(m, 999, store=path, workers=1, chunk_size=100, max_steps=500)
    assert d.chunks_reused == 0


def _cli(*args, **kw):
    return subprocess.Popen(
        [sys.executable, "-m", "cyclewright", "scan", *args],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
        start_new_session=True,
        **kw,
    )


def _done_chunks(path) -> int:
    try:
        conn = sqlite3.connect(f"file:{path}?mode=ro", uri=True, timeout=0.2)
        try:
            return conn.execute("SELECT count(*) FROM chunks").fetchone()[0]
        finally:
            conn.close()
    except sqlite3.Error:
        return -1


def _essentials(doc):
    return (
        doc["counts"],
        doc["cycles"],
        doc["minima"],
        doc["unresolved"],
        doc["complete"],
    )


@pytest.mark.slow
def test_kill_9_midway_then_rerun_equals_uninterrupted(tmp_path):
    # Each attempt is made heavier until the kill lands while chunks remain;
    # the test does not depend on the speed of the machine.
    for attempt, steps in enumerate((3000, 6000, 12000)):
        store = tmp_path / f"killed{attempt}.sqlite"
        args = ["5x+1", "--to", "60000", "--chunk-size", "2000", "--max-steps", str(steps)]
        args += ["--workers", "2", "--json"]
        total = 30
        proc = _cli(*args, "--store", str(store))
        deadline = time.monotonic() + 300
        killed_at = None
        while time.monotonic() < deadline and proc.poll() is None:
            n = _done_chunks(store) if store.exists() else 0
            if n >= 2:
                os.killpg(proc.pid, signal.SIGKILL)
                proc.wait()
                killed_at = n
                break
            time.sleep(0.02)
        if proc.poll() is None:  # pragma: no cover - safety net
            os.killpg(proc.pid, signal.SIGKILL)
            proc.wait()
        proc.stdout.close()
        proc.stderr.close()
        if killed_at is None or _done_chunks(store) >= total:
            continue  # finished before the kill: try a heavier scan
        remaining = _done_chunks(store)
        assert 0 < remaining < total
        resumed = subprocess.run(
            [sys.executable, "-m", "cyclewright", "scan", *args, "--store", str(store)],
            capture_output=True,
            text=True,
            timeout=600,
        )
        assert resumed.returncode == 0, resumed.stderr
        whole = subprocess.run(
            [
                sys.executable,
                "-m",
                "cyclewright",
                "scan",
                *args,
                "--store",
                str(tmp_path / "whole.sqlite"),
            ],
            capture_output=True,
            text=True,
            timeout=600,
        )
        assert whole.returncode == 0, whole.stderr
        r, w = json.loads(resumed.stdout), json.loads(whole.stdout)
        assert r["chunks"]["reused"] >= remaining
        assert _essentials(r) == _essentials(w)
        assert r["minima"] == {"positive": [1, 13, 17]}
        return
    pytest.fail("the scan always finished before it could be killed")
