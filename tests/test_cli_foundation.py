"""The CLI of the foundation: maps, maps show, orbit, solve, demo; exit codes and JSON."""

from __future__ import annotations

import json
import shutil
import subprocess
import sys
from pathlib import Path

import pytest
from click.testing import CliRunner
from conftest import run_cli

from cyclewright.cli.app import cli


def test_python_dash_m_cli_and_console_script():
    out = run_cli("solve", "3x+5", "11100", "--json")
    assert out.returncode == 0, out.stderr
    doc = json.loads(out.stdout)
    assert doc["minimum"] == "19" and doc["denominator"] == 5 and doc["integral"] is True
    assert doc["elements"] == ["19", "31", "49", "76", "38"] and doc["label"] == "exact"
    exe = Path(sys.executable).parent / "cyclewright"
    assert exe.exists() or shutil.which("cyclewright")
    res = subprocess.run([str(exe), "solve", "3x+1", "10"], capture_output=True, text=True)
    assert res.returncode == 0 and "{1, 2}" in res.stdout


@pytest.mark.slow
def test_console_entry_flushes_everything_before_its_quick_exit(tmp_path):
    # cli.app.run ends the process with os._exit after main(): piped output
    # must arrive whole, the exit status must be main's, and the store committed.
    store = tmp_path / "s.sqlite"
    out = run_cli("orbit", "3x+1", "27", "--json")
    assert out.returncode == 0, out.stderr
    doc = json.loads(out.stdout)  # the whole document arrived
    assert doc["values"][0] == 27 and doc["values"][-1] in (1, 2)
    assert doc["undivided_total_steps"] == 111  # OEIS A006577: 27 takes 111 steps
    assert doc["undivided_peak"] == 9232  # OEIS A025586: the peak of 27 is 9232
    bad = run_cli("orbit", "3x+1", "0x")
    assert bad.returncode == 2 and bad.stderr.startswith("error: ") and not bad.stdout
    first = run_cli("scan", "3x+1", "--to", "3000", "--json", "--store", str(store))
    assert first.returncode == 0, first.stderr
    again = run_cli("scan", "3x+1", "--to", "3000", "--json", "--store", str(store))
    doc = json.loads(again.stdout)
    assert doc["chunks"]["reused"] == 1 and doc["minima"]["positive"] == [1]


@pytest.mark.slow
def test_arguments_may_start_with_minus_and_a_digit():
    # the map -3x+1 and negative starts are arguments, not options
    out = run_cli("solve", "-3x+1", "10", "--json")
    assert out.returncode == 0, out.stderr
    doc = json.loads(out.stdout)
    # -3x+1 on the itinerary 10: T_w(n) = (-3n + 1)/4, D = 4 + 3 = 7, fixed point 1/7
    assert doc["denominator"] == 7 and doc["minimum"] == "1/7"
    orbit = run_cli("orbit", "3x+1", "-17", "--json")
    assert json.loads(orbit.stdout)["cycle_minimum"] == -17  # Lagarias 1985: the cycle through -17
    text = run_cli("solve", "3x-11", "1101")
    assert "(27 n - 253) / 2^4" in text.stdout  # OEIS A226623 example: the 3x-11 cycle through 19


def test_solve_run_length_and_rational_json():
    out = run_cli("solve", "3x+1", "1^3", "0^2", "--json")
    doc = json.loads(out.stdout)
    assert doc["itinerary"] == "11100" and doc["fixed_point"] == "19/5" and doc["integral"] is False


def test_orbit_json_negative_start():
    out = run_cli("orbit", "3x+1", "-17", "--json")
    assert out.returncode == 0, out.stderr
    doc = json.loads(out.stdout)
    assert doc["cycle_minimum"] == -17 and doc["cycle_length"] == 11


def test_orbit_27_table():
    out = run_cli("orbit", "3x+1", "27")
    assert out.returncode == 0
    assert "total steps 111" in out.stdout and "peak 9232" in out.stdout  # OEIS A006577


@pytest.mark.slow
def test_maps_listing_and_show():
    out = run_cli("maps", "--json")
    names = [r["name"] for r in json.loads(out.stdout)["maps"]]
    assert "3x+1" in names and "mod3-4x" in names
    show = run_cli("maps", "show", "mod3-4x", "--json")
    doc = json.loads(show.stdout)
    assert doc["divisor"] == 3 and doc["drift_exact"] == "(1/3) ln(16/27)"
    table = run_cli("maps")
    assert "181x+1" in table.stdout and "builtin" in table.stdout


@pytest.mark.parametrize(
    "args,fragment",
    [
        (["solve", "3x+2", "10"], "a + b = 5 is odd"),
        (["solve", "nosuchmap", "10"], "unknown map 'nosuchmap'"),
        (["solve", "3x+1", "102"], "digit 2 is not a residue mod 2"),
        (["solve", "3x+1", "1^x"], "cannot read '1^x'"),
        (["orbit", "3x+1", "abc"], "N must be an integer"),
        (["orbit", "3x+1", "5", "--max-steps", "0"], "--max-steps must be at least 1"),
        (["orbit", "3x+1", "500", "--ceiling", "10"], "--ceiling 10 is below"),
        (["maps", "show", "0x+2"], "must not be 0"),
        (["solve"], "Missing argument"),
        (["frobnicate"], "No such command"),
        (["solve", "4x+1", "10"], "use an even offset"),
        (["solve", "3x+1", "10", "--jsno"], "No such option '--jsno'"),
        (["scan", "3x+1", "--to", "50", "-q"], "No such option '-q'"),
    ],
)
def test_bad_input_one_line_exit_2(args, fragment):
    out = run_cli(*args)
    assert out.returncode == 2, (out.stdout, out.stderr)
    lines = out.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: "), out.stderr
    assert fragment in lines[0]
    assert "Traceback" not in out.stderr


def _write(tmp_path, text):
    p = tmp_path / "maps.toml"
    p.write_text(text)
    return str(p)


@pytest.mark.parametrize(
    "text,fragment",
    [
        ("[m]\ndivisor = 1\n", "key 'divisor': must be at least 2"),
        ("[m]\ndivisor = 3\nbranches.0 = {multiplier = 1, offset = 0}\n", "missing: 1, 2"),
        (
            "[m]\ndivisor = 2\nbranches.0 = {multiplier = 0, offset = 0}\nbranches.1 = {multiplier = 3, offset = 1}\n",
            "the multiplier must not be 0",
        ),
        (
            '[m]\ndivisor = 2\nbranches.0 = {multiplier = 1, offset = 0}\nbranches.1 = {multiplier = 3, offset = "1"}\n',
            "must be an integer",
        ),
        (
            "[m]\ndivisor = 2\nbranches.0 = {multiplier = 1, offset = 0}\nbranches.1 = {multiplier = 3, offset = 0}\n",
            "the offsets nearest to 0 that work are -1 and 1",
        ),
    ],
)
def test_map_file_errors_via_cli(tmp_path, text, fragment):
    path = _write(tmp_path, text)
    out = run_cli("solve", "m", "10", "--maps", path)
    assert out.returncode == 2
    line = out.stderr.strip()
    assert line.startswith("error: ") and "\n" not in line
    assert path in line and "map 'm'" in line and fragment in line


@pytest.mark.slow
def test_map_file_via_cli(tmp_path):
    path = _write(
        tmp_path,
        "[tri]\ndivisor = 3\nbranches.0 = {multiplier = 1, offset = 0}\n"
        "branches.1 = {multiplier = 4, offset = -1}\nbranches.2 = {multiplier = 4, offset = 1}\n",
    )
    out = run_cli("solve", "tri", "12", "--maps", path, "--json")
    assert out.returncode == 0, out.stderr
    assert json.loads(out.stdout)["elements"] == ["1/7", "-1/7"]
    missing = run_cli("solve", "tri", "12", "--maps", str(tmp_path / "none.toml"))
    assert missing.returncode == 2 and "cannot read map file" in missing.stderr


def test_no_args_prints_help_and_help_has_examples():
    res = CliRunner().invoke(cli, ["solve", "--help"])
    assert res.exit_code == 0 and "Examples:" in res.output
    for cmd in cli.commands:
        r = CliRunner().invoke(cli, [cmd, "--help"])
        assert r.exit_code == 0 and "Example" in r.output, cmd


@pytest.mark.slow
def test_demo_runs(tmp_path):
    # common practice, no source: a test writes only below its own temporary directory
    here = tmp_path / "cwd"
    here.mkdir()
    out = run_cli("demo", "--out", str(tmp_path / "demo-out"), cwd=here)
    assert out.returncode == 0, out.stderr
    assert "3x+1" in out.stdout and "111" in out.stdout
    assert (tmp_path / "demo-out" / "report.md").is_file()
    assert list(here.iterdir()) == []
    # the highlights are columns of the comparison's own overview (one table, one place)
    assert "Highlights (from this run's data files" in " ".join(out.stdout.split())
