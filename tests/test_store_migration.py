"""Stores of schema version 1 are migrated to version 2, never trusted unchecked.

A version-1 store is built here from the version-1 schema as it was
released (copied below from the history of cyclewright/cycles/scan/store.py),
filled with the chunks of a real scan. Opening it re-checks every chunk
(counts add up, cycles re-proved exactly, unresolved starts inside the
chunk) and rewrites the good ones with checksums; a chunk failing a check is
left out and recomputed. Results always equal an uninterrupted scan's.
"""

from __future__ import annotations

import hashlib
import json
import os
import sqlite3
import threading

import pytest
from conftest import run_cli

from cyclewright import maps
from cyclewright.cycles.errors import StoreError
from cyclewright.cycles.scan import scan
from cyclewright.cycles.scan.store import SCHEMA_VERSION, ScanStore, _layout_v1, store_info

# the layout of schema version 1, as the first released store wrote it
SCHEMA_V1 = """
CREATE TABLE meta (key TEXT PRIMARY KEY, value TEXT NOT NULL);
CREATE TABLE scans (
    id INTEGER PRIMARY KEY,
    side TEXT NOT NULL CHECK (side IN ('positive', 'negative')),
    max_steps INTEGER NOT NULL,
    max_cycle_length INTEGER,
    config TEXT NOT NULL UNIQUE,
    created_by TEXT NOT NULL,
    created_at TEXT NOT NULL
);
CREATE TABLE runs (
    id INTEGER PRIMARY KEY,
    scan_id INTEGER NOT NULL REFERENCES scans(id),
    lo INTEGER NOT NULL,
    hi INTEGER NOT NULL,
    chunk_size INTEGER NOT NULL,
    code_version TEXT NOT NULL,
    started_at TEXT NOT NULL,
    finished_at TEXT,
    status TEXT NOT NULL
);
CREATE TABLE chunks (
    scan_id INTEGER NOT NULL REFERENCES scans(id),
    lo INTEGER NOT NULL,
    hi INTEGER NOT NULL,
    status TEXT NOT NULL,
    drops INTEGER NOT NULL,
    cycles INTEGER NOT NULL,
    other_cycle INTEGER NOT NULL,
    unresolved INTEGER NOT NULL,
    beyond_length INTEGER NOT NULL,
    sieved INTEGER NOT NULL,
    sieve_depth INTEGER NOT NULL,
    seconds REAL NOT NULL,
    code_version TEXT NOT NULL,
    finished_at TEXT NOT NULL,
    PRIMARY KEY (scan_id, lo, hi)
);
CREATE TABLE cycles (
    scan_id INTEGER NOT NULL REFERENCES scans(id),
    minimum INTEGER NOT NULL,
    length INTEGER NOT NULL,
    record TEXT NOT NULL,
    PRIMARY KEY (scan_id, minimum)
);
CREATE TABLE unresolved (
    scan_id INTEGER NOT NULL REFERENCES scans(id),
    lo INTEGER NOT NULL,
    hi INTEGER NOT NULL,
    count INTEGER NOT NULL,
    starts BLOB NOT NULL,
    escaped BLOB NOT NULL,
    PRIMARY KEY (scan_id, lo, hi)
);
"""

KW = dict(side="both", chunk_size=100, workers=1)


def _essentials(r):
    return (r.counts, r.cycles, r.unresolved_count, r.unresolved_first, r.minima)


def _fingerprint(path):
    return hashlib.sha256(path.read_bytes()).hexdigest(), os.stat(path).st_mtime_ns


def _v1_store(tmp_path, name="5x+1", to=600, max_steps=300, path=None):
    """A schema-1 store holding a real scan of ``name`` (both sides, chunks of 100)."""
    ref = tmp_path / f"ref-{name}.sqlite"
    result = scan(maps.get(name), to, store=ref, max_steps=max_steps, **KW)
    src = sqlite3.connect(ref)
    path = path or tmp_path / f"v1-{name}.sqlite"
    v1 = sqlite3.connect(path)
    v1.executescript(SCHEMA_V1)
    v1.execute("PRAGMA application_id = 1129794643")  # "CWLS"
    v1.execute("PRAGMA user_version = 1")
    for key, value in src.execute("SELECT key, value FROM meta"):
        v1.execute(
            "INSERT INTO meta VALUES (?, ?)", (key, "1" if key == "schema_version" else value)
        )
    v1.executemany(
        "INSERT INTO scans VALUES (?, ?, ?, ?, ?, ?, ?)", src.execute("SELECT * FROM scans")
    )
    v1.executemany(
        "INSERT INTO runs VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)",
        src.execute(
            "SELECT id, scan_id, lo, hi, chunk_size, code_version, started_at, finished_at,"
            " status FROM runs"
        ),
    )
    v1.executemany(
        "INSERT INTO chunks VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)",
        src.execute(
            "SELECT scan_id, lo, hi, status, drops, cycles, other_cycle, unresolved,"
            " beyond_length, sieved, sieve_depth, seconds, code_version, finished_at FROM chunks"
        ),
    )
    v1.executemany("INSERT INTO cycles VALUES (?, ?, ?, ?)", src.execute("SELECT * FROM cycles"))
    v1.executemany(
        "INSERT INTO unresolved VALUES (?, ?, ?, ?, ?, ?)", src.execute("SELECT * FROM unresolved")
    )
    v1.commit()
    v1.close()
    src.close()
    return path, result


def test_the_derived_v1_layout_is_the_released_one():
    conn = sqlite3.connect(":memory:")
    conn.executescript(SCHEMA_V1)
    rows = sorted(conn.execute("SELECT type, name, tbl_name, sql FROM sqlite_master").fetchall())
    assert rows == _layout_v1()


def test_a_v1_store_is_migrated_and_fully_reused(tmp_path):
    path, ref = _v1_store(tmp_path)
    n_chunks = sqlite3.connect(path).execute("SELECT count(*) FROM chunks").fetchone()[0]
    assert store_info(path)["problem"].startswith("schema version 1: migrated")
    lines = []
    r = scan(maps.get("5x+1"), 600, store=path, max_steps=300, notice=lines.append, **KW)
    # Lagarias 1985 (from memory): 5x+1 has the positive cycles with minima 1, 13, 17
    assert r.minima["positive"] == (1, 13, 17)
    assert _essentials(r) == _essentials(ref)
    assert r.computed == 0 and r.chunks_reused == n_chunks  # every chunk passed and was kept
    assert len(lines) == 1 and "schema version 1: migrated to version 2" in lines[0]
    assert f"{n_chunks} chunks passed the checks" in lines[0] and "recomputed" not in lines[0]
    conn = sqlite3.connect(path)
    assert conn.execute("PRAGMA user_version").fetchone()[0] == SCHEMA_VERSION
    assert all(len(c) == 64 for (c,) in conn.execute("SELECT checksum FROM chunks"))
    assert all(
        "migrated from schema 1" in v for (v,) in conn.execute("SELECT code_version FROM chunks")
    )
    conn.close()
    assert "problem" not in store_info(path)
    lines.clear()
    again = scan(maps.get("5x+1"), 600, store=path, max_steps=300, notice=lines.append, **KW)
    assert lines == [] and again.computed == 0 and _essentials(again) == _essentials(ref)
    assert not list(tmp_path.glob(".*.tmp"))


def test_damaged_v1_chunks_are_left_out_and_recomputed(tmp_path):
    path, ref = _v1_store(tmp_path)
    conn = sqlite3.connect(path)
    # a flipped count: no longer adds up to the range
    conn.execute("UPDATE chunks SET drops = drops + 1 WHERE lo = 100 AND scan_id = 1")
    # a cycle record that does not re-prove (13 -> its elements tampered)
    rec = json.loads(conn.execute("SELECT record FROM cycles WHERE minimum = 13").fetchone()[0])
    rec["elements"] = [str(int(x) + 2) if isinstance(x, str) else x + 2 for x in rec["elements"]]
    conn.execute(
        "UPDATE cycles SET record = ? WHERE minimum = 13", (json.dumps(rec, sort_keys=True),)
    )
    # a consistent but wrong cycle sign: -17 is no cycle of 5x+1 on the negative side
    conn.execute("UPDATE cycles SET minimum = -minimum WHERE minimum = 17")
    conn.commit()
    conn.close()
    lines = []
    r = scan(maps.get("5x+1"), 600, store=path, max_steps=300, notice=lines.append, **KW)
    assert _essentials(r) == _essentials(ref)
    assert r.computed == 99 + 100  # the positive chunks [1, 99] (13 and 17) and [100, 199]
    assert len(lines) == 1 and "2 failed a check and will be recomputed" in lines[0]


def test_an_unwritable_v1_store_is_refused_untouched(tmp_path):
    path, _ = _v1_store(tmp_path)
    before = _fingerprint(path)
    os.chmod(path, 0o444)
    os.chmod(tmp_path, 0o555)
    try:
        if os.access(path, os.W_OK):  # running as root: permissions do not bind
            return
        with pytest.raises(StoreError, match="schema version 1 and is not writable"):
            ScanStore(path, maps.get("5x+1"))
    finally:
        os.chmod(tmp_path, 0o755)
        os.chmod(path, 0o644)
    assert _fingerprint(path) == before


def test_a_v1_store_of_another_map_or_layout_is_refused_untouched(tmp_path):
    path, _ = _v1_store(tmp_path)
    before = _fingerprint(path)
    with pytest.raises(StoreError, match="map definition differs"):
        ScanStore(path, maps.get("3x+1"))
    assert _fingerprint(path) == before
    conn = sqlite3.connect(path)
    conn.execute("CREATE TABLE extra (x)")
    conn.commit()
    conn.close()
    before = _fingerprint(path)
    with pytest.raises(StoreError, match="table layout is not the one of schema version 1"):
        ScanStore(path, maps.get("5x+1"))
    assert _fingerprint(path) == before


def test_processes_opening_a_v1_store_at_once_migrate_it_once(tmp_path):
    path, ref = _v1_store(tmp_path)
    results, errors, notices = [], [], []

    def open_and_scan():
        try:
            results.append(
                scan(maps.get("5x+1"), 600, store=path, max_steps=300, notice=notices.append, **KW)
            )
        except Exception as exc:  # pragma: no cover - reported below
            errors.append(exc)

    threads = [threading.Thread(target=open_and_scan) for _ in range(3)]
    for t in threads:
        t.start()
    for t in threads:
        t.join()
    assert errors == []
    assert all(_essentials(r) == _essentials(ref) for r in results)
    assert sum("migrated" in x for x in notices) == 1
    assert all(r.computed == 0 for r in results)


def test_the_scan_command_migrates_with_one_line(tmp_path):
    path, _ = _v1_store(tmp_path, name="3x+1", to=300, max_steps=1000)
    r = run_cli(
        "scan", "3x+1", "--to", "300", "--side", "both", "--chunk-size", "100", "--store", str(path)
    )
    assert r.returncode == 0, r.stderr
    assert [x for x in r.stderr.splitlines() if "migrated" in x] == [
        next(x for x in r.stderr.splitlines() if x.startswith(f"store {path} had schema version 1"))
    ]
    assert "chunks 8 (8 reused)" in r.stdout  # [1, 99] ... [300, 300] on both sides


def test_a_v1_default_store_is_adopted_and_migrated(tmp_path):
    # version 1 named default stores <label>-<key prefix>.sqlite
    from cyclewright.cycles.scan.store import default_store_path

    m = maps.get("5x+1")
    scans = default_store_path(m).parent
    scans.mkdir(parents=True)
    legacy = scans / f"5x+1-{m.key[:12]}.sqlite"
    _, ref = _v1_store(tmp_path, path=legacy)
    lines = []
    r = scan(m, 600, max_steps=300, notice=lines.append, **KW)
    assert _essentials(r) == _essentials(ref) and r.computed == 0
    assert not legacy.exists() and default_store_path(m).is_file()
    assert len(lines) == 1 and "migrated" in lines[0]
