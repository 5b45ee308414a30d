"""The demo's summary table: its cycle counts come from the census whose K it states."""

from __future__ import annotations

import re

import tomllib

from cyclewright import maps
from cyclewright.cli.commands.demo_cmd import highlights
from cyclewright.cli.study import run_study
from cyclewright.cli.studyfile import parse_study
from cyclewright.cycles.census import census

# the census and the comparison use different lengths on purpose (K = 12 and 8):
# 3x+1's cycle with minimum -17 has length 11, so it is in one and not the other
STUDY = """
[study]
title = "Summary consistency"

[maps]
use = ["3x+1", "3x+5"]

[[analysis]]
kind = "census"
max_length = 12
side = "both"

[[analysis]]
kind = "compare"
max_length = 8
to = 500
odd = 5
max_steps = 300
plot = false
"""


def test_summary_counts_cycles_to_the_k_it_states(tmp_path):
    study = parse_study(tomllib.loads(STUDY), origin="summary.toml")
    run_study(study, tmp_path / "out", workers=1)
    table = highlights(study, tmp_path / "out")
    assert "census length K = 8" in str(table.title)  # the comparison's K, named
    assert str(table.columns[3].header).startswith("cycles of length <= 8 other than 0")
    cols = [[str(v) for v in c._cells] for c in table.columns]
    # "primitive / all" (or "of"): the two counts, whatever joins them
    got = {
        name: (tuple(int(v) for v in re.findall(r"\d+", cols[3][i])), cols[4][i])
        for i, name in enumerate(cols[0])
    }
    # Lagarias 1985 survey (Amer. Math. Monthly 92): the integer cycles of 3x+1 other than 0
    # have minima 1, -1, -5, -17; -17 has length 11 > 8, so the summary (K = 8) lists three
    # (the study's census at K = 12 lists four), and a census at the K it states agrees
    assert got["3x+1"] == ((3, 3), "1, -1, -5")
    c8 = census(maps.get("3x+1"), 8, side="both", store=False, workers=1)
    assert [x.minimum for x in c8.cycles if x.minimum] == [1, -1, -5]
    # common practice, no source (Lagarias 1990 for the notion): 5, -5 and -25 are 5 times
    # the 3x+1 cycles 1, -1 and -5, so not primitive; 1, 19, 23 are
    assert got["3x+5"] == ((3, 6), "1, 5, 19, 23, -5, -25")
    c12 = census(maps.get("3x+5"), 8, side="both", store=False, workers=1)
    assert {x.minimum for x in c12.cycles if not x.lagarias_primitive and x.minimum} == {5, -5, -25}
    # every label true in the report: the drift float is rounded, its closed form exact
    report = (tmp_path / "out" / "report.md").read_text()
    assert "drift per step [rounded]" in report
    assert "drift per step, exact form [exact]" in report
