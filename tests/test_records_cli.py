"""The ``records`` command, ``orbit --plot``, LaTeX tables and figure formats."""

from __future__ import annotations

import csv
import io
import json
from fractions import Fraction

import pytest
import tomllib

from cyclewright.cli.app import main
from cyclewright.cli.render import latex_table, tex_number
from cyclewright.cli.studyfile import parse_study


def run(capsys, *args):
    with pytest.raises(SystemExit) as exc:
        main(list(args))
    out, err = capsys.readouterr()
    return exc.value.code, out, err


def test_records_json_oeis(capsys):
    code, out, err = run(capsys, "records", "3x+1", "--to", "10^3", "--json", "--workers", "1")
    assert code == 0, err
    doc = json.loads(out)
    pos = doc["sides"]["positive"]
    # OEIS A006877 / A006878: 871 needs 178 steps, the record below 1000
    assert pos["records"]["full_delay"][-1] == {"start": 871, "value": 178}
    # OEIS A006884 / A006885: 703 reaches 250504
    assert pos["records"]["full_peak"][-1] == {"start": 703, "value": 250504}
    assert doc["labels"]["heuristic"] == "heuristic" and doc["labels"]["records"] == "exact"
    assert pos["unresolved"] == 0 and pos["basins"] == [{"cycle_minimum": 1, "starts": 1000}]
    assert "not proofs" in doc["caution"]


def test_records_table_both_sides(capsys):
    code, out, _ = run(capsys, "records", "3x+1", "--to", "200", "--side", "both", "--workers", "1")
    assert code == 0
    # Lagarias 1985: the negative side of 3x+1 has the cycles -1, -5, -17
    assert "-17" in out and "-5" in out and "heuristic" in out
    assert "steps to the cycle (delay)" in out


def test_records_unresolved_said(capsys):
    code, out, _ = run(capsys, "records", "5x+1", "--to", "300", "--max-steps", "100")
    assert code == 0
    assert "unresolved" in out and "left out of the records" in out


@pytest.mark.slow
def test_records_csv_and_plot_formats(capsys, tmp_path):
    c = tmp_path / "r.csv"
    for ext in ("png", "svg", "pdf"):
        p = tmp_path / f"r.{ext}"
        args = ["records", "3x+5", "--to", "500", "--plot", str(p), "--workers", "1"]
        if ext == "png":
            args += ["--csv", str(c)]
        code, _, err = run(capsys, *args)
        assert code == 0, err
        head = p.read_bytes()[:8]
        assert {
            "png": head.startswith(b"\x89PNG"),
            "svg": b"<" in head,
            "pdf": head.startswith(b"%PDF"),
        }[ext]
    rows = list(csv.DictReader(io.StringIO(c.read_text())))
    assert {r["table"] for r in rows} >= {"record", "distribution", "basin", "unresolved", "model"}
    # OEIS A226607 (k = 5): the cycle minima 1, 5, 19, 23 are reached from 1..500
    basins = {int(r["key"]) for r in rows if r["table"] == "basin"}
    assert {1, 5, 19, 23} <= basins


def test_records_latex(capsys):
    code, out, _ = run(capsys, "records", "3x+1", "--to", "10^4", "--latex", "--workers", "1")
    assert code == 0
    assert "\\toprule" in out and "\\bottomrule" in out and "\\begin{tabular}" in out
    # OEIS A006885: 6810136 (start 4255), grouped in math mode
    assert "$6\\,810\\,136$" in out
    assert "heuristic" in out


def test_records_bad_input(capsys):
    for args in (
        ["records", "3x+1", "--to", "0"],
        ["records", "3x+1", "--to", "10", "--from", "20"],
        ["records", "3x+1", "--to", "10", "--max-steps", "0"],
        ["records", "3x+1", "--to", "10", "--plot", "x.gif"],
        ["records", "nosuchmap", "--to", "10"],
    ):
        code, _, err = run(capsys, *args)
        assert code == 2, args
        assert err.startswith("error:") and "Traceback" not in err


def test_existing_plot_file_kept(capsys, tmp_path):
    p = tmp_path / "o.png"
    p.write_bytes(b"mine")
    code, _, err = run(capsys, "orbit", "3x+1", "27", "--plot", str(p))
    assert code == 2 and "already exists" in err
    assert p.read_bytes() == b"mine"


def test_orbit_plot(capsys, tmp_path):
    p = tmp_path / "o.svg"
    code, out, _ = run(capsys, "orbit", "3x+1", "27", "--plot", str(p))
    assert code == 0 and "stopping time: 59" in out  # OEIS A126241: 59
    assert b"<svg" in p.read_bytes()


def test_latex_renderer():
    # common practice, no source: booktabs layout, math-mode numbers, grouped digits
    text = latex_table(
        ["map", "value", "label"], [["3x+1", 2**40, "exact"], ["a_b", Fraction(1, 3), "heuristic"]]
    )
    assert text.splitlines()[0] == "\\begin{tabular}{lrl}"
    assert "$1\\,099\\,511\\,627\\,776$" in text and "a\\_b" in text and "\\frac{1}{3}" in text
    assert tex_number(1234) == "$1234$" and tex_number(-12345) == "$-12\\,345$"


@pytest.mark.slow
def test_study_records_analysis(tmp_path):
    study = parse_study(
        tomllib.loads(
            """
[study]
title = "records"
[maps]
use = ["3x+1"]
[[analysis]]
kind = "records"
to = 1000
plot = false
"""
        ),
        origin="t.toml",
    )
    assert study.analyses[0].params["max_steps"] == 1000
    from cyclewright.cli.study import ANALYSES, StudyContext

    ctx = StudyContext(tmp_path, 1, lambda _m: None)
    sec = ANALYSES["records"](ctx, study.analyses[0])
    holders = {(r[2], r[3]) for r in sec.tables[0].rows}
    # OEIS A006877: 871 holds the delay record below 1000
    assert ("steps to the cycle, undivided count", 871) in holders
    tex = sec.tables[0].latex()
    # the labels as footnote marks on the headers, explained under the rule
    assert "\\toprule" in tex and "model mean$^{" in tex and "$\\,heuristic" in tex


def test_to_pandas_optional():
    from cyclewright.cycles.records import records

    r = records("3x+1", 50)
    try:
        import pandas  # noqa: F401
    except ImportError:
        with pytest.raises(ImportError, match="pandas"):
            r.to_pandas()
    else:
        df = r.to_pandas()
        assert list(df.columns) == ["side", "kind", "start", "value"]


def test_latex_on_other_commands(capsys):
    # common practice, no source: tables as booktabs, other lines as LaTeX comments
    code, out, _ = run(capsys, "count", "3x+1", "--length", "13", "--odd", "8", "--latex")
    assert code == 0
    assert "\\toprule" in out and "% " in out
    assert all(
        line.startswith(("%", "\\", "$")) or " & " in line for line in out.splitlines() if line
    )
    code, out, _ = run(
        capsys, "scan", "3x+5", "--to", "400", "--no-store", "--latex", "--workers", "1"
    )
    assert code == 0 and "\\begin{tabular}" in out
    # OEIS A226607 (k = 5): the cycle minima 19 and 23
    assert "$19$" in out and "$23$" in out
    code, _, err = run(capsys, "count", "3x+1", "--length", "13", "--odd", "8", "--latex", "--json")
    assert code == 2 and err.startswith("error:")


def test_records_command_renders_the_results_own_overview(capsys):
    """The terminal and LaTeX views are the result's overview tables, nothing rebuilt."""
    import cyclewright as cw

    r = cw.records("3x+1", 1000, workers=1, store=False)
    tables = r.overview(3)
    assert [t.title for t in tables] == [
        "Records (exact; mean rounded, model mean heuristic)",
        "positive: record holders (start:value, exact)",
        "positive: basins (exact)",
    ]
    holders = dict(tables[1].rows)
    # OEIS A006877 (delay record holders 649, 703, 871) and A006884 (path records end 703)
    assert holders["steps to the cycle (delay)"] == "649:92 703:108 871:113 (+17 earlier)"
    assert holders["largest value (peak)"].split()[-3] == "703:125252"
    assert tables[2].rows == ((1, 1000, "100.00%"),)
    code, out, _ = run(
        capsys, "records", "3x+1", "--to", "1000", "--workers", "1", "--show", "3", "--no-store"
    )
    assert code == 0
    for t in tables:
        assert t.title in out
    assert "649:92 703:108 871:113 (+17 earlier)" in out
    code, out, _ = run(
        capsys,
        "records",
        "3x+1",
        "--to",
        "1000",
        "--workers",
        "1",
        "--show",
        "3",
        "--no-store",
        "--latex",
    )
    assert code == 0 and out.count("\\begin{tabular}") == len(tables)
