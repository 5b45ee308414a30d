"""census and verify on the command line."""

from __future__ import annotations

import json

import pytest
from conftest import run_cli


@pytest.mark.slow
def test_census_json_and_certificate(tmp_path):
    cert = tmp_path / "c.json"
    out = run_cli(
        "census",
        "3x+5",
        "--max-length",
        "30",
        "--side",
        "positive",
        "--workers",
        "1",
        "--store",
        str(tmp_path / "s.sqlite"),
        "--certificate",
        str(cert),
        "--json",
    )
    assert out.returncode == 0, out.stderr
    doc = json.loads(out.stdout)
    # OEIS A226607 (k = 5), plus the non-primitive 5 and the fixed point 0
    assert [c["minimum"] for c in doc["cycles"]] == [0, 1, 5, 19, 23, 187, 347]
    assert doc["labels"]["cycles"] == "certified"
    ok = run_cli("verify", str(cert))
    assert ok.returncode == 0 and "certificate holds" in ok.stdout
    data = json.loads(cert.read_text())
    data["scanned"][0]["to"] = 10
    cert.write_text(json.dumps(data))
    bad = run_cli("verify", str(cert), "--no-rescan")
    assert bad.returncode == 1 and "scanned: recorded" in bad.stdout
    again = run_cli("census", "3x+5", "--max-length", "5", "--certificate", str(cert))
    assert again.returncode == 2 and "refusing to overwrite" in again.stderr


@pytest.mark.slow
def test_census_table_and_family():
    out = run_cli("census", "3x+1", "--max-length", "500", "--side", "both", "--workers", "1")
    assert out.returncode == 0, out.stderr
    assert "-17" in out.stdout and "exactly 5 integer cycles" in out.stdout
    fam = run_cli(
        "census", "3x+k", "--offsets", "1..13", "--max-length", "20", "--workers", "1", "--json"
    )
    assert fam.returncode == 0, fam.stderr
    rows = {r["k"]: r["primitive_minima"] for r in json.loads(fam.stdout)["rows"]}
    # OEIS A226607: k = 13 has 1, 131, 211, ... (only those of length <= 20 here)
    assert rows[5] == [1, 19, 23] and rows[7] == [5] and 1 in rows[13]


@pytest.mark.parametrize(
    "args,fragment",
    [
        (["census", "3x+1", "--max-length", "0"], "--max-length must be at least 1"),
        (["census", "3x+1", "--max-length", "100000", "--max-scan", "1000"], "needs a scan of 1.."),
        (["census", "mod3-4x", "--max-length", "80"], "no applicable method"),
        (["census", "3x+k", "--max-length", "10"], "a family needs --offsets"),
        (["verify", "/nonexistent/c.json"], "cannot read"),
    ],
)
def test_bad_input(args, fragment):
    out = run_cli(*args)
    assert out.returncode == 2, out.stderr
    assert (
        out.stderr.startswith("error: ")
        and fragment in out.stderr
        and "\n" not in out.stderr.strip()
    )


def test_verify_not_a_certificate(tmp_path):
    p = tmp_path / "x.json"
    p.write_text("[1, 2]")
    out = run_cli("verify", str(p))
    assert out.returncode == 2 and "not a census certificate" in out.stderr
