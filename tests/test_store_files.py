"""Files around the results: default stores keyed on the map, listing and removing them,
studies that never overwrite a hand-edited file and resume without a flag, and
written files that follow the umask."""

from __future__ import annotations

import json
import os
import sqlite3
import stat
import subprocess
import sys
import time
from pathlib import Path

import pytest
from conftest import run_cli

from cyclewright import maps
from cyclewright.cli.files import atomic_write as cli_atomic_write
from cyclewright.cycles.errors import StoreError
from cyclewright.cycles.files import atomic_write, file_mode
from cyclewright.cycles.scan import scan
from cyclewright.cycles.scan.store import default_store_path, list_stores, remove_store
from cyclewright.maps import Map


# ----------------------------------------------------------------- default stores
def test_every_name_of_a_map_shares_its_default_store():
    m = maps.get("3x+7")
    first = scan(m, 3000, workers=1, chunk_size=500)
    assert first.computed == 3000
    # the same definition under another name (as a TOML copy would give it)
    copy = Map(m.divisor, [tuple(b) for b in m.branches], name="my-copy")
    assert copy.key == m.key and copy.label != m.label
    again = scan(copy, 3000, workers=1, chunk_size=500)
    assert again.computed == 0 and again.chunks_reused == again.chunks_total
    assert again.store_path == first.store_path == str(default_store_path(m))
    assert (again.counts, again.cycles) == (first.counts, first.cycles)


def test_stores_list_and_remove(tmp_path):
    scan("3x+7", 3000, workers=1, chunk_size=500)
    scan("3x+1", 1000, workers=1, side="negative")
    r = run_cli("stores", "list", "--json")
    assert r.returncode == 0, r.stderr
    doc = json.loads(r.stdout)
    by_label = {s["map_label"]: s for s in doc["stores"]}
    assert set(by_label) == {"3x+7", "3x+1"}
    (seven,) = by_label["3x+7"]["scans"]
    assert (seven["lowest"], seven["highest"], seven["starts_done"]) == (1, 3000, 3000)
    assert by_label["3x+1"]["scans"][0]["side"] == "negative"
    assert by_label["3x+7"]["size"] > 0 and "cache" in doc
    table = run_cli("stores", "list")
    assert table.returncode == 0 and "3x+7" in table.stdout and "1..3000" in table.stdout
    gone = run_cli("stores", "remove", "3x+7")
    assert gone.returncode == 0, gone.stderr
    assert not Path(by_label["3x+7"]["path"]).exists()
    assert [s["map_label"] for s in list_stores()] == ["3x+1"]
    missing = run_cli("stores", "remove", "3x+7")
    assert missing.returncode == 2 and missing.stderr.startswith("error: ")
    assert missing.stderr.count("\n") == 1
    nothing = run_cli("stores", "remove")
    assert nothing.returncode == 2 and "say what to remove" in nothing.stderr


def test_a_store_in_use_is_not_removed(tmp_path):
    path = tmp_path / "busy.sqlite"
    scan("3x+1", 100, store=path, workers=1)
    conn = sqlite3.connect(path)
    host = __import__("socket").gethostname()
    conn.execute(
        "INSERT INTO runs (scan_id, lo, hi, chunk_size, code_version, pid, host, started_at,"
        " heartbeat, status) VALUES (1, 1, 9, 9, 'x', ?, ?, 'now', 0, 'running')",
        (os.getpid(), host),
    )
    conn.commit()
    conn.close()
    with pytest.raises(StoreError, match="in use"):
        remove_store(path)
    assert path.exists()


# ----------------------------------------------------------------- the umask
@pytest.mark.parametrize("mask", [0o022, 0o002, 0o077])
def test_written_files_follow_the_umask(tmp_path, mask):
    old = os.umask(mask)
    try:
        assert file_mode() == 0o666 & ~mask
        a = atomic_write(tmp_path / "a.json", lambda p: Path(p).write_text("{}"))
        b = cli_atomic_write(tmp_path / "b.csv", lambda fh: fh.write("x\n"))
        plain = tmp_path / "plain.txt"
        plain.write_text("a file any program would make")
    finally:
        os.umask(old)
    want = stat.S_IMODE(plain.stat().st_mode)  # what any new file gets (common practice, no source)
    assert want == 0o666 & ~mask
    for f in (a, b):
        assert stat.S_IMODE(f.stat().st_mode) == want, f


def test_certificates_and_graph_exports_follow_the_umask(tmp_path):
    out = tmp_path / "out"
    out.mkdir()

    def umask_022():
        os.umask(0o022)

    for args in (
        ["census", "3x+5", "--max-length", "12", "--certificate", str(out / "cert.json")],
        ["graph", "3x+5", "--to", "60", "--graphml", str(out / "g.graphml")],
    ):
        r = subprocess.run(
            [sys.executable, "-m", "cyclewright", *args],
            capture_output=True,
            text=True,
            timeout=600,
            preexec_fn=umask_022,
        )
        assert r.returncode == 0, r.stderr
    written = sorted(out.iterdir())
    assert len(written) == 2
    for f in written:
        assert stat.S_IMODE(f.stat().st_mode) == 0o644, f


# ----------------------------------------------------------------- studies
STUDY = """
[study]
title = "Overwrite check"
description = "A small study for the overwrite and resume checks."

[maps]
use = ["3x+1", "3x+5"]

[[analysis]]
kind = "scan"
to = 3000
maps = ["3x+5"]

[[analysis]]
kind = "count"
maps = ["3x+1"]
length = 13
odd = 8
"""


def test_study_refuses_to_overwrite_an_edited_report(tmp_path):
    src = tmp_path / "s.toml"
    src.write_text(STUDY)
    out = tmp_path / "out"
    first = run_cli("study", str(src), "--out", str(out), "--workers", "1")
    assert first.returncode == 0, first.stderr
    doc = json.loads((out / "study.json").read_text())
    assert doc["status"] == "complete" and "report.md" in doc["files"]
    # an untouched folder re-runs without a flag
    again = run_cli("study", str(src), "--out", str(out), "--workers", "1")
    assert again.returncode == 0, again.stderr
    report = out / "report.md"
    edited = report.read_text() + "\nMy notes on these results.\n"
    report.write_text(edited)
    refused = run_cli("study", str(src), "--out", str(out), "--workers", "1")
    assert refused.returncode == 2 and refused.stderr.count("\n") == 1
    assert "report.md" in refused.stderr and "changed since" in refused.stderr
    assert report.read_text() == edited
    forced = run_cli("study", str(src), "--out", str(out), "--workers", "1", "--force")
    assert forced.returncode == 0, forced.stderr
    assert "My notes" not in report.read_text()


def test_a_killed_study_resumes_in_its_folder_without_a_flag(tmp_path):
    src = tmp_path / "s.toml"
    src.write_text(STUDY.replace("to = 3000", "to = 3000000"))
    out = tmp_path / "out"
    proc = subprocess.Popen(
        [sys.executable, "-m", "cyclewright", "study", str(src), "--out", str(out)]
        + ["--workers", "1"],
        stdout=subprocess.DEVNULL,
        stderr=subprocess.DEVNULL,
        start_new_session=True,
    )
    deadline = time.monotonic() + 300
    while time.monotonic() < deadline and proc.poll() is None:
        if (out / "study.json").is_file() and (out / "stores").is_dir():
            break
        time.sleep(0.01)
    os.killpg(proc.pid, 9)
    proc.wait()
    assert (out / "study.json").is_file()  # marked as this study's from the start
    resumed = run_cli("study", str(src), "--out", str(out), "--workers", "1")
    assert resumed.returncode == 0, resumed.stderr
    assert json.loads((out / "study.json").read_text())["status"] == "complete"
    # the folder of another study is still refused
    other = tmp_path / "other.toml"
    other.write_text(STUDY.replace("Overwrite check", "Another study"))
    r = run_cli("study", str(other), "--out", str(out), "--workers", "1")
    assert r.returncode == 2 and "different study" in r.stderr


def test_study_files_follow_the_umask(tmp_path):
    src = tmp_path / "s.toml"
    src.write_text(STUDY)
    out = tmp_path / "out"
    r = subprocess.run(
        [sys.executable, "-m", "cyclewright", "study", str(src), "--out", str(out)]
        + ["--workers", "1"],
        capture_output=True,
        text=True,
        timeout=600,
        preexec_fn=lambda: os.umask(0o022),
    )
    assert r.returncode == 0, r.stderr
    files = [p for p in out.rglob("*") if p.is_file() and "stores" not in p.parts]
    assert len(files) > 5
    for f in files:  # tables, report, plots, study.json: shared like any new file
        assert stat.S_IMODE(f.stat().st_mode) == 0o644, f
