"""A capped value is never a number: compare's JSON and CSV show a cut peak as a bound, sign kept."""

from __future__ import annotations

import csv
import json

import pytest
from conftest import run_cli


@pytest.mark.slow
def test_compare_json_and_csv_show_cut_peaks_as_bounds(tmp_path):
    # common practice, no source: 5x+1 orbits from 7 on climb past 2^60 in int64 walks
    # (the walk is cut there), while 3x+1's peaks below 1000 are small and exact
    out_csv = tmp_path / "cmp.csv"
    res = run_cli(
        "compare", "5x+1", "3x+1", "--max-length", "6", "--to", "1000", "--odd", "4",
        "--no-store", "--csv", str(out_csv), "--json",
    )  # fmt: skip
    assert res.returncode == 0, res.stderr
    rows = {m["row"]["map"]: m["row"] for m in json.loads(res.stdout)["maps"]}
    five, three = rows["5x+1"], rows["3x+1"]
    assert isinstance(five["largest_peak"], str) and five["peak_walk_cut"]
    assert five["largest_peak"].lstrip("<> -").startswith("2^")
    sign = "<" if five["largest_peak_start"] < 0 else ">"
    assert five["largest_peak"].startswith(sign)  # the sign of a negative-side peak survives
    assert five["labels"]["largest_peak"] == "proved"
    assert isinstance(three["largest_peak"], int) and three["labels"]["largest_peak"] == "exact"
    assert (three["largest_peak"] < 0) == (three["largest_peak_start"] < 0)
    with out_csv.open() as fh:
        table = {r["map"]: r for r in csv.DictReader(fh)}
    assert table["5x+1"]["largest value reached"] == five["largest_peak"]
