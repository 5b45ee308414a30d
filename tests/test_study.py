"""Studies: validation messages, reproducible data files, report integrity."""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest
from conftest import run_cli

from cyclewright.cli.studyfile import StudyError, load_study, parse_study

ROOT = Path(__file__).resolve().parents[1]

SMALL = """
[study]
title = "Small study"
description = "A small study used by the tests."

[maps]
use = ["3x+1", "3x+5"]

[maps.define.tri]
divisor = 3
branches.0 = { multiplier = 1, offset = 0 }
branches.1 = { multiplier = 4, offset = -1 }
branches.2 = { multiplier = 4, offset = 1 }

[[analysis]]
kind = "count"
maps = ["3x+1"]
length = 13
odd = 8

[[analysis]]
kind = "sweep"
odd = "1..12"
maps = ["3x+1", "3x+5"]

[[analysis]]
kind = "census"
max_length = 20

[[analysis]]
kind = "scan"
to = 3000
maps = ["3x+5"]

[[analysis]]
kind = "floor"
maps = ["3x+1"]
verified_to = "2^40"

[[analysis]]
kind = "compare"
max_length = 12
to = 500
odd = 6
maps = ["3x+1", "3x+5"]

[[analysis]]
kind = "graph"
maps = ["3x+5"]
to = 60
"""


def test_scenarios_validate():
    for name in ("demo.toml", "family.toml"):
        st = load_study(ROOT / "cyclewright" / "scenarios" / name)
        assert st.title and st.analyses
    demo = load_study(ROOT / "cyclewright" / "scenarios" / "demo.toml")
    names = {m.label for m in demo.maps}
    assert {"3x+1", "3x-1", "5x+1", "7x+1", "181x+1", "3x+5", "mod3-4x"} <= names
    assert {a.kind for a in demo.analyses} >= {"sweep", "census", "scan", "floor", "compare"}


@pytest.mark.slow
def test_study_runs_twice_identically(tmp_path):
    src = tmp_path / "small.toml"
    src.write_text(SMALL)
    out = tmp_path / "out"
    first = run_cli("study", str(src), "--out", str(out), "--workers", "1")
    assert first.returncode == 0, first.stderr
    snap = {p.name: p.read_bytes() for p in out.iterdir() if p.suffix in (".csv", ".json", ".md")}
    again = run_cli("study", str(src), "--out", str(out), "--workers", "1")
    assert again.returncode == 0, again.stderr
    # the data files are reproduced byte for byte; the report and study.json
    # differ only where they say what this run reused from the stores
    for name, data in snap.items():
        now = (out / name).read_bytes()
        if name == "report.md":
            now, data = (
                b"\n".join(x for x in t.split(b"\n") if not x.startswith(b"Stored results:"))
                for t in (now, data)
            )
        if name == "study.json":
            now, data = (
                {k: v for k, v in json.loads(t).items() if k not in ("files", "store_use")}
                for t in (now, data)
            )
        assert now == data, f"{name} changed between runs"
    assert b"Stored results: 0 of" in snap["report.md"]
    assert ", 0 computed in this run (0 starts)." in (out / "report.md").read_text()
    # report integrity: PNG headers, every table has its data files
    md = (out / "report.md").read_text()
    for img in re.findall(r"!\[[^\]]*\]\(([^)]+)\)", md):
        assert (out / img).read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    for stem in re.findall(r"Data: \[([^\]]+)\.csv\]", md):
        assert (out / f"{stem}.csv").is_file() and (out / f"{stem}.json").is_file()
    assert md.count("Data: [") >= 10
    assert "Caution" in md and "heuristic" in md
    assert (out / "report.html").read_text().startswith("<!DOCTYPE html>")
    assert any(p.name.startswith("certificate-") for p in out.iterdir())
    # OEIS A226607: the census table lists the 3x+5 cycles 19 and 23 (length <= 20)
    assert "19" in (out / "census-cycles-20.csv").read_text()


def test_study_refuses_foreign_directory(tmp_path):
    src = tmp_path / "small.toml"
    src.write_text(SMALL)
    out = tmp_path / "busy"
    out.mkdir()
    (out / "notes.txt").write_text("mine")
    r = run_cli("study", str(src), "--out", str(out))
    assert r.returncode == 2 and "not empty" in r.stderr
    assert (out / "notes.txt").read_text() == "mine"


@pytest.mark.parametrize(
    "text,fragment",
    [
        ("[maps]\nuse=['3x+1']\n", "[study]: missing"),
        ("[study]\ntitle='t'\n[maps]\nuse=['3x+1']\n", "the study needs at least one analysis"),
        (
            "[study]\ntitle='t'\n[maps]\nuse=['nosuch']\n[[analysis]]\nkind='count'\nlength=3\nodd=1\n",
            "[maps]: key 'use': unknown map 'nosuch'",
        ),
        (
            "[study]\ntitle='t'\n[maps]\nuse=['3x+1']\n[[analysis]]\nkind='census'\nmax_length=0\n",
            "[[analysis]] #1 (census): max_length must be at least 1, got 0",
        ),
        (
            "[study]\ntitle='t'\n[maps]\nuse=['3x+1']\n[[analysis]]\nkind='sweep'\nodd='5..1'\n",
            "[[analysis]] #1 (sweep): key 'odd'",
        ),
        (
            "[study]\ntitle='t'\n[maps]\nuse=['3x+1']\n[[analysis]]\nkind='teleport'\n",
            "key 'kind': must be one of",
        ),
        (
            "[study]\ntitle='t'\n[maps]\nuse=['3x+1']\n[[analysis]]\nkind='scan'\ncolour=1\n",
            "[[analysis]] #1 (scan): key 'colour': unknown key",
        ),
        (
            "[study]\ntitle='t'\n[maps.define.bad]\ndivisor=2\nbranches.0={multiplier=1,offset=0}\n"
            "branches.1={multiplier=3,offset=2}\n[[analysis]]\nkind='count'\nlength=2\nodd=1\n",
            "map 'bad': key 'branches.1'",
        ),
        ("[study\n", "not valid TOML"),
    ],
)
def test_broken_study_names_its_key(tmp_path, text, fragment):
    p = tmp_path / "broken.toml"
    p.write_text(text)
    with pytest.raises(StudyError) as exc:
        load_study(p)
    assert str(p) in str(exc.value) and fragment in str(exc.value)
    r = run_cli("study", str(p), "--out", str(tmp_path / "o"))
    assert r.returncode == 2 and r.stderr.startswith("error: ") and fragment in r.stderr
    assert not (tmp_path / "o").exists()


def test_parse_study_inline():
    st = parse_study(
        {
            "study": {"title": "x"},
            "maps": {"use": ["3x+1"]},
            "analysis": [{"kind": "floor", "verified_to": "2^40"}],
        },
        origin="inline",
    )
    assert st.analyses[0].params["verified_to"] == 2**40


def test_study_defaults_are_the_api_defaults():
    # common practice, no source: a default is declared once, in the API function's signature;
    # a study key with an API default takes that default (keys named as on the command line)
    import inspect

    import cyclewright as cw
    from cyclewright.cli.studyfile import PARAMS
    from cyclewright.cycles.graph import functional_graph

    api = {
        "count": cw.count,
        "sweep": cw.sweep,
        "scan": cw.scan,
        "census": cw.census,
        "floor": cw.floor,
        "compare": cw.compare,
        "records": cw.records,
        "graph": functional_graph,
    }
    assert set(api) == set(PARAMS)
    renamed = {"from": "start", "next": "next_types"}
    checked = 0
    for kind, keys in PARAMS.items():
        sig = inspect.signature(api[kind]).parameters
        for key, (check, default) in keys.items():
            p = sig.get(renamed.get(key, key))
            if p is None or p.default is inspect.Parameter.empty:
                continue
            value = check(default) if isinstance(default, str) else default
            assert value == p.default, (kind, key, value, p.default)
            checked += 1
    assert checked >= 20


def test_study_limits_are_the_api_limits():
    # common practice, no source: a limit is declared once (cyclewright/cycles/limits.py);
    # a study key takes the same upper limit as the API and the command line
    from cyclewright.cli.studyfile import PARAMS
    from cyclewright.cycles import limits

    shared = {
        ("count", "length"): limits.MAX_TYPE_LENGTH,
        ("sweep", "extra_lengths"): limits.MAX_EXTRA_LENGTHS,
        ("scan", "max_steps"): limits.MAX_STEP_CAP,
        ("census", "max_length"): limits.MAX_CENSUS_LENGTH,
        ("floor", "next"): limits.MAX_NEXT_TYPES,
        ("compare", "to"): limits.MAX_COMPARE_TO,
        ("compare", "max_steps"): limits.MAX_STEP_CAP,
        ("records", "max_steps"): limits.MAX_RECORDS_STEP_CAP,
        ("records", "to"): limits.MAX_RECORDS_TO,
        ("graph", "to"): limits.MAX_GRAPH_STARTS,
    }
    for (kind, key), hi in shared.items():
        check = PARAMS[kind][key][0]
        assert check(hi, key) == hi, (kind, key)
        with pytest.raises(ValueError):
            check(hi + 1, key)
