"""Comparison of maps: rows agree with the individual analyses; predictions never beat the theorem."""

from __future__ import annotations

import json
import math
from fractions import Fraction

import pytest
from conftest import run_cli

from cyclewright import maps
from cyclewright.cycles.census import census
from cyclewright.cycles.compare import compare, critical_ratio, predictions
from cyclewright.cycles.counting import count
from cyclewright.cycles.excursions import excursions
from cyclewright.cycles.floors import floor
from cyclewright.maps import Map


@pytest.fixture(scope="module")
def cmp():
    return compare(
        [maps.get("3x+1"), maps.get("5x+1")], max_length=16, to=2000, odd=8, store=False, workers=1
    )


@pytest.mark.slow
def test_rows_agree_with_individual_analyses(cmp):
    # common practice, no source: the comparison must only re-present the individual results
    for p in cmp.profiles:
        m = p.map
        r = p.row()
        c = census(m, 16, store=False, workers=1, side="both")
        assert r["census_minima"] == [x.minimum for x in c.cycles if x.minimum != 0]
        tc = count(m, r["k"], 8)
        assert (r["necklaces_at_x"], r["candidates_at_x"]) == (tc.necklaces, tc.candidates)
        e = excursions(m, 2000, max_steps=1000)
        if r["peak_walk_cut"]:  # a cut walk leaves a lower bound, never a number labelled exact
            assert r["largest_peak"].split()[0] in (">", ">=", "<", "<=")
            assert r["labels"]["largest_peak"] == "proved"
        else:
            assert abs(r["largest_peak"]) >= abs(e.peak)
            assert r["labels"]["largest_peak"] == "exact"
    r1 = cmp.profiles[0].row()
    assert r1["floor_positive_length"] == floor(maps.get("3x+1"), 2000, "positive").least_length
    assert r1["census_minima"] == [1, -1, -5, -17]  # Lagarias 1985 survey (from memory)
    r5 = cmp.profiles[1].row()
    assert r5["census_minima"][:3] == [1, 13, 17]  # OEIS A259207 (13), 1 and 17 from memory
    assert (
        r5["floor_positive_length"] is None
        and "unresolved" in cmp.profiles[1].floor_notes["positive"]
    )


def test_drift_values(cmp):
    # common practice, no source: (1/2) ln(3/4) and (1/2) ln(5/4) per divided step
    r1, r5 = (p.row() for p in cmp.profiles)
    assert round(r1["drift"], 4) == -0.1438 and r1["drift_exact"] == "(1/2) ln(3/4)"
    assert round(r5["drift"], 4) == 0.1116 and r5["drift_exact"] == "(1/2) ln(5/4)"
    assert critical_ratio(maps.get("5x+1"))[1] == "log_2 5"
    # floats are labelled rounded, their exact forms exact
    assert r1["labels"]["drift"] == "rounded" and r1["labels"]["drift_exact"] == "exact"
    assert r1["labels"]["rho"] == "rounded" and r1["labels"]["critical_ratio"] == "rounded"


def test_drift_undivided_is_markov():
    # common practice, no source; Matthews and Watts 1985 (from memory) for the Markov form:
    # in n/2, 3n+1 an odd step is always followed by an even one, residues 0, 1 with
    # frequencies 2/3, 1/3, so the drift is (2/3) ln(1/2) + (1/3) ln 3 = (1/3) ln(3/4)
    m = maps.get("3x+1-undivided")
    assert m.drift_formula() == "(1/3) ln(3/4)"
    assert abs(m.drift() - math.log(3 / 4) / 3) < 1e-12
    assert maps.get("3x+1").drift_formula() == "(1/2) ln(3/4)"
    assert maps.get("5x+1").drift_formula() == "(1/2) ln(5/4)"
    from cyclewright.maps.drift import residue_frequencies

    # common practice, no source (the chain by hand): T(n) = 4 - n on residue 0 always lands
    # in residue 1, so residue 1 is visited twice as often as 0 and 2
    freq = residue_frequencies(Map(3, [(-3, 12), (5, 13), (2, 11)]))
    assert freq == (Fraction(1, 4), Fraction(1, 2), Fraction(1, 4))


def test_negative_peak_keeps_its_sign():
    # OEIS A006884/A006885 (from memory): below 10^5 the 3x+1 path record starts at 77671 and
    # climbs to 1570824736 (undivided); 3x-1 is the conjugate n -> -T(-n) of 3x+1, so its
    # negative side climbs from -77671 to -785412368 in the divided map
    e = excursions(maps.get("3x-1"), 10**5, side="negative")
    assert (e.peak_start, e.peak) == (-77671, -785412368)
    assert e.to_dict()["peak"] == -785412368 and e.to_dict()["labels"]["peak"] == "exact"


def test_cut_peak_is_a_lower_bound():
    # common practice, no source: 5x+1 orbits from 7 on climb past 2^62 in int64 walks; the
    # value reached is exact, the peak only bounded below
    e = excursions(maps.get("5x+1"), 1000, max_steps=10_000)
    assert e.peak_overflowed and e.overflowed > 0
    d = e.to_dict()
    assert d["peak"].startswith(">") and d["labels"]["peak"] == "proved"
    k = int(d["peak"].split("^")[1])
    assert abs(d["peak_reached"]) > 2**k and k >= 55


@pytest.mark.slow
@pytest.mark.parametrize("name", [m.name for m in maps.load_catalog(include_user=False)])
def test_found_never_exceeds_candidates(name):
    # a theorem (distinct cycles have distinct minima, all multiples of |D| up to the largest numerator)
    m = maps.get(name)
    c = census(m, 14, store=False, workers=1, side="both")
    p = predictions(m, c)
    for row in p.rows:
        if row.candidates is not None:
            assert row.found <= row.candidates, row
    for tot in p.totals.values():
        if tot["bound_applies"]:
            assert tot["found"] <= tot["candidates"]


def test_excursion_record():
    # Oliveira e Silva 1999 (from memory): below 10^6 the largest 3x+1 excursion starts at 704511,
    # peak 56991483520 in the undivided map, i.e. 28495741760 in the divided one
    e = excursions(maps.get("3x+1"), 10**6)
    assert (e.peak_start, 2 * e.peak) == (704511, 56991483520)


@pytest.mark.slow
def test_compare_cli(tmp_path):
    png = tmp_path / "c.png"
    csv = tmp_path / "c.csv"
    out = run_cli(
        "compare",
        "3x+1",
        "3x+k",
        "--offsets",
        "5..7",
        "--max-length",
        "12",
        "--to",
        "500",
        "--odd",
        "6",
        "--workers",
        "1",
        "--store",
        str(tmp_path / "stores"),
        "--plot",
        str(png),
        "--csv",
        str(csv),
        "--json",
    )
    assert out.returncode == 0, out.stderr
    doc = json.loads(out.stdout)
    assert [m["row"]["map"] for m in doc["maps"]] == ["3x+1", "3x+5", "3x+7"]
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert csv.read_text().splitlines()[0].startswith("map,definition")
    again = run_cli("compare", "3x+1", "--plot", str(png))
    assert again.returncode == 2 and "already exists" in again.stderr


@pytest.mark.slow
def test_compare_rows_agree_with_the_individual_commands(tmp_path):
    # common practice, no source: compare must re-present what census, floor and count print
    out = run_cli(
        "compare",
        "3x+1",
        "5x+1",
        "--max-length",
        "14",
        "--to",
        "1000",
        "--odd",
        "7",
        "--workers",
        "1",
        "--store",
        str(tmp_path / "st"),
        "--json",
    )
    assert out.returncode == 0, out.stderr
    rows = {m["row"]["map"]: m["row"] for m in json.loads(out.stdout)["maps"]}
    for name in ("3x+1", "5x+1"):
        row = rows[name]
        cen = json.loads(
            run_cli(
                "census",
                name,
                "--max-length",
                "14",
                "--side",
                "both",
                "--workers",
                "1",
                "--store",
                str(tmp_path / f"c-{name}.sqlite"),
                "--json",
            ).stdout
        )
        assert row["census_minima"] == [c["minimum"] for c in cen["cycles"] if c["minimum"] != 0]
        cnt = json.loads(
            run_cli("count", name, "--length", str(row["k"]), "--odd", "7", "--json").stdout
        )
        assert (row["necklaces_at_x"], row["candidates_at_x"]) == (
            cnt["necklaces"],
            cnt["candidates"],
        )
    fl = json.loads(
        run_cli("floor", "3x+1", "--verified-to", "1000", "--side", "both", "--json").stdout
    )
    by_side = {f["side"]: f["least_length"] for f in fl["floors"]}
    assert (rows["3x+1"]["floor_positive_length"], rows["3x+1"]["floor_negative_length"]) == (
        by_side["positive"],
        by_side["negative"],
    )
    assert (
        rows["5x+1"]["floor_positive_length"] is None
    )  # unresolved starts: no verified range, no floor


def test_overview_is_a_view_of_the_table(cmp):
    # common practice, no source: the condensed view re-presents the full table's figures
    rows = cmp.rows()
    view = cmp.overview().records()
    assert [r["map"] for r in view] == [r["map"] for r in rows] == ["3x+1", "5x+1"]
    K, N, X = 16, 2000, 8
    for f, v in zip(rows, view, strict=True):
        assert v[f"cycles of length <= {K} other than 0: primitive / all"] == (
            f["census_primitive_cycles"],
            f["census_cycles"],
        )
        assert v["cycle minima"] == ", ".join(map(str, f["census_minima"]))
        assert v[f"least length of a further cycle, + / -, given 1..{N} verified"] == (
            f["floor_positive_length"],
            f["floor_negative_length"],
        )
        assert v[f"necklaces at x = {X}"] == f["necklaces_at_x"]
        assert v[f"candidates at x = {X}"] == f["candidates_at_x"]
        assert v["drift per step, exact form"] == f["drift_exact"]
    # Lagarias 1985 survey (from memory): 3x+1 cycles up to length 16 have minima 1, -1, -5, -17
    assert view[0]["cycle minima"] == "1, -1, -5, -17"
    labels = cmp.overview().labels
    assert labels["cycle minima"] == "certified"
    assert labels[f"least length of a further cycle, + / -, given 1..{N} verified"] == "proved"
    assert labels["drift per step"] == "rounded"  # a float is never labelled exact
    assert labels[f"necklaces/|D| at x = {X}"] == "heuristic"


def test_compare_command_prints_the_results_overview(monkeypatch):
    # common practice, no source: the command renders the result's own table, builds none
    from click.testing import CliRunner

    from cyclewright.cli.app import cli
    from cyclewright.cycles import compare as compare_module

    shown = []
    real = compare_module.Comparison.overview

    def spy(self):
        t = real(self)
        shown.append(t)
        return t

    monkeypatch.setattr(compare_module.Comparison, "overview", spy)
    res = CliRunner().invoke(
        cli,
        ["compare", "3x+1", "--max-length", "6", "--to", "200", "--odd", "3"]
        + ["--workers", "1", "--no-store"],
    )
    assert res.exit_code == 0, res.output
    assert len(shown) == 1
    assert "Maps side by side (census length K = 6" in " ".join(res.output.split())
    # Lagarias 1985 survey (from memory): up to length 6 the 3x+1 minima are 1, -1, -5
    assert shown[0].records()[0]["cycle minima"] == "1, -1, -5"
    assert "1, -1," in res.output  # the cell as printed (the console may wrap it)


def test_study_compare_defaults_are_the_api_defaults():
    # common practice, no source: one declaration of each default (compare's signature)
    import inspect

    from cyclewright.cli.studyfile import PARAMS, parse_study
    from cyclewright.cycles.compare import COMPARE_DEFAULTS

    sig = inspect.signature(compare).parameters
    for key, value in COMPARE_DEFAULTS.items():
        assert sig[key].default == value
        assert PARAMS["compare"][key][1] == value
    study = parse_study(
        {"study": {"title": "t"}, "maps": {"use": ["3x+1"]}, "analysis": [{"kind": "compare"}]},
        origin="t.toml",
    )
    params = study.analyses[0].params
    assert {k: params[k] for k in COMPARE_DEFAULTS} == COMPARE_DEFAULTS


def test_compare_help_states_the_api_defaults():
    # common practice, no source: --help quotes the defaults compare() really uses
    from click.testing import CliRunner

    from cyclewright.cli.app import cli

    out = " ".join(CliRunner().invoke(cli, ["compare", "--help"]).output.split())
    assert "census length 20, scan 1..10^5 on both sides, counting figures at x = 20" in out
    assert "--executor" in out and "--scheduler ADDR" in out


def test_compare_passes_executor_and_scheduler_on(monkeypatch):
    # common practice, no source: compare's census runs go where scan and census would
    from click.testing import CliRunner

    from cyclewright.cli.app import cli
    from cyclewright.cli.commands import compare_cmd
    from cyclewright.cycles import compare as compare_module

    got = {}

    class Stop(Exception):
        pass

    def fake_compare(maps_, **kw):
        got["cli"] = kw
        raise Stop

    monkeypatch.setattr(compare_cmd, "compare", fake_compare)
    res = CliRunner().invoke(
        cli, ["compare", "3x+1", "--executor", "dask", "--scheduler", "tcp://127.0.0.1:9"]
    )
    assert isinstance(res.exception, Stop)
    assert (got["cli"]["executor"], got["cli"]["scheduler"]) == ("dask", "tcp://127.0.0.1:9")

    def fake_census(m, k, **kw):
        got["census"] = kw
        raise Stop

    monkeypatch.setattr(compare_module, "census", fake_census)
    with pytest.raises(Stop):
        compare(["3x+1"], executor="dask", scheduler="tcp://127.0.0.1:9", store=False)
    assert (got["census"]["executor"], got["census"]["scheduler"]) == ("dask", "tcp://127.0.0.1:9")
    bad = CliRunner().invoke(cli, ["compare", "3x+1", "--executor", "cloud"])
    assert bad.exit_code == 2
