"""Bad input across every command, map files, study files and certificates.

Every case must end with exit status 2, exactly one line ``error: ...`` on
stderr, no traceback, nothing on stdout, and every file of the working
directory -- inputs, a results store, a certificate, existing outputs --
byte for byte unchanged, with no new file. The project's rule for bad
input (common practice, no source); the cases are the reproductions of the
issue on extremes plus the usual hostile inputs of each option.

The commands run in process through ``cyclewright.cli.app.main`` (the same
error policy as the console script; a few cases run as a real process too,
see ``test_real_process``).
"""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import pytest
from conftest import run_cli

from cyclewright.cli.app import main

BIG = "1" + "0" * 5000  # 10^5000 written out
HUGE_WORD = "9" * 150_000  # more characters than any integer input may have

# ---------------------------------------------------------------- fixture files
MAP_GOOD = """\
[tri]
divisor = 3
branches.0 = { multiplier = 1, offset = 0 }
branches.1 = { multiplier = 4, offset = -1 }
branches.2 = { multiplier = 4, offset = 1 }
"""

FILES_TEXT: dict[str, str] = {
    "good.toml": MAP_GOOD,
    # a map file redefining a catalog name (the 3x+1 -> 5x+1 case)
    "redef.toml": '[fake]\nname = "3x+1"\nshorthand = "5x+1"\n',
    # an alias taking a catalog name
    "alias.toml": '[mine]\nshorthand = "7x+1"\naliases = ["3x+1"]\n',
    # a name that reads as shorthand but means another map
    "redef_sh.toml": '["7x+3"]\nshorthand = "5x+1"\n',
    "deep.toml": "x = " + "[" * 5000 + "]" * 5000 + "\n",
    "deep_tables.toml": "x = " + "{a = " * 3000 + "1" + "}" * 3000 + "\n",
    "bigint.toml": (
        "[a]\ndivisor = 2\nbranches.0 = {multiplier = 1, offset = 0}\n"
        "branches.1 = {multiplier = 3, offset = " + "1" * 5000 + "}\n"
    ),
    "bigdiv.toml": "[a]\ndivisor = 1000000000000\nbranches.0 = {multiplier = 1, offset = 0}\n",
    "invalid.toml": "[a\n",
    "empty.toml": "",
    "unknown_key.toml": '[a]\nshorthand = "3x+5"\ncolour = "red"\n',
    "bool_div.toml": "[a]\ndivisor = true\n",
    "not_table.toml": "a = 5\n",
    "long_name.toml": '[a]\nname = "' + "n" * 500 + '"\nshorthand = "3x+5"\n',
    "bad_branch.toml": (
        "[m]\ndivisor = 2\nbranches.0 = {multiplier = 1, offset = 0}\n"
        "branches.1 = {multiplier = 3, offset = 0}\n"
    ),
    "residue_key.toml": (
        "[m]\ndivisor = 2\nbranches.0 = {multiplier = 1, offset = 0}\n"
        "branches.x = {multiplier = 3, offset = 1}\n"
    ),
    "override_str.toml": '[m]\nshorthand = "3x+5"\noverride = "yes"\n',
    "toomany.toml": "".join(f'[m{i}]\nshorthand = "{2 * i + 3}x+1"\n' for i in range(12)),
    # studies
    "study_big_verified.toml": (
        "[study]\ntitle = 't'\n[maps]\nuse = ['3x+1']\n"
        "[[analysis]]\nkind = 'floor'\nverified_to = '10^5000'\n"
    ),
    "study_big_census.toml": (
        "[study]\ntitle = 't'\n[maps]\nuse = ['3x+1']\n"
        "[[analysis]]\nkind = 'census'\nmax_length = '10^9'\n"
    ),
    "study_kind.toml": "[study]\ntitle = 't'\n[maps]\nuse = ['3x+1']\n[[analysis]]\nkind = 'magic'\n",
    "study_kind_list.toml": "[study]\ntitle = 't'\n[maps]\nuse = ['3x+1']\n[[analysis]]\nkind = [1]\n",
    "study_analysis_str.toml": "analysis = 'x'\n[study]\ntitle = 't'\n[maps]\nuse = ['3x+1']\n",
    "study_no_title.toml": "[study]\n[maps]\nuse = ['3x+1']\n[[analysis]]\nkind = 'floor'\n",
    # timed before the study starts and refused before anything is written
    "study_records_time.toml": (
        "[study]\ntitle = 't'\n[maps]\nuse = ['3x+1']\n"
        "[[analysis]]\nkind = 'records'\nto = 1000\n"
        "[[analysis]]\nkind = 'records'\nto = '10^7'\nmax_minutes = 0\n"
    ),
    "study_records_minutes.toml": (
        "[study]\ntitle = 't'\n[maps]\nuse = ['3x+1']\n"
        "[[analysis]]\nkind = 'records'\nto = 1000\nmax_minutes = -1\n"
    ),
    "study_range.toml": (
        "[study]\ntitle = 't'\n[maps]\nuse = ['3x+1']\n"
        "[[analysis]]\nkind = 'sweep'\nodd = '1..1000000000'\n"
    ),
    "study_bigint.toml": (
        "[study]\ntitle = 't'\n[maps]\nuse = ['3x+1']\n"
        "[[analysis]]\nkind = 'scan'\nto = " + "7" * 5000 + "\n"
    ),
    "study_redef.toml": (
        "[study]\ntitle = 't'\n[maps]\nuse = ['3x+1']\n"
        "[maps.define.fake]\nname = '3x+1'\nshorthand = '5x+1'\n"
        "[[analysis]]\nkind = 'floor'\n"
    ),
    "study_files_redef.toml": (
        "[study]\ntitle = 't'\n[maps]\nuse = ['3x+1']\nfiles = ['redef.toml']\n"
        "[[analysis]]\nkind = 'floor'\n"
    ),
    "study_unknown_map.toml": (
        "[study]\ntitle = 't'\n[maps]\nuse = ['nosuchmap']\n[[analysis]]\nkind = 'floor'\n"
    ),
    "study_deep.toml": "[study]\ntitle = 't'\n[maps]\nx = " + "[" * 5000 + "]" * 5000 + "\n",
    "study_many.toml": (
        "[study]\ntitle = 't'\n[maps]\nuse = ['3x+1']\n" + "[[analysis]]\nkind = 'floor'\n" * 201
    ),
    "study_steps.toml": (
        "[study]\ntitle = 't'\n[maps]\nuse = ['3x+1']\n"
        "[[analysis]]\nkind = 'scan'\nmax_steps = '10^30'\n"
    ),
    "study_ok.toml": (
        "[study]\ntitle = 't'\n[maps]\nuse = ['3x+1']\n[[analysis]]\nkind = 'floor'\n"
    ),
    "study_side.toml": (
        "[study]\ntitle = 't'\n[maps]\nuse = ['3x+1']\n[[analysis]]\nkind = 'scan'\nside = 'up'\n"
    ),
    # certificates (the good one is written by the fixture)
    "notjson.json": "{not json",
    "deep.json": "[" * 100_000 + "]" * 100_000,
    "wrongformat.json": '{"format": "something else", "version": 1}',
    "list.json": "[1, 2, 3]",
    "bigint.json": '{"format": "cyclewright-census-certificate", "version": ' + "1" * 5000 + "}",
    # existing outputs that must not be replaced
    "existing.csv": "a,b\n1,2\n",
    "existing.png": "not really a png",
    "existing.graphml": "<graphml/>",
}

NOT_UTF8 = b"[a]\nshorthand = '\xff\xfe'\n"


def _tamper(doc: dict, how: str) -> dict:
    doc = json.loads(json.dumps(doc))
    if how == "cycles_str":
        doc["cycles"] = "many"
    elif how == "plans_list":
        doc["plans"] = ["positive"]
    elif how == "null_cycle":
        doc["cycles"] = [None]
    elif how == "null_map":
        doc["map"] = None
    elif how == "branches_str":
        doc["map"]["definition"]["branches"] = "1,0;3,1"
    elif how == "elements_str":
        doc["cycles"][0]["elements"] = "1 2 4"
    elif how == "count_str":
        doc["count"] = "two"
    elif how == "no_cycles":
        del doc["cycles"]
    elif how == "bad_version":
        doc["version"] = 99
    elif how == "sides_empty":
        doc["sides"] = []
    return doc


TAMPERINGS = [
    "cycles_str",
    "plans_list",
    "null_cycle",
    "null_map",
    "branches_str",
    "elements_str",
    "count_str",
    "no_cycles",
    "bad_version",
    "sides_empty",
]


@pytest.fixture(scope="module")
def prepared(tmp_path_factory):
    """A results store and a certificate made once, copied into every case's directory."""
    from cyclewright import maps
    from cyclewright.cycles.census import census
    from cyclewright.cycles.certificate import write_certificate
    from cyclewright.cycles.scan.run import scan

    base = tmp_path_factory.mktemp("prepared")
    scan(maps.get("3x+1"), 2000, store=base / "store.sqlite", workers=1)
    c = census(maps.get("3x+5"), 8, side="positive", store=False, workers=1)
    write_certificate(c, base / "cert.json")
    return base


@pytest.fixture
def ws(tmp_path, prepared, monkeypatch):
    """The working directory of one case: every fixture file, the cwd set to it."""
    work = tmp_path / "ws"
    work.mkdir()
    for name, text in FILES_TEXT.items():
        (work / name).write_text(text)
    (work / "notutf8.toml").write_bytes(NOT_UTF8)
    with open(work / "huge.toml", "wb") as fh:  # sparse: over the size limit, costs nothing
        fh.truncate(17 * 2**20)
    with open(work / "huge.json", "wb") as fh:
        fh.truncate(65 * 2**20)
    with open(work / "study_huge.toml", "wb") as fh:
        fh.truncate(2 * 2**20)
    (work / "adir").mkdir()
    (work / "outdir").mkdir()
    (work / "outdir" / "keep.txt").write_text("someone's file\n")
    shutil.copy(prepared / "store.sqlite", work / "store.sqlite")
    shutil.copy(prepared / "cert.json", work / "cert.json")
    good = json.loads((work / "cert.json").read_text())
    for how in TAMPERINGS:
        (work / f"cert_{how}.json").write_text(json.dumps(_tamper(good, how)))
    monkeypatch.chdir(work)
    return work


def _snapshot(root: Path) -> dict[str, bytes]:
    out = {}
    for p in sorted(root.rglob("*")):
        if p.is_file():
            with open(p, "rb") as fh:
                out[str(p.relative_to(root))] = fh.read()
    return out


def run_main(args: list[str], capsys) -> tuple[int, str, str]:
    with pytest.raises(SystemExit) as info:
        main(args)
    out, err = capsys.readouterr()
    code = info.value.code
    return (0 if code is None else code), out, err


# ---------------------------------------------------------------- the cases
CASES: list[tuple[str, list[str]]] = [
    # orbit
    ("orbit-start-10^5000", ["orbit", "3x+1", "10^5000"]),
    ("orbit-start-written-out", ["orbit", "3x+1", BIG]),
    ("orbit-start-too-long", ["orbit", "3x+1", HUGE_WORD]),
    ("orbit-start-1e999999", ["orbit", "3x+1", "1e999999"]),
    ("orbit-start-text", ["orbit", "3x+1", "abc"]),
    ("orbit-start-float", ["orbit", "3x+1", "2.5"]),
    ("orbit-show-negative", ["orbit", "3x+1", "7", "--show", "-1"]),
    ("orbit-max-steps-0", ["orbit", "3x+1", "7", "--max-steps", "0"]),
    ("orbit-max-steps-10^30", ["orbit", "3x+1", "7", "--max-steps", "1" + "0" * 30]),
    ("orbit-max-steps-memory", ["orbit", "5x+1", "7", "--max-steps", "100000000"]),
    ("orbit-ceiling-below-start", ["orbit", "3x+1", "7", "--ceiling", "3"]),
    ("orbit-ceiling-too-large", ["orbit", "3x+1", "7", "--ceiling", "10^200000"]),
    ("orbit-unknown-map", ["orbit", "nosuchmap", "7"]),
    ("orbit-invalid-shorthand", ["orbit", "2x+1", "7"]),
    ("orbit-missing-map-file", ["orbit", "3x+1", "7", "--maps", "missing.toml"]),
    ("orbit-no-args", ["orbit"]),
    # solve
    ("solve-itinerary-10^6", ["solve", "3x+1", "1^1000000"]),
    ("solve-itinerary-10^12", ["solve", "3x+1", "1^1000000000000"]),
    ("solve-itinerary-repeat-huge", ["solve", "3x+1", "1^" + "9" * 5000]),
    ("solve-itinerary-bad-digit", ["solve", "3x+1", "12"]),
    ("solve-itinerary-text", ["solve", "3x+1", "abc"]),
    ("solve-itinerary-zero-repeat", ["solve", "3x+1", "1^0"]),
    ("solve-itinerary-empty", ["solve", "3x+1", ""]),
    ("solve-redefined-map", ["solve", "3x+1", "10", "--maps", "redef.toml"]),
    # count
    (
        "count-limit-10^5000-huge-type",
        ["count", "3x+1", "--length", "2000", "--odd", "1262", "--limit", "10^5000"],
    ),
    ("count-limit-negative", ["count", "3x+1", "--length", "20", "--odd", "12", "--limit", "-1"]),
    ("count-length-10^6", ["count", "3x+1", "--length", "1000000", "--odd", "5"]),
    ("count-length-negative", ["count", "3x+1", "--length", "-5", "--odd", "2"]),
    ("count-odd-missing", ["count", "3x+1", "--length", "20"]),
    ("count-show-negative", ["count", "3x+1", "--length", "5", "--odd", "3", "--show", "-1"]),
    ("count-content-text", ["count", "3x+1", "--content", "0:a"]),
    ("count-content-twice", ["count", "3x+1", "--content", "0:1,0:2"]),
    ("count-divisor-3-needs-content", ["count", "mod3-4x", "--length", "5", "--odd", "2"]),
    # sweep
    ("sweep-show-negative", ["sweep", "3x+1", "--odd", "1..10", "--show", "-3"]),
    ("sweep-rows-negative-old-spelling", ["sweep", "3x+1", "--odd", "1..10", "--rows", "-3"]),
    # an old spelling, then a refusal in the command body: still one line
    (
        "sweep-old-spelling-body-refusal",
        ["sweep", "3x+1", "--odd", "1..10", "--rows", "3", "--plot", "x.jpg"],
    ),
    ("sweep-extra-10^6", ["sweep", "3x+1", "--odd", "1..3", "--extra-lengths", "10^6"]),
    ("sweep-range-10^9", ["sweep", "3x+1", "--odd", "1..1000000000"]),
    ("sweep-range-expression", ["sweep", "3x+1", "--odd", "1..10^9"]),
    ("sweep-range-reversed", ["sweep", "3x+1", "--odd", "10..1"]),
    ("sweep-plot-not-png", ["sweep", "3x+1", "--odd", "1..10", "--plot", "x.jpg"]),
    ("sweep-csv-exists", ["sweep", "3x+1", "--odd", "1..10", "--csv", "existing.csv"]),
    ("sweep-csv-no-dir", ["sweep", "3x+1", "--odd", "1..10", "--csv", "nodir/x.csv"]),
    ("sweep-extra-negative", ["sweep", "3x+1", "--odd", "1..10", "--extra-lengths", "-1"]),
    ("sweep-limit-10^80", ["sweep", "3x+1", "--odd", "100..101", "--limit", "10^80"]),
    ("sweep-json-and-csv-stdout", ["sweep", "3x+1", "--odd", "1..10", "--json", "--csv", "-"]),
    # census
    ("census-K-10^9", ["census", "3x+1", "--max-length", "10^9"]),
    ("census-K-10^12", ["census", "3x+1", "--max-length", "10^12"]),
    ("census-K-10^30", ["census", "3x+1", "--max-length", "10^30"]),
    ("census-K-10^7-max-scan", ["census", "3x+1", "--max-length", "10^7", "--max-scan", "10"]),
    ("census-K-0", ["census", "3x+1", "--max-length", "0"]),
    ("census-K-2*10^6-general-map", ["census", "mod3-4x", "--max-length", "2*10^6"]),
    ("census-K-2*10^6-family", ["census", "3x+k", "--offsets", "1..5", "--max-length", "2*10^6"]),
    (
        "census-family-10^30",
        ["census", "3x+k", "--offsets", "1.." + "1" + "0" * 30, "--max-length", "5"],
    ),
    ("census-family-no-k", ["census", "3x+k", "--max-length", "5"]),
    ("census-k-for-single-map", ["census", "3x+1", "--max-length", "5", "--offsets", "1..3"]),
    ("census-workers-256", ["census", "3x+1", "--max-length", "5", "--workers", "256"]),
    ("census-workers-0", ["census", "3x+1", "--max-length", "5", "--workers", "0"]),
    ("census-max-scan-negative", ["census", "3x+1", "--max-length", "5", "--max-scan", "-1"]),
    ("census-scan-beyond-max-scan", ["census", "3x+1", "--max-length", "200", "--max-scan", "10"]),
    (
        "census-certificate-exists",
        ["census", "3x+5", "--max-length", "5", "--side", "positive", "--certificate", "cert.json"],
    ),
    (
        "census-itineraries-10^5",
        ["census", "3x+1", "--max-length", "10^5", "--method", "itineraries"],
    ),
    # compare
    ("compare-duplicate", ["compare", "3x+1", "3x+1"]),
    ("compare-duplicate-spelling", ["compare", "3x+1", "3x + 1"]),
    ("compare-K-10^9", ["compare", "3x+1", "--max-length", "10^9"]),
    ("compare-family-10^30", ["compare", "3x+k", "--offsets", "1.." + "1" + "0" * 30]),
    ("compare-to-0", ["compare", "3x+1", "--to", "0"]),
    ("compare-odd-10^9", ["compare", "3x+1", "--odd", "10^9"]),
    ("compare-to-2^62", ["compare", "3x+1", "--to", "2^62"]),
    ("compare-workers-256", ["compare", "3x+1", "--workers", "256"]),
    ("compare-csv-exists", ["compare", "3x+1", "--csv", "existing.csv"]),
    # records
    ("records-to-2^63-1", ["records", "3x+1", "--to", "2^63-1", "--csv", "new.csv"]),
    ("records-both-to-2^62", ["records", "3x+1", "--to", "2^62", "--side", "both"]),
    ("records-memory-step-cap-10^6", ["records", "5x+1", "--to", "1000", "--max-steps", "10^6"]),
    ("records-max-minutes-0", ["records", "3x+1", "--to", "10^7", "--max-minutes", "0"]),
    ("records-max-minutes-text", ["records", "3x+1", "--to", "100", "--max-minutes", "abc"]),
    ("records-max-minutes-negative", ["records", "3x+1", "--to", "100", "--max-minutes", "-1"]),
    ("records-max-minutes-inf", ["records", "3x+1", "--to", "100", "--max-minutes", "inf"]),
    ("records-plan-empty-range", ["records", "3x+1", "--to", "10", "--from", "20", "--plan"]),
    # scan
    ("scan-to-10^5000", ["scan", "3x+1", "--to", "10^5000"]),
    ("scan-to-10^1000", ["scan", "3x+1", "--to", "10^1000"]),
    ("scan-to-10^5000-store", ["scan", "3x+1", "--to", "10^5000", "--store", "store.sqlite"]),
    ("scan-chunk-size-1", ["scan", "3x+1", "--to", "10^5", "--chunk-size", "1", "--no-store"]),
    ("scan-chunk-size-0", ["scan", "3x+1", "--to", "100", "--chunk-size", "0", "--no-store"]),
    (
        "scan-max-steps-10^30",
        ["scan", "3x+1", "--to", "100", "--max-steps", "1" + "0" * 30, "--store", "store.sqlite"],
    ),
    ("scan-max-steps-0", ["scan", "3x+1", "--to", "100", "--max-steps", "0", "--no-store"]),
    ("scan-workers-256", ["scan", "3x+1", "--to", "100", "--workers", "256", "--no-store"]),
    ("scan-show-negative", ["scan", "3x+1", "--to", "100", "--show", "-2", "--no-store"]),
    ("scan-empty-range", ["scan", "3x+1", "--to", "10", "--from", "100", "--no-store"]),
    ("scan-store-and-no-store", ["scan", "3x+1", "--to", "100", "--store", "x", "--no-store"]),
    ("scan-to-0", ["scan", "3x+1", "--to", "0", "--no-store"]),
    ("scan-to-text", ["scan", "3x+1", "--to", "abc", "--no-store"]),
    ("scan-cycle-length-0", ["scan", "3x+1", "--to", "100", "--max-length", "0"]),
    ("scan-store-not-a-store", ["scan", "3x+1", "--to", "100", "--store", "good.toml"]),
    # graph
    ("graph-plot-huge", ["graph", "3x+1", "--to", "100000", "--plot", "big.png"]),
    ("graph-plot-unknown-format", ["graph", "3x+1", "--to", "10", "--plot", "g.jpgx"]),
    ("graph-to-10^9", ["graph", "3x+1", "--to", "10^9"]),
    ("graph-to-10^5000", ["graph", "3x+1", "--to", "10^5000"]),
    ("graph-empty-range", ["graph", "3x+1", "--to", "10", "--from", "20"]),
    ("graph-ceiling-below", ["graph", "3x+1", "--to", "10", "--ceiling", "5"]),
    ("graph-output-exists", ["graph", "3x+1", "--to", "10", "--graphml", "existing.graphml"]),
    (
        "graph-outputs-same-file",
        ["graph", "3x+1", "--to", "10", "--graphml", "a.x", "--dot", "a.x"],
    ),
    ("graph-max-steps-0", ["graph", "3x+1", "--to", "10", "--max-steps", "0"]),
    ("graph-max-steps-10^30", ["graph", "3x+1", "--to", "10", "--max-steps", "10^30"]),
    # escaping orbits add nodes the starts do not bound: the walk stops at the node limit
    ("graph-escaping-orbits-node-limit", ["graph", "5x+1", "--to", "100000"]),
    ("graph-ceiling-10^2000", ["graph", "3x+1", "--to", "10", "--ceiling", "10^2000"]),
    # floor
    ("floor-verified-10^5000", ["floor", "3x+1", "--verified-to", "10^5000"]),
    ("floor-verified-10^10000", ["floor", "3x+1", "--verified-to", "10^10000"]),
    ("floor-verified-10^99999", ["floor", "3x+1", "--verified-to", "10^99999"]),
    ("floor-verified-0", ["floor", "3x+1", "--verified-to", "0"]),
    ("floor-verified-negative", ["floor", "3x+1", "--verified-to", "-5"]),
    ("floor-verified-text", ["floor", "3x+1", "--verified-to", "abc"]),
    ("floor-next-5000", ["floor", "3x+1", "--verified-to", "100", "--next", "5000"]),
    # map files
    ("mapfile-redefines-catalog-name", ["maps", "--maps", "redef.toml"]),
    ("mapfile-alias-takes-catalog-name", ["maps", "--maps", "alias.toml"]),
    ("mapfile-redefines-shorthand", ["maps", "--maps", "redef_sh.toml"]),
    ("mapfile-deep-arrays", ["maps", "--maps", "deep.toml"]),
    ("mapfile-deep-tables", ["maps", "--maps", "deep_tables.toml"]),
    ("mapfile-5000-digit-integer", ["maps", "--maps", "bigint.toml"]),
    ("mapfile-divisor-10^12", ["maps", "--maps", "bigdiv.toml"]),
    ("mapfile-over-size-limit", ["maps", "--maps", "huge.toml"]),
    ("mapfile-not-utf8", ["maps", "--maps", "notutf8.toml"]),
    ("mapfile-invalid-toml", ["maps", "--maps", "invalid.toml"]),
    ("mapfile-empty", ["maps", "--maps", "empty.toml"]),
    ("mapfile-unknown-key", ["maps", "--maps", "unknown_key.toml"]),
    ("mapfile-divisor-bool", ["maps", "--maps", "bool_div.toml"]),
    ("mapfile-not-a-table", ["maps", "--maps", "not_table.toml"]),
    ("mapfile-long-name", ["maps", "--maps", "long_name.toml"]),
    ("mapfile-bad-branch", ["maps", "--maps", "bad_branch.toml"]),
    ("mapfile-residue-key", ["maps", "--maps", "residue_key.toml"]),
    ("mapfile-override-not-bool", ["maps", "--maps", "override_str.toml"]),
    ("mapfile-missing", ["maps", "--maps", "missing.toml"]),
    ("mapfile-directory", ["maps", "--maps", "adir"]),
    ("mapfile-too-many-maps", ["maps", "--maps", "toomany.toml"]),
    # study files
    ("study-missing", ["study", "missing.toml", "--out", "o"]),
    ("study-verified-10^5000", ["study", "study_big_verified.toml", "--out", "o"]),
    ("study-census-10^9", ["study", "study_big_census.toml", "--out", "o"]),
    ("study-unknown-kind", ["study", "study_kind.toml", "--out", "o"]),
    ("study-kind-list", ["study", "study_kind_list.toml", "--out", "o"]),
    ("study-analysis-string", ["study", "study_analysis_str.toml", "--out", "o"]),
    ("study-no-title", ["study", "study_no_title.toml", "--out", "o"]),
    ("study-records-beyond-max-minutes", ["study", "study_records_time.toml", "--out", "o"]),
    ("study-records-max-minutes-negative", ["study", "study_records_minutes.toml", "--out", "o"]),
    ("study-range-10^9", ["study", "study_range.toml", "--out", "o"]),
    ("study-5000-digit-integer", ["study", "study_bigint.toml", "--out", "o"]),
    ("study-inline-redefinition", ["study", "study_redef.toml", "--out", "o"]),
    ("study-map-file-redefinition", ["study", "study_files_redef.toml", "--out", "o"]),
    ("study-unknown-map", ["study", "study_unknown_map.toml", "--out", "o"]),
    ("study-deep", ["study", "study_deep.toml", "--out", "o"]),
    ("study-201-analyses", ["study", "study_many.toml", "--out", "o"]),
    ("study-max-steps-10^30", ["study", "study_steps.toml", "--out", "o"]),
    ("study-bad-side", ["study", "study_side.toml", "--out", "o"]),
    ("study-over-size-limit", ["study", "study_huge.toml", "--out", "o"]),
    ("study-not-toml", ["study", "invalid.toml", "--out", "o"]),
    ("study-workers-256", ["study", "study_kind.toml", "--out", "o", "--workers", "256"]),
    ("study-out-not-empty", ["study", "study_ok.toml", "--out", "outdir"]),
    ("study-out-is-a-file", ["study", "study_ok.toml", "--out", "good.toml"]),
    # certificates
    ("verify-not-json", ["verify", "notjson.json"]),
    ("verify-deep", ["verify", "deep.json"]),
    ("verify-wrong-format", ["verify", "wrongformat.json"]),
    ("verify-list", ["verify", "list.json"]),
    ("verify-5000-digit-integer", ["verify", "bigint.json"]),
    ("verify-over-size-limit", ["verify", "huge.json"]),
    ("verify-missing", ["verify", "missing.json"]),
    ("verify-a-map-file", ["verify", "good.toml"]),
    *[(f"verify-{how.replace('_', '-')}", ["verify", f"cert_{how}.json"]) for how in TAMPERINGS],
    # the group
    ("unknown-command", ["frobnicate"]),
    ("unknown-option", ["orbit", "3x+1", "7", "--frobnicate"]),
    ("demo-workers-0", ["demo", "--workers", "0"]),
]


def test_at_least_a_hundred_cases():
    ids = [c[0] for c in CASES]
    assert len(ids) == len(set(ids)) and len(ids) >= 100
    commands = {c[1][0] for c in CASES}
    assert {"orbit", "solve", "count", "sweep", "census", "compare", "scan", "graph"} <= commands
    assert {"floor", "maps", "study", "verify", "demo"} <= commands


@pytest.mark.parametrize("args", [c[1] for c in CASES], ids=[c[0] for c in CASES])
def test_bad_input_is_one_line_exit_2_and_changes_nothing(ws, args, capsys, monkeypatch):
    import cyclewright.maps.mapfile as mapfile

    monkeypatch.setattr(mapfile, "MAX_MAPS_PER_FILE", 10)  # toomany.toml has 12
    before = _snapshot(ws)
    code, out, err = run_main(args, capsys)
    lines = err.strip().splitlines()
    assert code == 2, (code, err[:500])
    assert len(lines) == 1 and lines[0].startswith("error: "), err[:500]
    assert "Traceback" not in err and "internal failure" not in err
    assert len(lines[0]) < 600, lines[0][:200]  # long inputs are quoted shortened
    assert out == "", out[:300]
    assert _snapshot(ws) == before  # inputs, store, certificate, outputs: byte for byte


@pytest.mark.parametrize(
    "args",
    [
        ["orbit", "3x+1", "10^5000"],
        ["solve", "3x+1", "10", "--maps", "redef.toml"],
        ["verify", "cert_cycles_str.json"],
        ["maps", "--maps", "deep.toml"],
    ],
)
def test_real_process(ws, args):
    # the console entry as a user runs it: one line, exit 2, nothing written
    before = _snapshot(ws)
    res = run_cli(*args, cwd=ws)
    assert res.returncode == 2, res.stderr
    assert res.stderr.count("\n") == 1 and res.stderr.startswith("error: ")
    assert "Traceback" not in res.stderr and res.stdout == ""
    assert _snapshot(ws) == before


def test_error_quotes_long_input_shortened(ws, capsys):
    code, _, err = run_main(["scan", "3x+1", "--to", "10^1000", "--no-store"], capsys)
    assert code == 2 and len(err) < 300 and "got 10^1000 (" in err
    code, _, err = run_main(["scan", "3x+1", "--to", "3*10^1000", "--no-store"], capsys)
    assert code == 2 and len(err) < 300 and "(1001 digits)" in err
    code, _, err = run_main(["orbit", "3x+1", HUGE_WORD], capsys)
    assert code == 2 and len(err) < 300 and "150000 characters" in err


def test_old_spelling_note_joins_a_refusal_in_the_command_body(ws, capsys):
    # the note waits for the command's outcome: folded into the one error line on a
    # refusal (here by the output check in the body), printed after a success
    args = ["sweep", "3x+1", "--odd", "1..10", "--rows", "3", "--plot", "x.jpg"]
    code, out, err = run_main(args, capsys)
    assert code == 2 and out == "" and err.count("\n") == 1
    assert err.startswith("error: ") and "(note: --rows is an old spelling of --show)" in err
    code, out, err = run_main(["sweep", "3x+1", "--odd", "1..3", "--rows", "2"], capsys)
    assert code == 0 and out
    assert err.strip().splitlines()[-1] == "note: --rows is an old spelling of --show"


# ---------------------------------------------------------------- audit of the extremes
MAP_DIV_1000 = "[big]\ndivisor = 1000\n" + "".join(
    f"branches.{r} = {{multiplier = 1001, offset = {-r}}}\n" for r in range(1000)
)

AUDIT_CASES: list[tuple[str, list[str]]] = [
    # an output where no file can be created: refused before the work, not an internal failure
    ("orbit-plot-unwritable-dir", ["orbit", "3x+1", "27", "--plot", "/proc/x.png"]),
    ("sweep-csv-unwritable-dir", ["sweep", "3x+1", "--odd", "1..3", "--csv", "/proc/x.csv"]),
    ("study-out-unwritable", ["study", "study_ok.toml", "--out", "/proc/o"]),
    ("study-out-under-a-file", ["study", "study_ok.toml", "--out", "good.toml/o"]),
    ("demo-out-unwritable", ["demo", "--out", "/proc/d"]),
    (
        "census-certificate-no-dir",
        ["census", "3x+5", "--max-length", "8", "--no-store", "--certificate", "nodir/c.json"],
    ),
    (
        "census-certificate-is-the-store",
        [
            "census",
            "3x+5",
            "--max-length",
            "8",
            "--store",
            "new.sqlite",
            "--certificate",
            "new.sqlite",
        ],
    ),
    # an output that is an input of the command, even with --force
    (
        "sweep-csv-is-the-map-file",
        ["sweep", "tri", "--odd", "1..3", "--maps", "good.toml", "--csv", "good.toml", "--force"],
    ),
    (
        "graph-gexf-is-the-map-file",
        ["graph", "tri", "--to", "10", "--maps", "good.toml", "--gexf", "good.toml", "--force"],
    ),
    (
        "sweep-csv-is-the-store",
        [
            "sweep",
            "3x+1",
            "--odd",
            "1..3",
            "--csv",
            "store.sqlite",
            "--force",
            "--maps",
            "store.sqlite",
        ],
    ),
    # two outputs naming one file
    (
        "sweep-plot-and-csv-same",
        ["sweep", "3x+1", "--odd", "1..10", "--plot", "a.png", "--csv", "a.png"],
    ),
    ("compare-plot-and-csv-same", ["compare", "3x+1", "--plot", "a.png", "--csv", "a.png"]),
    ("scan-store-empty-path", ["scan", "3x+1", "--to", "100", "--store", ""]),
    # work that would not finish, refused before it starts
    ("sweep-divisor-1000", ["sweep", "big", "--odd", "1..2", "--maps", "div1000.toml"]),
    ("count-one-odd-step-10^5", ["count", "3x+1", "--length", "100000", "--odd", "1"]),
    (
        "scan-growing-orbits-step-cap",
        ["scan", "5x+1", "--to", "1000", "--max-steps", "10^9", "--no-store"],
    ),
    # a map file that is a pipe: opening it would wait for a writer forever
    ("mapfile-fifo", ["maps", "--maps", "pipe.toml"]),
]


@pytest.mark.parametrize("args", [c[1] for c in AUDIT_CASES], ids=[c[0] for c in AUDIT_CASES])
def test_audit_cases_are_one_line_exit_2_and_change_nothing(ws, args, capsys):
    import os

    (ws / "div1000.toml").write_text(MAP_DIV_1000)
    os.mkfifo(ws / "pipe.toml")
    before = _snapshot(ws)
    code, out, err = run_main(args, capsys)
    lines = err.strip().splitlines()
    assert code == 2, (code, err[:500])
    assert len(lines) == 1 and lines[0].startswith("error: "), err[:500]
    assert "Traceback" not in err and "internal failure" not in err
    assert out == "", out[:300]
    assert _snapshot(ws) == before


def test_valid_long_type_counts_where_its_float_estimate_overflowed(ws, capsys):
    # k = 2000, x = 1: the bound's float estimate overflowed (internal failure); a valid type
    code, out, err = run_main(["count", "3x+1", "--length", "2000", "--odd", "1"], capsys)
    assert code == 0 and "internal failure" not in err and "k=2000, x=1" in out


def test_certificate_with_a_huge_bound_or_repeated_cycles_fails_its_check(ws, capsys):
    # a tampered certificate is "does not hold" (exit 1, fields named), never an internal
    # failure, and a cycle repeated many times is found before any is iterated
    good = json.loads((ws / "cert.json").read_text())
    huge = json.loads(json.dumps(good))
    huge["plans"]["positive"]["bound"] = 10**4000
    (ws / "huge_bound.json").write_text(json.dumps(huge))
    many = json.loads(json.dumps(good))
    many["cycles"] = many["cycles"] * 20000
    (ws / "many.json").write_text(json.dumps(many))
    for name in ("huge_bound.json", "many.json"):
        code, out, err = run_main(["verify", name], capsys)
        assert code == 1 and "internal failure" not in err, (name, err[:300])
        assert "does NOT hold" in out
    code, out, _ = run_main(["verify", "many.json"], capsys)
    assert "listed twice" in out


# ---------------------------------------------------------------- stores, --width, study keys
SMALL_FILES = {
    "study_store_key.toml": (
        "[study]\ntitle = 't'\nstore = 'results.sqlite'\n[maps]\nuse = ['3x+1']\n"
        "[[analysis]]\nkind = 'floor'\n"
    ),
}

SMALL_CASES: list[tuple[str, list[str]]] = [
    # a --store file that is no store, or a scan store of another map: the records
    # store named after it would be written beside it
    ("records-store-is-a-map-file", ["records", "3x+1", "--to", "100", "--store", "good.toml"]),
    ("records-store-of-another-map", ["records", "5x+1", "--to", "100", "--store", "store.sqlite"]),
    ("stores-list-a-map-file", ["stores", "list", "--store", "good.toml"]),
    ("stores-list-nothing-there", ["stores", "list", "--store", "nowhere"]),
    # --width sizes the --plot figure: without --plot it would be ignored
    ("orbit-width-without-plot", ["orbit", "3x+1", "7", "--width", "double"]),
    ("sweep-width-without-plot", ["sweep", "3x+1", "--odd", "1..3", "--width", "4"]),
    ("records-width-without-plot", ["records", "3x+1", "--to", "10", "--width", "single"]),
    ("graph-width-without-plot", ["graph", "3x+1", "--to", "10", "--width", "single"]),
    ("compare-width-without-plot", ["compare", "3x+1", "--width", "single"]),
    # a study key that was read and never used
    ("study-store-key", ["study", "study_store_key.toml", "--out", "o"]),
]


@pytest.mark.parametrize("args", [c[1] for c in SMALL_CASES], ids=[c[0] for c in SMALL_CASES])
def test_small_cases_one_line_exit_2_and_change_nothing(ws, args, capsys):
    for name, text in SMALL_FILES.items():
        (ws / name).write_text(text)
    before = _snapshot(ws)
    code, out, err = run_main(args, capsys)
    lines = err.strip().splitlines()
    assert code == 2, (code, err[:500])
    assert len(lines) == 1 and lines[0].startswith("error: "), err[:500]
    assert out == "" and "Traceback" not in err
    assert _snapshot(ws) == before
    assert not (ws / "good-records.db").exists()


def test_records_store_beside_a_scan_store_of_the_same_map(ws, capsys):
    # the case the check must keep: a scan store of this map names its records store
    code, out, err = run_main(["records", "3x+1", "--to", "100", "--store", "store.sqlite"], capsys)
    assert code == 0, err
    assert (ws / "store-records.db").is_file()


def test_refusals_name_the_store_and_why(ws, capsys):
    code, _, err = run_main(["records", "5x+1", "--to", "100", "--store", "store.sqlite"], capsys)
    assert code == 2 and "holds scans of 3x+1, not of 5x+1" in err and "--store" in err
    code, _, err = run_main(["stores", "list", "--store", "good.toml"], capsys)
    assert code == 2 and "good.toml is not a cyclewright results store" in err


def test_a_map_starting_with_minus_reads_the_same_in_every_command(ws, capsys):
    # count has a short option -x: "-3x+1" must still be the map, as in orbit
    code, out, err = run_main(["count", "-3x+1", "--length", "5", "--odd", "3"], capsys)
    assert code == 0, err
    assert out.startswith("-3x+1, type k=5, x=3")
    code, out, err = run_main(["orbit", "-3x+1", "7"], capsys)
    assert code == 0 and out.startswith("-3x+1, start 7")
    # and in a group's subcommands
    code, out, err = run_main(["maps", "show", "-3x+1"], capsys)
    assert code == 0 and out.startswith("-3x+1"), err
    code, out, err = run_main(["stores", "remove", "-3x+1"], capsys)
    assert code == 2 and err.startswith("error: -3x+1 has no store"), err


def test_unknown_map_quotes_a_long_word_shortened(ws, capsys):
    word = "x" * 100_000
    code, _, err = run_main(["orbit", word, "7"], capsys)
    assert code == 2 and len(err) < 400
    assert "unknown map 'xxxxxxxxxxxxxxxxxxxx…xxxxxxxxxxxxxxxxxxxx' (100000 characters):" in err


def test_a_large_negative_start_quotes_the_bound_as_a_limit(ws, capsys):
    # docs/limits.md "One wording per limit": the bound as a power, the input as typed
    code, _, err = run_main(["orbit", "3x+1", "-10^5000"], capsys)
    assert code == 2
    assert err.strip() == "error: N must be at least -10^1000, got -10^5000"


# ------------------------------------------------ scan: the time refused up front
SCAN_TIME_CASES = [
    # the range's chunks timed (sieve counted): 2^63 starts take years on any machine
    ["scan", "3x+1", "--to", "2^63-1", "--no-store"],
    ["scan", "3x+1", "--to", "2^63-1", "--side", "both", "--max-length", "1000"],
    # orbits that grow: walks with growing step caps, scaled; 0.001 min is 60 ms
    [
        "scan",
        "5x+1",
        "--to",
        "1000",
        "--max-steps",
        "10^7",
        "--workers",
        "1",
        "--max-minutes",
        "0.001",
    ],
    ["scan", "3x+1", "--to", "100", "--max-minutes", "-1"],
    ["scan", "3x+1", "--to", "100", "--max-minutes", "inf"],
    ["scan", "3x+1", "--to", "100", "--max-minutes", "soon"],
    # a family census and a comparison as a whole: any estimate is above 0 minutes
    ["census", "3x+k", "--offsets", "1..10000", "--max-length", "20", "--max-minutes", "0"],
    ["census", "3x+k", "--offsets", "1..100", "--max-length", "20", "--max-minutes", "-1"],
    ["compare", "5x+1", "7x+1", "--no-store", "--max-minutes", "0"],
    ["compare", "3x+1", "--no-store", "--max-minutes", "-1"],
]


@pytest.mark.parametrize("args", SCAN_TIME_CASES, ids=lambda a: " ".join(a[1:]))
def test_scan_time_is_refused_before_any_work(ws, args, capsys):
    before = _snapshot(ws)
    code, out, err = run_main(args, capsys)
    assert code == 2 and out == "" and err.count("\n") == 1 and err.startswith("error: ")
    assert "Traceback" not in err and _snapshot(ws) == before  # no store, nothing written
    if "--max-minutes" not in args or args[-1] in ("0.001", "0"):
        assert "beyond the limit of" in err and "(--max-minutes): raise it" in err
        assert "heuristic" in err
    if args[0] == "scan" and "--max-minutes" not in args or args[-1] == "0.001":
        assert "--workers" in err
