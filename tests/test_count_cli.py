"""The ``count`` and ``sweep`` commands: JSON, tables, files, and one-line errors with exit 2."""

from __future__ import annotations

import json

import pytest

from cyclewright.cli.app import main


def run(capsys, *args):
    with pytest.raises(SystemExit) as exc:
        main(list(args))
    out, err = capsys.readouterr()
    return exc.value.code, out, err


def test_count_json_check_values(capsys):
    # common practice, no source: 3x+1, k = 13, x = 8
    code, out, err = run(capsys, "count", "3x+1", "--length", "13", "--odd", "8", "--json")
    assert code == 0
    doc = json.loads(out)
    assert doc["necklaces"] == 99
    assert doc["denominator"] == 1631
    assert doc["largest_min_numerator"] == 14501
    assert doc["candidates"] == 8
    assert doc["integer_cycles"] == []
    assert doc["labels"]["necklaces"] == "exact"
    assert doc["labels"]["min_bound"] == "proved"
    assert doc["labels"]["heuristic"] == "heuristic"
    assert doc["heuristic"] == "99/1631"
    assert doc["min_bound"]["label"] == "proved"
    # Khinchin, Continued Fractions, Theorems 16-17: over x <= 8 the least |k ln 2 - x ln 3|
    # is at the convergent 8/5 of log_2 3 (no recalled constant, so certified)
    assert doc["linear_form"]["source"] == "best approximations (continued fraction)"
    assert doc["linear_form"]["from_memory"] is False
    assert doc["labels"]["linear_form"] == doc["linear_form"]["label"] == "certified"
    assert "|8 ln 2 - 5 ln 3|" in doc["linear_form"]["constants"]


def test_count_table_3x5(capsys):
    # OEIS A226607: minima 19 and 23
    code, out, _ = run(capsys, "count", "3x+5", "--length", "5", "--odd", "3")
    assert code == 0
    assert "19" in out and "23" in out and "11100" in out
    assert "heuristic" in out and "proved" in out and "exact" in out


def test_count_content_for_divisor_3(capsys):
    code, out, _ = run(capsys, "count", "mod3-mixed", "--content", "0:2,1:3,2:1", "--json")
    assert code == 0
    doc = json.loads(out)
    assert doc["content"] == [2, 3, 1] and doc["necklaces"] == 10


def test_count_not_enumerated(capsys):
    code, out, _ = run(
        capsys, "count", "3x+1", "--length", "40", "--odd", "25", "--limit", "0", "--json"
    )
    assert code == 0
    doc = json.loads(out)
    assert doc["integer_cycles"] is None
    assert doc["labels"]["candidates"] == "proved"


@pytest.mark.parametrize(
    "args",
    [
        ["count", "3x+1", "--length", "0", "--odd", "0"],  # k < 1
        ["count", "3x+1", "--length", "5", "--odd", "6"],  # x > k
        ["count", "3x+1", "--length", "5", "--odd", "-1"],  # x < 0
        ["count", "3x+1", "--length", "5", "--content", "0:2,1:2"],  # content sums to 4
        ["count", "4x+2", "--length", "2", "--odd", "1"],  # D = 0
        ["count", "3x+1", "--length", "200", "--odd", "126", "--limit", "1e80"],  # memory refusal
        ["count", "3x+1", "--length", "13", "--odd", "8", "--limit", "lots"],
        ["count", "3x+1", "--length", "13", "--content", "0;5"],
        ["count", "mod3-4x", "--length", "3", "--odd", "1"],
        ["count", "3x+1", "--length", "13"],
        ["count", "nosuchmap", "--length", "13", "--odd", "8"],
        ["sweep", "3x+1", "--odd", "5..1"],
        ["sweep", "3x+1", "--odd", "1..5", "--extra-lengths", "-1"],
        ["sweep", "3x+1", "--odd", "1..5", "--plot", "out.jpg"],
        ["sweep", "3x+1", "--odd", "1..5", "--json", "--csv", "-"],
    ],
)
def test_bad_input_one_line_exit_2(capsys, args, tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    code, out, err = run(capsys, *args)
    assert code == 2
    assert err.startswith("error: ") and err.count("\n") == 1
    assert "Traceback" not in err
    assert list(tmp_path.iterdir()) == []  # nothing written


def test_memory_refusal_states_estimate(capsys):
    code, _, err = run(
        capsys, "count", "3x+1", "--length", "200", "--odd", "126", "--limit", "10^80"
    )
    assert code == 2 and "could need up to" in err and "lower the limit" in err


def test_sweep_json(capsys):
    code, out, _ = run(capsys, "sweep", "3x+1", "--odd", "1..30", "--json")
    assert code == 0
    doc = json.loads(out)
    assert len(doc["rows"]) == 30
    row8 = doc["rows"][7]
    assert (row8["x"], row8["k"], row8["necklaces"], row8["candidates"]) == (8, 13, 99, 8)
    assert doc["labels"]["heuristic"] == "heuristic"
    assert doc["labels"]["min_bound"] == "proved"
    assert doc["crossover_x"] == 6
    assert abs(doc["rho"] - 2.8396) < 1e-4  # common practice, no source


@pytest.mark.slow
def test_sweep_table_csv_and_plot(capsys, tmp_path):
    csv_path = tmp_path / "s.csv"
    png_path = tmp_path / "s.png"
    code, out, _ = run(
        capsys,
        "sweep",
        "3x+1",
        "--odd",
        "1..40",
        "--extra-lengths",
        "1",
        "--csv",
        str(csv_path),
        "--plot",
        str(png_path),
    )
    assert code == 0
    assert "rho" in out and "linear-forms bound" in out
    lines = csv_path.read_text().splitlines()
    assert lines[0].startswith("x,k,content,words,necklaces")
    assert len(lines) == 81
    assert png_path.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    # existing files are not overwritten silently
    code, _, err = run(capsys, "sweep", "3x+1", "--odd", "1..5", "--csv", str(csv_path))
    assert code == 2 and "--force" in err
    assert len(csv_path.read_text().splitlines()) == 81
    code, _, _ = run(capsys, "sweep", "3x+1", "--odd", "1..5", "--csv", str(csv_path), "--force")
    assert code == 0 and len(csv_path.read_text().splitlines()) == 6


def test_sweep_csv_to_stdout_and_negative_side(capsys):
    code, out, _ = run(capsys, "sweep", "3x+1", "--odd", "1..8", "--side", "negative", "--csv", "-")
    assert code == 0
    lines = out.splitlines()
    header = lines[0].split(",")
    assert header[:2] == ["x", "k"]
    col = header.index("integer_cycle_minima")
    import csv

    rows = list(csv.reader(lines[1:]))
    assert any(r[col] == "-17" for r in rows)  # Lagarias 1985 survey (from memory)


def test_help_has_examples(capsys):
    for cmd in ("count", "sweep"):
        code, out, _ = run(capsys, cmd, "--help")
        assert code == 0 and "Examples:" in out
