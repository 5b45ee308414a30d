"""Result types carry their presentation: one table per figure, one label per figure.

The CLI commands and the study report render the tables the results build
(cyclewright/cycles/presentation.py), so a figure has the same column name
and label wherever it is shown, and the study builds no table of its own.
"""

from __future__ import annotations

import ast
import json
import pathlib

import cyclewright as cw
from cyclewright.cli.study import run_study
from cyclewright.cli.studyfile import parse_study
from cyclewright.cycles.presentation import Table

ROOT = pathlib.Path(__file__).resolve().parents[1]


def _imports(path: pathlib.Path) -> set[str]:
    out = set()
    for node in ast.walk(ast.parse(path.read_text())):
        if isinstance(node, ast.ImportFrom):
            out.add(("." * node.level) + (node.module or ""))
        elif isinstance(node, ast.Import):
            out.update(a.name for a in node.names)
    return out


def test_study_imports_no_command_module():
    # common practice, no source: the report renders results, it does not borrow from commands
    mods = _imports(ROOT / "cyclewright" / "cli" / "study.py")
    assert not [m for m in mods if "commands" in m]


def _calls(path: pathlib.Path) -> set[str]:
    out = set()
    for node in ast.walk(ast.parse(path.read_text())):
        if isinstance(node, ast.Call):
            f = node.func
            out.add(f.id if isinstance(f, ast.Name) else getattr(f, "attr", ""))
    return out


def test_compare_and_demo_render_the_comparisons_own_tables():
    # common practice, no source: the commands render Comparison.overview() (and the
    # predictions' tables); neither builds a table of figures by hand
    for name in ("compare_cmd.py", "demo_cmd.py"):
        calls = _calls(ROOT / "cyclewright" / "cli" / "commands" / name)
        assert "make_table" not in calls and "show_table" in calls, name
        assert "overview" in calls or "overview_table" in calls, name


def _well_formed(t: Table) -> None:
    assert t.title and t.columns
    assert all(len(row) == len(t.columns) for row in t.rows)
    assert set(t.labels) <= set(t.columns)


def test_every_result_table_is_well_formed():
    # common practice, no source
    tables = [
        *cw.scan("3x+5", 400, store=False, workers=1).tables(),
        *cw.census("3x+1", 12, side="both", store=False, workers=1).tables(),
        cw.census_family("3x+k", range(1, 8), 12, store=False, workers=1).table(),
        cw.functional_graph("3x+1", 30, side="both").table(),
        cw.count("3x+5", 5, 3).table(),
        cw.sweep("3x+1", range(1, 8)).table(),
        cw.sweep("3x+1", range(1, 8)).summary_table(),
    ]
    from cyclewright.cycles.floors import floor_table

    tables.append(floor_table(cw.floor("3x+1", 16, side="both")))
    cmp = cw.compare(["3x+1"], max_length=8, to=200, odd=3, store=False, workers=1)
    tables.append(cmp.table())
    tables.append(cmp.overview())
    tables += [p.predictions.table() for p in cmp.profiles if p.predictions is not None]
    for t in tables:
        _well_formed(t)


def test_scan_cycles_carry_the_same_label_in_the_api_and_the_study(tmp_path):
    # OEIS A226607: 3x+5 has the cycles with minima 1, 5, 19, 23, 187, 347 up to 400
    r = cw.scan("3x+5", 400, store=False, workers=1)
    counts, cycles = r.tables()
    assert [row[0] for row in cycles.rows] == [1, 5, 19, 23, 187, 347]
    assert cycles.labels["minimum"] == r.label == "certified"
    study = parse_study(
        {
            "study": {"title": "labels"},
            "maps": {"use": ["3x+5"]},
            "analysis": [{"kind": "scan", "to": 400}],
        },
        origin="test",
    )
    run_study(study, tmp_path / "out", workers=1, say=lambda _msg: None)
    docs = {p.name: json.loads(p.read_text()) for p in (tmp_path / "out").glob("*.json")}
    scan_cycles = next(d for name, d in docs.items() if "scan-cycles" in name)
    scan_counts = next(d for name, d in docs.items() if "scan-counts" in name)
    assert scan_cycles["labels"] == cycles.labels
    assert scan_counts["labels"] == counts.labels
    assert [row["minimum"] for row in scan_cycles["rows"]] == [1, 5, 19, 23, 187, 347]


def test_stacked_tables_never_label_a_figure_more_than_it_is():
    # common practice, no source: 5x+1 leaves starts unresolved (its orbits climb past the cap),
    # so its minima are exact finds, not a certified list; 3x+1's scan to 100 is complete
    done = cw.scan("3x+1", 100, store=False, workers=1)
    open_ = cw.scan("5x+1", 100, max_steps=50, store=False, workers=1)
    assert done.complete and not open_.complete
    t = Table.stack([done.table(), open_.table()])
    assert "minimum" not in t.labels
    per_row = [r[t.columns.index("minimum label")] for r in t.rows]
    assert set(per_row) == {"certified", "exact"}
