"""Every output says when stored results were reused: scan, census, family census, compare, study.

A second run over the same store computes nothing and says so (chunks and
starts reused); the results are the same as the first run's.
"""

from __future__ import annotations

import json

import pytest
from conftest import run_cli

from cyclewright import maps
from cyclewright.cycles.census import census, census_family
from cyclewright.cycles.compare import compare
from cyclewright.cycles.errors import InputError
from cyclewright.cycles.scan import StoreUse, scan


def _twice(fn):
    first, second = fn(), fn()
    return first, second


def test_scan_result_store_use(tmp_path):
    store = tmp_path / "s.sqlite"
    first, second = _twice(
        lambda: scan("3x+5", 500, store=store, workers=1, chunk_size=100, side="both")
    )
    assert first.store_use == StoreUse(
        0, 12, 0, 1000, True
    )  # chunks on the grid of 100: [1, 99] ... [500, 500]
    assert second.store_use == StoreUse(12, 0, 1000, 0, True)
    assert second.to_dict()["store_use"]["reused"] is True
    none = scan("3x+5", 500, store=False, workers=1, chunk_size=100)
    assert not none.store_use.stored and "no store kept" in none.store_use.line()


def test_census_counts_what_it_reused(tmp_path):
    # OEIS A226607: the positive cycle minima of 3x+5 are 1, 5, 19, 23, 187, 347
    first, second = _twice(lambda: census("3x+5", 30, side="positive", store=tmp_path, workers=1))
    assert first.minima_on("positive") == second.minima_on("positive") == (1, 5, 19, 23, 187, 347)
    assert first.store_use.chunks_reused == 0 and first.store_use.starts_computed > 0
    assert second.store_use.chunks_computed == 0 and second.store_use.starts_computed == 0
    assert second.store_use.chunks_reused == first.store_use.chunks_computed
    assert second.to_dict()["store_use"]["reused"] is True
    # a census by itineraries alone scans nothing and says so
    words = census("mod3-4x", 12, store=tmp_path)
    assert words.store_use.chunks == 0 and "nothing was scanned" in words.store_use.line()


def test_family_and_compare_add_up_their_members(tmp_path):
    first, second = _twice(
        lambda: census_family("3x+k", range(1, 8), 20, store=tmp_path, workers=1)
    )
    # Lagarias 1990 / OEIS A226607: 3x+5 has the primitive cycles 1, 19, 23 at length <= 20
    assert first.records() == second.records()
    assert first.store_use.chunks_reused == 0
    assert second.store_use == StoreUse(
        first.store_use.chunks_computed, 0, first.store_use.starts_computed, 0, True
    )
    assert second.store_use == StoreUse.total(r.store_use for r in second.rows)
    assert second.to_dict()["store_use"]["chunks_computed"] == 0

    ms = [maps.get("3x+1"), maps.get("5x+1")]
    kw = dict(max_length=12, to=1000, odd=5, store=tmp_path, workers=1)
    c1, c2 = _twice(lambda: compare(ms, **kw))
    # from memory: 3x+1 has the cycles 1, -1, -5, -17; 5x+1 has 1, 13, 17, -1 (length <= 12)
    assert [r["census_minima"] for r in c2.rows()] == [[1, -1, -5, -17], [1, 13, 17, -1]]
    assert c1.store_use.chunks_computed > 0 and c2.store_use.chunks_computed == 0
    assert c2.store_use.chunks_reused == c1.store_use.chunks_computed
    assert c2.to_dict()["store_use"]["reused"] is True


def test_census_command_says_it_reused(tmp_path):
    args = ("census", "3x+5", "--max-length", "30", "--store", str(tmp_path / "st"))
    first = run_cli(*args, "--workers", "1")
    assert first.returncode == 0, first.stderr
    assert "stored results: 0 of" in first.stdout
    again = run_cli(*args, "--workers", "1")
    line = [x for x in again.stdout.splitlines() if x.startswith("stored results:")]
    assert len(line) == 1 and ", 0 computed in this run (0 starts)" in line[0]
    doc = json.loads(run_cli(*args, "--json").stdout)
    assert doc["store_use"]["reused"] is True and doc["store_use"]["starts_computed"] == 0


def test_family_census_command_says_it_reused(tmp_path):
    args = ("census", "3x+k", "--offsets", "1..7", "--max-length", "20")
    args += ("--store", str(tmp_path / "st"), "--workers", "1")
    first = run_cli(*args)
    assert first.returncode == 0, first.stderr
    assert "stored results: 0 of" in first.stdout
    doc = json.loads(run_cli(*args, "--json").stdout)
    assert doc["store_use"]["reused"] is True and doc["store_use"]["chunks_computed"] == 0


def test_compare_command_says_it_reused(tmp_path):
    args = ("compare", "3x+1", "5x+1", "--max-length", "12", "--to", "1000", "--odd", "5")
    args += ("--store", str(tmp_path / "st"), "--workers", "1")
    first = run_cli(*args)
    assert first.returncode == 0, first.stderr
    assert "stored results: 0 of" in first.stdout
    again = run_cli(*args)
    assert ", 0 computed in this run (0 starts)" in again.stdout
    doc = json.loads(run_cli(*args, "--json").stdout)
    assert doc["store_use"]["reused"] is True and doc["store_use"]["chunks_computed"] == 0


STUDY = """
[study]
title = "Reuse check"

[maps]
use = ["3x+5"]

[[analysis]]
kind = "scan"
to = 3000

[[analysis]]
kind = "census"
max_length = 20
"""


def test_study_says_it_reused_in_report_json_and_terminal(tmp_path):
    src = tmp_path / "s.toml"
    src.write_text(STUDY)
    out = tmp_path / "out"
    first = run_cli("study", str(src), "--out", str(out), "--workers", "1")
    assert first.returncode == 0, first.stderr
    assert "stored results: 0 of" in first.stdout
    md = (out / "report.md").read_text()
    assert md.count("Stored results: 0 of") == 2  # the scan and the census section
    doc = json.loads((out / "study.json").read_text())
    assert doc["store_use"]["total"]["chunks_reused"] == 0
    data = {p.name: p.read_bytes() for p in out.glob("*.csv")}
    again = run_cli("study", str(src), "--out", str(out), "--workers", "1")
    assert again.returncode == 0, again.stderr
    assert ", 0 computed in this run (0 starts)" in again.stdout
    md = (out / "report.md").read_text()
    assert md.count(", 0 computed in this run (0 starts).") == 2
    doc = json.loads((out / "study.json").read_text())
    assert doc["store_use"]["total"]["reused"] and not doc["store_use"]["total"]["chunks_computed"]
    assert set(doc["store_use"]["sections"]) == {
        "Integer cycles by scan (1..3000, positive)",
        "Certified census up to length 20 (positive)",
    }
    # the data files stay byte for byte the same
    assert {p.name: p.read_bytes() for p in out.glob("*.csv")} == data


def test_one_store_file_for_several_maps_is_refused_before_any_work(tmp_path):
    # a store holds one map definition: several maps need a directory of stores
    one = tmp_path / "one.sqlite"
    with pytest.raises(InputError, match="needs a directory of stores"):
        compare(["3x+1", "5x+1"], max_length=8, to=200, odd=3, store=one, workers=1)
    with pytest.raises(InputError, match="needs a directory of stores"):
        census_family("3x+k", range(1, 8), 20, store=one, workers=1)
    assert not one.exists()
    # one map (under two names) may share one file
    c = compare(["3x+1", "3x+1"], max_length=8, to=200, odd=3, store=one, workers=1)
    assert c.store_use.chunks_reused > 0  # the second profile reads what the first stored
    for args in (
        ("compare", "3x+1", "5x+1", "--max-length", "8", "--to", "200", "--odd", "3"),
        ("census", "3x+k", "--offsets", "1..7", "--max-length", "20"),
    ):
        r = run_cli(*args, "--store", str(tmp_path / "two.sqlite"))
        assert r.returncode == 2 and r.stderr.count("\n") == 1, r.stderr
        assert "needs a directory of stores" in r.stderr and not r.stdout
        assert not (tmp_path / "two.sqlite").exists()
