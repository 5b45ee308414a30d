"""A store never returns a wrong result: checksums, counts, cycles re-proved on reading.

Every damaged chunk is recomputed (or, with ``recompute=False`` /
``--no-recompute``, refused); a run never reports what a damaged store says.
"""

from __future__ import annotations

import contextlib
import io
import json
import os
import shutil
import sqlite3
import subprocess
import sys
import tempfile
from pathlib import Path

import pytest

from cyclewright import maps
from cyclewright.cycles.errors import StoreError
from cyclewright.cycles.scan import scan
from cyclewright.cycles.scan.store import ScanStore


def _essentials(r):
    return (
        r.counts,
        r.cycles,
        r.unresolved_count,
        r.unresolved_escaped,
        r.unresolved_first,
        r.sieved,
    )


def _btree_bytes(data: bytes, first_page: int) -> list[int]:
    """Offsets of the used bytes (header, cell pointers, cells) of every b-tree page.

    Page layout from the SQLite file format documentation (sqlite.org/fileformat.html):
    common practice, no source beyond the format itself.
    """
    ps = int.from_bytes(data[16:18], "big")
    ps = 65536 if ps == 1 else ps
    out = []
    for page in range(first_page - 1, len(data) // ps):
        base = page * ps
        h = base + (100 if page == 0 else 0)
        kind = data[h]
        if kind not in (2, 5, 10, 13):
            continue
        header = 8 if kind in (10, 13) else 12
        cells = int.from_bytes(data[h + 3 : h + 5], "big")
        content = int.from_bytes(data[h + 5 : h + 7], "big") or 65536
        out.extend(range(h, h + header + 2 * cells))
        out.extend(range(base + content, base + ps))
    return out


@pytest.fixture
def fast_dir(tmp_path):
    """A directory in memory when the system has one (thousands of small commits), else tmp_path."""
    shm = Path("/dev/shm")
    if shm.is_dir() and os.access(shm, os.W_OK):
        d = Path(tempfile.mkdtemp(prefix="cyclewright-test-", dir=shm))
        yield d
        shutil.rmtree(d, ignore_errors=True)
    else:
        yield tmp_path


def test_every_flipped_byte_of_the_data_pages_is_caught(fast_dir):
    tmp_path = fast_dir
    # 5x+1 with a small cap: every kind of row is present (cycles on both
    # sides, a start entering another cycle, unresolved and escaping starts).
    m = maps.get("5x+1")
    kw = dict(side="both", chunk_size=100, workers=1, max_steps=600)
    ref_path = tmp_path / "ref.sqlite"
    reference = _essentials(scan(m, 200, store=ref_path, **kw))
    # sanity of the reference itself: 5x+1 has the positive cycles of minima
    # 1, 13, 17 (Lagarias 1985, section 2, the 5x+1 example; from memory)
    assert [c.minimum for c in reference[1] if c.minimum > 0] == [1, 13, 17]
    assert reference[2]["positive"] > 0 and reference[3]["positive"] > 0
    data = ref_path.read_bytes()
    offsets = _btree_bytes(data, first_page=2)  # page 1 holds the schema: checked below
    assert len(offsets) > 1000
    target = tmp_path / "t.sqlite"
    seen = {"same": 0, "recomputed": 0, "refused": 0}
    for off in offsets:
        damaged = bytearray(data)
        damaged[off] ^= 0xFF
        target.write_bytes(bytes(damaged))
        try:
            with contextlib.redirect_stderr(io.StringIO()):
                r = scan(m, 200, store=target, **kw)
        except StoreError:
            seen["refused"] += 1
            continue
        assert _essentials(r) == reference, f"byte {off} flipped: a wrong result was reported"
        seen["recomputed" if r.computed else "same"] += 1
    assert seen["recomputed"] > 0 and sum(seen.values()) == len(offsets)


def test_flipped_schema_bytes_are_refused_or_harmless(fast_dir):
    tmp_path = fast_dir
    m = maps.get("3x+1")
    kw = dict(side="both", chunk_size=50, workers=1)
    ref_path = tmp_path / "ref.sqlite"
    reference = _essentials(scan(m, 100, store=ref_path, **kw))
    data = ref_path.read_bytes()
    ps = int.from_bytes(data[16:18], "big")
    target = tmp_path / "t.sqlite"
    for off in range(0, ps, 3):  # every third byte of the first page (header and schema)
        damaged = bytearray(data)
        damaged[off] ^= 0xFF
        target.write_bytes(bytes(damaged))
        try:
            with contextlib.redirect_stderr(io.StringIO()):
                r = scan(m, 100, store=target, **kw)
        except StoreError:
            continue
        assert _essentials(r) == reference, f"byte {off} flipped: a wrong result was reported"


def _store(tmp_path, name, to, **kw):
    path = tmp_path / f"{name}.sqlite"
    r = scan(maps.get(name), to, store=path, workers=1, chunk_size=100, **kw)
    return path, r


def _rescan(path, lines):
    return scan(
        maps.get("3x+1"),
        300,
        store=path,
        workers=1,
        chunk_size=100,
        side="both",
        notice=lines.append,
    )


def test_negative_count_is_recomputed_with_one_line(tmp_path, capsys):
    path, ref = _store(tmp_path, "3x+1", 300, side="both")
    conn = sqlite3.connect(path)
    conn.execute("UPDATE chunks SET drops = -drops, cycles = cycles WHERE lo = 1")
    conn.commit()
    conn.close()
    lines = []
    again = _rescan(path, lines)
    assert _essentials(again) == _essentials(ref)
    assert again.computed == 2 * 99  # the two damaged chunks [1, 99], one per side
    assert len(lines) == 2 and all("damaged" in x and "recomputing" in x for x in lines)
    # repaired: the next run reuses everything and says nothing
    lines.clear()
    third = _rescan(path, lines)
    assert third.computed == 0 and lines == [] and _essentials(third) == _essentials(ref)


def test_a_cycle_with_a_forged_checksum_is_re_proved_and_rejected(tmp_path):
    # The negative 3x+1 cycle of minimum -17 passes through -82 (Lagarias 1985:
    # the three negative cycles -1, -5, -17). Turn -82 into 82 in the stored
    # record and forge a matching checksum: the exact re-proof still rejects it.
    path, ref = _store(tmp_path, "3x+1", 100, side="negative")
    m = maps.get("3x+1")
    conn = sqlite3.connect(path)
    rec = conn.execute("SELECT record FROM cycles WHERE minimum = -17").fetchone()[0]
    assert "-82" in rec
    conn.execute("UPDATE cycles SET record = ? WHERE minimum = -17", (rec.replace("-82", "82"),))
    conn.commit()
    conn.close()
    with ScanStore(path, m) as st:
        sid = st.scan_id("negative", 1000, None)
        row = st._conn.execute(
            "SELECT drops, cycles, other_cycle, unresolved, beyond_length, sieved, sieve_depth"
            " FROM chunks WHERE lo = 1"
        ).fetchone()
        cyc, unres = st._chunk_parts(sid, 1, 99)
        digest = st._digest(st._config(sid), 1, 99, row[:5], row[5], row[6], cyc, unres)
        with st._conn:
            st._conn.execute("UPDATE chunks SET checksum = ? WHERE lo = 1", (digest,))
        assert st.check(sid, [(1, 99)]).damaged == []  # the checksum alone is fooled
    lines = []
    with pytest.raises(StoreError, match="re-proof|refused"):
        scan(m, 100, store=path, workers=1, chunk_size=100, side="negative", recompute=False)
    again = scan(
        m, 100, store=path, workers=1, chunk_size=100, side="negative", notice=lines.append
    )
    assert _essentials(again) == _essentials(ref)
    assert -82 in again.cycles[2].elements and len(lines) == 1


def test_more_escaped_than_unresolved_is_caught(tmp_path):
    path, ref = _store(tmp_path, "5x+1", 200, max_steps=600)
    conn = sqlite3.connect(path)
    conn.execute("UPDATE unresolved SET escaped = zeroblob(length(escaped) + 8) WHERE lo = 1")
    conn.commit()
    conn.close()
    again = scan(
        maps.get("5x+1"), 200, store=path, workers=1, chunk_size=100, max_steps=600, notice=print
    )
    assert _essentials(again) == _essentials(ref)


def test_cli_no_recompute_refuses_with_one_line_and_keeps_the_file(tmp_path):
    path, _ = _store(tmp_path, "3x+1", 300)
    conn = sqlite3.connect(path)
    conn.execute("UPDATE chunks SET drops = drops + 1, other_cycle = other_cycle WHERE lo = 100")
    conn.commit()
    conn.close()
    before = path.read_bytes()
    args = [sys.executable, "-m", "cyclewright", "scan", "3x+1", "--to", "300"]
    args += ["--chunk-size", "100", "--workers", "1", "--store", str(path)]
    p = subprocess.run([*args, "--no-recompute"], capture_output=True, text=True, timeout=300)
    assert p.returncode == 2 and p.stdout == ""
    assert p.stderr.count("\n") == 1 and p.stderr.startswith("error: store ")
    assert "damaged" in p.stderr and "[100, 199]" in p.stderr
    assert path.read_bytes() == before
    p = subprocess.run([*args, "--json"], capture_output=True, text=True, timeout=300)
    assert p.returncode == 0, p.stderr
    assert p.stderr.count("damaged") == 1 and "recomputing" in p.stderr
    doc = json.loads(p.stdout)
    # 3x+1: every positive start up to 300 reaches the cycle of 1 (common practice, no source)
    assert doc["counts"]["positive"]["drops"] == 299 and doc["minima"] == {"positive": [1]}


def test_a_full_disk_is_one_line_and_keeps_what_was_finished(tmp_path):
    # SQLite answers "database or disk is full" when a file reaches its page
    # limit exactly as when the disk fills (sqlite.org/pragma.html#pragma_max_page_count).
    m = maps.get("5x+1")
    path = tmp_path / "full.sqlite"
    kw = dict(workers=1, chunk_size=500, max_steps=2000)
    scan(m, 1000, store=path, **kw)
    with ScanStore(path, m) as st:
        pages = st._conn.execute("PRAGMA page_count").fetchone()[0]
        st._conn.execute(f"PRAGMA max_page_count = {pages + 1}")
        with pytest.raises(StoreError, match="the disk is full") as err:
            scan(m, 20000, store=st, **kw)
        assert "\n" not in str(err.value) and "re-run" in str(err.value)
    again = scan(m, 20000, store=path, **kw)
    assert again.chunks_reused >= 2
    fresh = scan(m, 20000, store=False, **kw)
    assert _essentials(again) == _essentials(fresh)
