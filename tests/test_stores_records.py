"""Records stores as first-class stores, and when compare and studies keep one.

- ``cyclewright stores list`` / ``stores remove`` and :func:`cyclewright.stores`
  show and remove the records stores (``<key>-records.db``) beside the scan
  stores, with the same refusals (not a store, a store in use).
- compare and a study's records keep a records store only when asked or for
  :data:`~cyclewright.cycles.records.RECORDS_STORE_ABOVE` starts or more; a
  store asked for is reused by a repeated run, and the reuse line says so.
"""

from __future__ import annotations

import json
import sqlite3
from pathlib import Path

import pytest
from conftest import run_cli

import cyclewright as cw
from cyclewright import maps
from cyclewright.cli.study import run_study
from cyclewright.cli.studyfile import load_study
from cyclewright.cycles.compare import compare
from cyclewright.cycles.errors import StoreError
from cyclewright.cycles.files import data_dir
from cyclewright.cycles.records import RECORDS_STORE_ABOVE, records, store_for_part
from cyclewright.cycles.records_store import RecordsStore, default_records_path
from cyclewright.cycles.scan import scan
from cyclewright.cycles.scan.store import default_store_path
from cyclewright.cycles.stores import remove_results_store, store_kind, stores


def _records_files(*roots: Path) -> list[Path]:
    return sorted(p for r in roots if r.is_dir() for p in r.rglob("*-records.db"))


# ----------------------------------------------------------------- listing
def test_records_stores_are_listed_beside_scan_stores():
    # common practice, no source: a listing shows every file the program keeps
    scan("3x+7", 3000, workers=1, chunk_size=500)
    r = records("3x+1", 2000, side="both", workers=1, chunk_size=1000)
    assert r.store == str(default_records_path("3x+1"))
    listing = stores()
    kinds = {(e.kind, e.info["map_label"]) for e in listing.entries}
    assert kinds == {("scan", "3x+7"), ("records", "3x+1")}
    (rec,) = listing.of_kind("records")
    assert rec.covered == (
        "positive 1..2000 (2,000 starts, cap 1000); negative 1..2000 (2,000 starts, cap 1000)"
    )
    assert rec.checks == "checksums of 6 chunks ok"  # grid chunks [1, 999], [1000, 1999], [2000]
    assert rec.info["formula"] == maps.get("3x+1").formula()
    t = listing.table()
    assert t.columns == ("kind", "map", "covered", "size", "age", "checks", "file")
    assert {row[0] for row in t.rows} == {"scan", "records"}
    over = {row[0]: row[1] for row in listing.overview().rows}
    assert over["scan"] == 1 and over["records"] == 1
    # notebooks: HTML tables from the same result
    html = cw.stores()._repr_html_()
    assert html.count("<table>") == 2 and "-records.db" in html

    out = run_cli("stores", "list", "--json")
    assert out.returncode == 0, out.stderr
    doc = json.loads(out.stdout)
    by_kind = {s["kind"]: s for s in doc["stores"]}
    assert set(by_kind) == {"scan", "records"}
    assert [(x["side"], x["lowest"], x["highest"]) for x in by_kind["records"]["records"]] == [
        ("positive", 1, 2000),
        ("negative", 1, 2000),
    ]
    assert by_kind["records"]["chunks_damaged"] == 0 and by_kind["records"]["size"] > 0
    text = run_cli("stores", "list", env={"COLUMNS": "400"})
    assert text.returncode == 0 and "records" in text.stdout and "-records.db" in text.stdout
    tex = run_cli("stores", "list", "--latex")
    assert tex.returncode == 0 and "\\begin{tabular}" in tex.stdout
    assert "records & 3x+1" in tex.stdout


def test_a_damaged_records_chunk_shows_in_the_checks(tmp_path):
    # common practice, no source: a checksum mismatch is reported, never read back
    records("3x+1", 3000, side="positive", workers=1, chunk_size=1000, store=tmp_path)
    path = tmp_path / default_records_path("3x+1").name
    conn = sqlite3.connect(path)
    conn.execute("UPDATE chunks SET checksum = 'x' WHERE lo = 1000")
    conn.commit()
    conn.close()
    (entry,) = stores(tmp_path).entries
    assert entry.checks == "1 of 4 chunks damaged (recomputed when next used)"
    assert entry.covered == "positive 1..3000 (2,000 starts, cap 1000)"
    # one file given: listed alone, its kind read from its content
    assert [e.kind for e in stores(path).entries] == ["records"]


# ----------------------------------------------------------------- removing
def test_remove_map_takes_both_of_its_stores():
    scan("3x+1", 1000, workers=1, side="positive")
    records("3x+1", 1000, side="positive", workers=1)
    records("3x+5", 1000, side="positive", workers=1)
    both = (default_store_path("3x+1"), default_records_path("3x+1"))
    assert all(p.exists() for p in both)
    out = run_cli("stores", "remove", "3x+1")
    assert out.returncode == 0, out.stderr
    assert not any(p.exists() for p in both)
    assert "2 stores removed" in out.stdout
    assert [e.info["map_label"] for e in stores().entries] == ["3x+5"]
    # --store FILE: a records store by its content
    out = run_cli("stores", "remove", "--store", str(default_records_path("3x+5")), "--json")
    assert out.returncode == 0, out.stderr
    assert json.loads(out.stdout)["removed"] == [str(default_records_path("3x+5"))]
    assert stores().entries == ()
    missing = run_cli("stores", "remove", "3x+5")
    assert missing.returncode == 2 and missing.stderr.startswith("error: ")
    assert missing.stderr.count("\n") == 1


def test_a_records_store_in_use_or_foreign_is_not_removed(tmp_path):
    # common practice, no source: removing never takes a file in use or not ours
    path = tmp_path / default_records_path("3x+1").name
    records("3x+1", 500, side="positive", workers=1, store=path)
    before = stores(path).entries[0].info["records"]
    with RecordsStore(path, maps.get("3x+1")):  # this process has it open
        out = run_cli("stores", "remove", "--store", str(path))
        assert out.returncode == 2 and "in use by process" in out.stderr
        assert "Traceback" not in out.stderr and out.stderr.count("\n") == 1
        # the directory form checks every file before removing any
        out = run_cli("stores", "remove", "--store", str(tmp_path))
        assert out.returncode == 2 and "nothing was removed" in out.stderr
    assert stores(path).entries[0].info["records"] == before  # every chunk still there
    # closed again: it goes
    assert remove_results_store(path) > 0 and not path.exists()
    foreign = tmp_path / "notes-records.db"
    foreign.write_text("not a store")
    assert store_kind(foreign) is None
    with pytest.raises(StoreError, match="not a cyclewright results store"):
        remove_results_store(foreign)
    out = run_cli("stores", "remove", "--store", str(foreign))
    assert out.returncode == 2 and foreign.read_text() == "not a store"


# ----------------------------------------------------------------- when one is kept
def test_store_for_part_rule():
    # common practice, no source: the family census rule (no store for small work unless asked)
    from cyclewright.cycles.census import FAMILY_STORE_ABOVE

    assert RECORDS_STORE_ABOVE == FAMILY_STORE_ABOVE
    assert store_for_part(None, RECORDS_STORE_ABOVE - 1) is False
    assert store_for_part(None, RECORDS_STORE_ABOVE) is None
    assert store_for_part("d", 1) == "d" and store_for_part(False, 10**9) is False
    assert store_for_part(None, 1, asked=True) is None
    assert store_for_part("d", 10**9, asked=False) is False


def test_small_compare_leaves_no_records_store_unless_asked(tmp_path):
    # common practice, no source: a command leaves no file behind that was not asked for
    kw = {"max_length": 8, "to": 300, "odd": 3, "workers": 1}
    cmp = compare(["3x+1", "3x+5"], **kw)
    assert _records_files(data_dir(), tmp_path) == []
    assert all(p.extras["records"].store is None for p in cmp.profiles)
    out = run_cli("compare", "3x+1", "--max-length", "8", "--to", "300", "--odd", "3", "--no-store")
    assert out.returncode == 0, out.stderr
    assert _records_files(data_dir(), tmp_path) == []
    # asked for: kept in the directory given, and reused by the same run again
    where = tmp_path / "cmp-stores"
    args = ["compare", "3x+1", "3x+5", "--max-length", "8", "--to", "300", "--odd", "3"]
    first = run_cli(*args, "--store", str(where), "--workers", "1")
    assert first.returncode == 0, first.stderr
    assert [p.name for p in _records_files(where)] == sorted(
        default_records_path(m).name for m in ("3x+1", "3x+5")
    )
    again = run_cli(*args, "--store", str(where), "--workers", "1")
    assert again.returncode == 0, again.stderr
    (line,) = [x for x in again.stdout.splitlines() if x.startswith("stored results: ")]
    assert ", 0 computed in this run (0 starts)" in line
    # the records' chunks are among those reused
    cmp = compare(["3x+1"], store=where, **kw)
    rec = cmp.profiles[0].extras["records"]
    assert rec.chunks_reused == rec.chunks_total >= 1 and rec.store_use.stored
    assert cmp.store_use.starts_computed == 0


_STUDY = """
[study]
title = "records stores"

[maps]
use = ["3x+1"]

[[analysis]]
kind = "records"
to = 2000
plot = false
{store}

[[analysis]]
kind = "compare"
max_length = 8
to = 300
odd = 3
plot = false
{store}
"""


def _study(text: str, where: Path):
    where.mkdir(parents=True, exist_ok=True)
    (where / "t.toml").write_text(text)
    return load_study(where / "t.toml")


def test_small_study_leaves_no_records_store_unless_asked(tmp_path):
    # common practice, no source: a study keeps what it was asked to keep
    out = tmp_path / "plain"
    run_study(_study(_STUDY.format(store=""), tmp_path / "src1"), out, workers=1)
    assert _records_files(out, data_dir()) == []
    md = (out / "report.md").read_text()
    assert "Stored results: none (no store kept)" in md  # the records section says so

    asked = tmp_path / "asked"
    study = _study(_STUDY.format(store="store = true"), tmp_path / "src2")
    run_study(study, asked, workers=1)
    assert [p.name for p in _records_files(asked)] == [default_records_path("3x+1").name]
    assert _records_files(data_dir()) == []
    assert (asked / "stores" / default_records_path("3x+1").name).is_file()
    run_study(study, asked, workers=1)  # the same study again, in its folder
    md = (asked / "report.md").read_text()
    records_part = md.split("## Records over the starts", 1)[1].split("\n## ", 1)[0]
    assert "Stored results: 1 of 1 chunks reused from the store (2,000 starts)" in records_part
    assert ", 0 computed in this run (0 starts)." in records_part
    doc = json.loads((asked / "study.json").read_text())
    assert doc["store_use"]["total"]["starts_computed"] == 0

    # store = false: none, even where it would be kept
    none = _study(_STUDY.format(store="store = false"), tmp_path / "src3")
    assert all(a.params["store"] is False for a in none.analyses)


def test_a_directory_of_stores_leaves_other_files_alone(tmp_path):
    # common practice, no source: removing "every store" of a folder takes stores only
    records("3x+1", 300, side="positive", workers=1, store=tmp_path)
    scan("3x+5", 300, workers=1, store=tmp_path)
    notes = tmp_path / "notes.sqlite"
    notes.write_text("my own notes")
    assert {e.kind for e in stores(tmp_path).entries} == {"scan", "records"}
    out = run_cli("stores", "remove", "--store", str(tmp_path), "--json")
    assert out.returncode == 0, out.stderr
    doc = json.loads(out.stdout)
    assert len(doc["removed"]) == 2 and doc["skipped_not_stores"] == [str(notes)]
    assert notes.read_text() == "my own notes"
    assert (
        _records_files(tmp_path) == [] and not (tmp_path / default_store_path("3x+5").name).exists()
    )
