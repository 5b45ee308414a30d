"""``cyclewright scan``: output, JSON, and bad input (one line, exit 2, store untouched)."""

from __future__ import annotations

import hashlib
import json
import os
import socket
import subprocess
import sys

import pytest

import cyclewright.cli.options
from cyclewright.cli.app import main
from cyclewright.cli.errors import BadInput
from cyclewright.cli.options import parse_int
from cyclewright.cli.progress import ProgressDisplay


@pytest.fixture(autouse=True)
def _data_dir(tmp_path, monkeypatch):
    monkeypatch.setenv("CYCLEWRIGHT_DATA_DIR", str(tmp_path / "data"))
    monkeypatch.setenv("CYCLEWRIGHT_CONFIG_DIR", str(tmp_path / "config"))

    cyclewright.cli.options._catalog.cache_clear()


def run(capsys, *args):
    with pytest.raises(SystemExit) as exc:
        main(["scan", *args])
    out, err = capsys.readouterr()
    return exc.value.code, out, err


def _digest(path):
    return hashlib.sha256(open(path, "rb").read()).hexdigest()


def test_json_document(capsys):
    code, out, err = run(capsys, "3x+5", "--to", "1000", "--side", "both", "--json", "--no-store")
    assert code == 0
    doc = json.loads(out)
    # OEIS A226607 (k = 5): 1, 19, 23, 187, 347 (5 is 5 times 3x+1's cycle)
    assert doc["minima"]["positive"] == [1, 5, 19, 23, 187, 347]
    assert [c["minimum"] for c in doc["cycles"] if c["lagarias_primitive"]] == [1, 19, 23, 187, 347]
    assert doc["labels"]["minima"] == "certified" and doc["store"] is None
    assert doc["counts"]["positive"]["cycles"] == 6
    assert isinstance(doc["cycles"][0]["elements"][0], int)


def test_table_output_and_store(capsys, tmp_path):
    store = tmp_path / "t.sqlite"
    code, out, _ = run(capsys, "3x+1", "--to", "10^5", "--side", "negative", "--store", str(store))
    assert code == 0
    assert "certified" in out and "-17" in out and "11110111000" in out
    assert "chunks 1 (0 reused)" in out
    code, out, _ = run(capsys, "3x+1", "--to", "10^5", "--side", "negative", "--store", str(store))
    assert "chunks 1 (1 reused)" in out


def test_unresolved_are_reported(capsys):
    code, out, _ = run(capsys, "5x+1", "--to", "3000", "--no-store", "--max-steps", "400")
    assert code == 0
    assert "unresolved within 400 steps" in out and "first: 7, " in out


def test_length_bound_option(capsys):
    code, out, _ = run(
        capsys, "3x-1", "--to", "100", "--no-store", "--max-cycle-length", "10", "--json"
    )
    doc = json.loads(out)
    assert doc["minima"]["positive"] == [1, 5]  # the cycle of 17 has length 11
    assert doc["counts"]["positive"]["beyond_length"] > 0 and doc["complete"]


def test_help_has_examples(capsys):
    with pytest.raises(SystemExit):
        main(["scan", "--help"])
    out = capsys.readouterr().out
    assert "Examples:" in out and "--max-length" in out and "--scheduler" in out


@pytest.mark.parametrize(
    "args, text",
    [
        (["--to", "0"], "empty range"),
        (["--from", "10", "--to", "5"], "empty range"),
        (["--to", "2^63"], "--to must be at most 2^63-1, got 2^63"),
        (["--to", "100", "--workers", "0"], "workers"),
        (["--to", "ten"], "--to must be an integer"),
        (["--to", "100", "--max-steps", "0"], "--max-steps"),
        (["--to", "100", "--executor", "dask"], "scheduler"),
        (["--to", "100", "--side", "up"], "side"),
        (["--to", "100", "--store", "x.sqlite", "--no-store"], "exclude"),
    ],
)
def test_bad_input_one_line_exit_2(capsys, args, text):
    code, out, err = run(capsys, "3x+1", *args)
    assert code == 2
    assert err.startswith("error: ") and err.count("\n") == 1 and text in err
    assert "Traceback" not in err


def test_corrupt_and_unwritable_store(capsys, tmp_path):
    bad = tmp_path / "bad.sqlite"
    bad.write_bytes(b"not a database at all" * 50)
    before = _digest(bad)
    code, _, err = run(capsys, "3x+1", "--to", "100", "--store", str(bad))
    assert code == 2 and err.startswith("error: ") and "not a cyclewright scan store" in err
    assert _digest(bad) == before
    code, _, err = run(capsys, "3x+1", "--to", "100", "--store", str(tmp_path / "no" / "s.sqlite"))
    assert code == 2 and "does not exist" in err
    assert not (tmp_path / "no").exists()


def test_changed_map_file_under_existing_store(capsys, tmp_path):
    mapfile = tmp_path / "mine.toml"
    mapfile.write_text('[mine]\nshorthand = "3x+5"\n')
    store = tmp_path / "mine.sqlite"
    code, _, _ = run(capsys, "mine", "--maps", str(mapfile), "--to", "500", "--store", str(store))
    assert code == 0
    before = _digest(store)
    mapfile.write_text('[mine]\nshorthand = "3x+7"\n')

    cyclewright.cli.options._catalog.cache_clear()
    code, _, err = run(capsys, "mine", "--maps", str(mapfile), "--to", "500", "--store", str(store))
    assert code == 2 and err.count("\n") == 1
    assert "map definition differs" in err and "3x+5" in err
    assert _digest(store) == before


def test_unreachable_scheduler_one_line(capsys):
    sock = socket.socket()
    sock.bind(("127.0.0.1", 0))
    port = sock.getsockname()[1]
    sock.close()  # nothing listens there now
    code, _, err = run(
        capsys,
        "3x+1",
        "--to",
        "100",
        "--executor",
        "dask",
        "--scheduler",
        f"tcp://127.0.0.1:{port}",
    )
    assert code == 2 and err.startswith("error: cannot reach the Dask scheduler")
    assert err.count("\n") == 1


def test_exit_code_in_a_real_process(tmp_path):
    env = dict(os.environ)
    p = subprocess.run(
        [sys.executable, "-m", "cyclewright", "scan", "3x+1", "--from", "9", "--to", "3"],
        capture_output=True,
        text=True,
        env=env,
        timeout=300,
    )
    assert p.returncode == 2 and p.stderr == "error: empty range: to = 3 is below start = 9\n"


def test_parse_bound():
    assert parse_int("10^10+10^8", "--to") == 10**10 + 10**8
    assert parse_int("1_000", "--to") == 1000
    assert parse_int("2^63-1", "--to") == 2**63 - 1
    assert parse_int("1.5e3", "--to") == 1500
    for bad in ("1.55e1", "10^-2", "", "x"):
        with pytest.raises(BadInput):
            parse_int(bad, "--to")


def test_progress_printer_waits(capsys):
    from cyclewright.cycles.progress import ProgressEvent

    clock = [100.0]
    display = ProgressDisplay(tty=False, clock=lambda: clock[0])
    p = display
    p(ProgressEvent("scan", 10, 100, "starts", "positive side, 0 unresolved"))
    assert capsys.readouterr().err == ""
    clock[0] += 6
    p(ProgressEvent("scan", 50, 100, "starts", "positive side, 3 unresolved"))
    err = capsys.readouterr().err
    assert "50/100 starts" in err and "3 unresolved" in err
