"""The records store (cyclewright.cycles.records_store): reuse, resume, damage, refusal.

Checks are of the store's own promises (common practice, no source): a stored
result is the computed one, an interrupted run resumes to the same result, a
damaged chunk is recomputed and never reported.
"""

from __future__ import annotations

import os
import signal
import sqlite3
import subprocess
import sys
import time

import pytest

from cyclewright import maps
from cyclewright.cli.app import main
from cyclewright.cycles.errors import StoreError
from cyclewright.cycles.records import records
from cyclewright.cycles.records_store import RecordsStore, default_records_path


def _sides(r):
    return {k: v.to_dict() for k, v in r.sides.items()}


def test_repeated_run_reuses_every_chunk(tmp_path):
    plain = records("3x+5", 3000, side="both", chunk_size=500, store=False)
    first = records("3x+5", 3000, side="both", chunk_size=500, store=tmp_path)
    again = records("3x+5", 3000, side="both", chunk_size=500, store=tmp_path)
    assert first.chunks_total == again.chunks_total == 14  # 7 chunks of the fixed grid a side
    assert first.chunks_reused == 0 and again.chunks_reused == 14
    assert _sides(plain) == _sides(first) == _sides(again)
    assert again.to_dict()["store"]["reused"] == 14
    # another step cap is another configuration: nothing reused
    other = records("3x+5", 3000, side="both", chunk_size=500, store=tmp_path, max_steps=500)
    assert other.chunks_reused == 0


def test_interrupted_run_resumes_to_the_same_result(tmp_path):
    calls = []

    def stop_after_three(event):
        calls.append(event)
        if len(calls) == 3:
            raise KeyboardInterrupt

    with pytest.raises(KeyboardInterrupt):
        records("3x+1", 6000, chunk_size=700, store=tmp_path, workers=1, progress=stop_after_three)
    resumed = records("3x+1", 6000, chunk_size=700, store=tmp_path, workers=1)
    assert resumed.chunks_total == 9 and resumed.chunks_reused == 3  # 0-699 ... 5600-6000
    assert _sides(resumed) == _sides(records("3x+1", 6000, chunk_size=700, store=False))


def test_killed_process_resumes(tmp_path):
    # a subprocess killed while it runs leaves whole chunks only
    code = (
        "import cyclewright as cw\n"
        f"cw.records('3x+1', 3 * 10**6, chunk_size=50000, store={str(tmp_path)!r}, workers=1)\n"
    )
    p = subprocess.Popen([sys.executable, "-c", code], env=os.environ.copy())
    path = tmp_path / default_records_path(maps.get("3x+1")).name
    deadline = time.monotonic() + 120
    while time.monotonic() < deadline and p.poll() is None:
        if path.exists():
            with sqlite3.connect(path) as c:
                try:
                    if c.execute("SELECT COUNT(*) FROM chunks").fetchone()[0] >= 2:
                        break
                except sqlite3.OperationalError:
                    pass
        time.sleep(0.05)
    p.send_signal(signal.SIGKILL)
    p.wait()
    resumed = records("3x+1", 3 * 10**6, chunk_size=50000, store=tmp_path, workers=1)
    assert resumed.chunks_reused >= 2
    sd = resumed.sides["positive"]
    assert sd.resolved == 3 * 10**6 and sum(sd.delays.values()) == 3 * 10**6
    fresh = records("3x+1", 3 * 10**6, chunk_size=50000, store=False)
    assert _sides(resumed) == _sides(fresh)


def test_damaged_chunk_is_recomputed(tmp_path):
    first = records("3x-1", 2000, chunk_size=300, store=tmp_path)
    path = tmp_path / default_records_path(maps.get("3x-1")).name
    with sqlite3.connect(path) as c:
        lo, blob = c.execute(
            "SELECT lo, figures FROM chunks ORDER BY lo LIMIT 1 OFFSET 2"
        ).fetchone()
        bad = bytes([blob[0]]) + bytes([blob[1] ^ 0x40]) + blob[2:]
        c.execute("UPDATE chunks SET figures = ? WHERE lo = ?", (bad, lo))
        # a row whose checksum matches but whose figures do not add up is damaged too
        c.execute("UPDATE chunks SET checksum = 'x' WHERE lo = 1")
    again = records("3x-1", 2000, chunk_size=300, store=tmp_path)
    assert again.chunks_damaged == 2 and again.chunks_reused == again.chunks_total - 2
    assert _sides(again) == _sides(first)
    healed = records("3x-1", 2000, chunk_size=300, store=tmp_path)
    assert healed.chunks_damaged == 0 and healed.chunks_reused == healed.chunks_total


def test_store_of_another_map_or_not_a_store_is_refused(tmp_path):
    records("3x+1", 100, store=tmp_path)
    path = tmp_path / default_records_path(maps.get("3x+1")).name
    before = path.read_bytes()
    with pytest.raises(StoreError):
        RecordsStore(path, maps.get("3x+5"))
    assert path.read_bytes() == before
    junk = tmp_path / "junk-records.db"
    junk.write_bytes(b"not a database at all" * 50)
    with pytest.raises(StoreError):
        records("3x+1", 100, store=junk)
    assert junk.read_bytes() == b"not a database at all" * 50


def test_cli_says_when_stored_results_are_reused(capsys, tmp_path):
    args = ["records", "3x+1", "--to", "3000", "--workers", "1", "--store", str(tmp_path)]
    for expect in ("(0 reused from the store)", "(1 reused from the store)"):
        with pytest.raises(SystemExit) as exc:
            main(args)
        out, err = capsys.readouterr()
        assert exc.value.code == 0, err
        assert expect in out
    with pytest.raises(SystemExit) as exc:
        main([*args[:-2], "--no-store"])
    assert "store: not stored" in capsys.readouterr()[0]
