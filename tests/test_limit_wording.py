"""One wording per input limit: the API and the command line refuse a value in the same words.

For every limit of ``cyclewright/cycles/limits.py`` (and the per-analysis
limits declared beside it), a case calls the API with a value beyond it and
runs the command line with the same value: the command line's one error line
must be ``error: `` plus the API's message, with the API's parameter name
(``max_steps``) replaced by the command's option name (``--max-steps``) and
nothing else changed. A study file's refusal of the same value says the same
sentence with its key's name. Values quoted back are shortened (a power as
``10^1000``, any other long value as its ends and digit count), so no line
repeats a long input. Every ``MAX_*`` limit is covered by a case or listed
with the reason it has no command-line twin, and every option named here
appears in docs/limits.md.

The rule (one clear line per refusal, the same words everywhere) is the
project's own (docs/limits.md; common practice, no source). The refusals come
before any work, so the cases run in process in well under a second each and
nothing depends on machine speed.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest

import cyclewright as cw
from cyclewright.cli.app import main
from cyclewright.cli.studyfile import StudyError, load_study
from cyclewright.cycles import limits
from cyclewright.cycles.census import census_family
from cyclewright.cycles.errors import InputError
from cyclewright.cycles.figures import figure_width
from cyclewright.cycles.records import records

DOCS = Path(__file__).resolve().parents[1] / "docs" / "limits.md"


# limit -> [(case id, API call, API parameter or None, command line, option name)]
# A parameter of None: the refusal names no single parameter (a count of
# starts, an estimate of work); the command line then says the API's
# sentence word for word.
CASES: list[tuple] = [
    # (limit, case, api, param, cli args, option)
    (
        "MAX_WORKERS",
        "scan-workers-256",
        lambda: cw.scan("3x+1", 100, workers=256, store=False),
        "workers",
        ["scan", "3x+1", "--to", "100", "--workers", "256", "--no-store"],
        "--workers",
    ),
    (
        "MAX_WORKERS",
        "census-workers-0",
        lambda: cw.census("3x+1", 5, workers=0, store=False),
        "workers",
        ["census", "3x+1", "--max-length", "5", "--workers", "0", "--no-store"],
        "--workers",
    ),
    (
        "MAX_STEP_CAP",
        "orbit-max-steps-10^30",
        lambda: cw.orbit("3x+1", 7, max_steps=10**30),
        "max_steps",
        ["orbit", "3x+1", "7", "--max-steps", "10^30"],
        "--max-steps",
    ),
    (
        "MAX_STEP_CAP",
        "scan-max-steps-0",
        lambda: cw.scan("3x+1", 100, max_steps=0, store=False),
        "max_steps",
        ["scan", "3x+1", "--to", "100", "--max-steps", "0", "--no-store"],
        "--max-steps",
    ),
    (
        "MAX_STEP_CAP",
        "scan-max-length-10^30",
        lambda: cw.scan("3x+1", 100, max_cycle_length=10**30, store=False),
        "max_cycle_length",
        ["scan", "3x+1", "--to", "100", "--max-length", "10^30", "--no-store"],
        "--max-length",
    ),
    (
        "MAX_STEP_CAP",
        "graph-max-steps-2^40",
        lambda: cw.functional_graph("3x+1", 10, max_steps=2**40),
        "max_steps",
        ["graph", "3x+1", "--to", "10", "--max-steps", "2^40"],
        "--max-steps",
    ),
    (
        "MAX_STEP_CAP",
        "scan-chunk-size-10^12",
        lambda: cw.scan("3x+1", 100, chunk_size=10**12, store=False),
        "chunk_size",
        ["scan", "3x+1", "--to", "100", "--chunk-size", "10^12", "--no-store"],
        "--chunk-size",
    ),
    (
        "MAX_RECORDS_STEP_CAP",
        "records-max-steps-10^7",
        lambda: records("3x+1", 100, max_steps=10**7, store=False),
        "max_steps",
        ["records", "3x+1", "--to", "100", "--max-steps", "10^7", "--no-store"],
        "--max-steps",
    ),
    (
        "MAX_RECORDS_TO",
        "records-to-10^30",
        lambda: records("3x+1", 10**30, store=False),
        "to",
        ["records", "3x+1", "--to", "10^30", "--no-store"],
        "--to",
    ),
    (
        "MAX_START",  # the scan store's 64-bit starts (cycles/scan/store.py)
        "scan-to-10^1000",
        lambda: cw.scan("3x+1", 10**1000, store=False),
        "to",
        ["scan", "3x+1", "--to", "10^1000", "--no-store"],
        "--to",
    ),
    (
        "MAX_START",
        "scan-to-3*10^1000",
        lambda: cw.scan("3x+1", 3 * 10**1000, store=False),
        "to",
        ["scan", "3x+1", "--to", "3*10^1000", "--no-store"],
        "--to",
    ),
    (
        "MAX_START_DIGITS",
        "orbit-start-10^5000",
        lambda: cw.orbit("3x+1", 10**5000),
        "n",
        ["orbit", "3x+1", "10^5000"],
        "N",
    ),
    (
        "MAX_START_DIGITS",
        "orbit-start-minus-7*10^1000",
        lambda: cw.orbit("3x+1", -7 * 10**1000),
        "n",
        ["orbit", "3x+1", "-7*10^1000"],
        "N",
    ),
    (
        "MAX_START_DIGITS",
        "floor-verified-to-10^5000",
        lambda: cw.floor("3x+1", 10**5000),
        "verified_to",
        ["floor", "3x+1", "--verified-to", "10^5000"],
        "--verified-to",
    ),
    (
        "MAX_START_DIGITS",
        "graph-ceiling-10^2000",
        lambda: cw.functional_graph("3x+1", 10, ceiling=10**2000),
        "ceiling",
        ["graph", "3x+1", "--to", "10", "--ceiling", "10^2000"],
        "--ceiling",
    ),
    (
        "MAX_CF_CENSUS_LENGTH",
        "census-K-10^30",
        lambda: cw.census("3x+1", 10**30, store=False),
        "max_length",
        ["census", "3x+1", "--max-length", "10^30", "--no-store"],
        "--max-length",
    ),
    (
        "MAX_CENSUS_LENGTH",
        "census-K-2*10^6-general",
        lambda: cw.census("mod3-4x", 2 * 10**6, store=False),
        "max_length",
        ["census", "mod3-4x", "--max-length", "2*10^6", "--no-store"],
        "--max-length",
    ),
    (
        "MAX_CENSUS_LENGTH",
        "compare-K-10^9",
        lambda: cw.compare(["3x+1"], max_length=10**9),
        "max_length",
        ["compare", "3x+1", "--max-length", "10^9"],
        "--max-length",
    ),
    (
        "MAX_FAMILY_MEMBERS",
        "family-offsets-10^30",
        lambda: census_family("3x+k", range(1, 10**30 + 1), 5),
        "ks",
        ["census", "3x+k", "--offsets", "1..10^30", "--max-length", "5", "--no-store"],
        "--offsets",
    ),
    (
        "MAX_TYPE_LENGTH",
        "count-length-10^7",
        lambda: cw.count("3x+1", 10**7, 5),
        "k",
        ["count", "3x+1", "--length", "10^7", "--odd", "5"],
        "--length",
    ),
    (
        "MAX_TYPE_LENGTH",
        "sweep-odd-members-10^6",
        lambda: cw.sweep("3x+1", range(1, 10**6 + 1)),
        "odd",
        ["sweep", "3x+1", "--odd", "1..10^6"],
        "--odd",
    ),
    (
        "MAX_TYPE_LENGTH",
        "sweep-odd-largest-10^6",
        lambda: cw.sweep("3x+1", range(10**6, 10**6 + 3)),
        "odd",
        ["sweep", "3x+1", "--odd", "10^6..10^6+2"],
        "--odd",
    ),
    (
        "MAX_TYPE_LENGTH",
        "compare-odd-10^9",
        lambda: cw.compare(["3x+1"], odd=10**9),
        "odd",
        ["compare", "3x+1", "--odd", "10^9"],
        "--odd",
    ),
    (
        "MAX_EXTRA_LENGTHS",
        "sweep-extra-10^6",
        lambda: cw.sweep("3x+1", range(1, 3), 10**6),
        "extra_lengths",
        ["sweep", "3x+1", "--odd", "1..2", "--extra-lengths", "10^6"],
        "--extra-lengths",
    ),
    (
        "MAX_NEXT_TYPES",
        "floor-next-10^6",
        lambda: cw.floor("3x+1", 100, next_types=10**6),
        "next_types",
        ["floor", "3x+1", "--verified-to", "100", "--next", "10^6"],
        "--next",
    ),
    (
        "MAX_COMPARE_TO",
        "compare-to-10^30",
        lambda: cw.compare(["3x+1"], to=10**30),
        "to",
        ["compare", "3x+1", "--to", "10^30"],
        "--to",
    ),
    (
        "MAX_CHUNKS",
        "scan-chunk-size-1",
        lambda: cw.scan("3x+1", 10**5, chunk_size=1, store=False),
        "chunk_size",
        ["scan", "3x+1", "--to", "10^5", "--chunk-size", "1", "--no-store"],
        "--chunk-size",
    ),
    (
        "MAX_GRAPH_STARTS",
        "graph-to-10^30",
        lambda: cw.functional_graph("3x+1", 10**30),
        None,
        ["graph", "3x+1", "--to", "10^30"],
        None,
    ),
    (
        "MAX_ITINERARY_WORK",
        "census-itineraries-10^5",
        lambda: cw.census("3x+1", 10**5, method="itineraries", store=False),
        None,
        ["census", "3x+1", "--max-length", "10^5", "--method", "itineraries", "--no-store"],
        None,
    ),
    (
        "MEMORY_BUDGET",
        "orbit-memory",
        lambda: cw.orbit("5x+1", 7, max_steps=10**8),
        "max_steps",
        ["orbit", "5x+1", "7", "--max-steps", "10^8", "--ceiling", "none"],
        "--max-steps",
    ),
    (
        "MAX_RECORDS_MINUTES",
        "records-max-minutes-negative",
        lambda: records("3x+1", 100, max_minutes=-1, store=False),
        "max_minutes",
        ["records", "3x+1", "--to", "100", "--max-minutes", "-1", "--no-store"],
        "--max-minutes",
    ),
    (
        "MAX_RECORDS_MINUTES",
        "scan-max-minutes-negative",
        lambda: cw.scan("3x+1", 100, max_minutes=-1, store=False),
        "max_minutes",
        ["scan", "3x+1", "--to", "100", "--max-minutes", "-1", "--no-store"],
        "--max-minutes",
    ),
    (
        "MAX_WIDTH",  # cycles/figures.py
        "orbit-width-20",
        lambda: figure_width(20),
        "width",
        ["orbit", "3x+1", "7", "--plot", "o.png", "--width", "20"],
        "--width",
    ),
    (
        "limit",  # no MAX_: the threshold of an enumeration is only bounded below
        "count-limit-negative",
        lambda: cw.count("3x+1", 10, 5, limit=-1),
        "limit",
        ["count", "3x+1", "--length", "10", "--odd", "5", "--limit", "-1"],
        "--limit",
    ),
]

#: Limits of limits.py with no command-line twin to compare, and why.
NO_TWIN = {
    "MAX_EXCURSION_START": "compare's --to stops at MAX_COMPARE_TO first; no command runs "
    "the excursions alone (the API case is in test_api_limits.py)",
    "MAX_COMPARE_SCAN": "not a refusal of an input: compare's row says its census was not run",
    "MAX_GRAPH_NODES": "reached while the graph is walked, not by one input value "
    "(the API case is in test_api_limits.py)",
    "MAX_ENUMERATION_SECONDS": "an estimate of time, not one input value; its sentence names "
    "no parameter (the API case is in test_api_limits.py)",
    "MAX_SWEEP_SECONDS": "an estimate from rows timed now, not one input value; its sentence "
    "names no parameter (the API case is in test_api_limits.py)",
}


def _api_error(call) -> InputError:
    with pytest.raises(InputError) as info:
        call()
    return info.value


@pytest.fixture
def work(tmp_path, monkeypatch):
    for var, sub in (
        ("CYCLEWRIGHT_CONFIG_DIR", "config"),
        ("CYCLEWRIGHT_DATA_DIR", "data"),
        ("CYCLEWRIGHT_CACHE_DIR", "cache"),
    ):
        monkeypatch.setenv(var, str(tmp_path / sub))
    monkeypatch.chdir(tmp_path)
    return tmp_path


def _cli_line(args: list[str], capsys) -> str:
    with pytest.raises(SystemExit) as info:
        main(args)
    out, err = capsys.readouterr()
    assert info.value.code == 2 and out == "" and err.count("\n") == 1, (info.value.code, err)
    return err.rstrip("\n")


def _quoted_values(line: str) -> list[str]:
    # what follows "got " up to the reason in parentheses (or the end)
    return [m.group(1) for m in re.finditer(r"got (.+?)(?: \((?!\d+ digits\))|$)", line)]


@pytest.mark.parametrize("case", CASES, ids=[c[1] for c in CASES])
def test_cli_says_the_api_sentence_with_its_option_name(case, work, capsys):
    _, _, call, param, args, option = case
    exc = _api_error(call)
    message = str(exc)
    assert "\n" not in message
    if param is None:
        expected = message
    else:
        # the API names its parameter (never an option), the CLI its option
        assert exc.param == param, (exc.param, message)
        assert "--" not in message[: exc.at + len(param)], message
        expected = exc.named(option)
        assert expected != message and option in expected
    line = _cli_line(args, capsys)
    assert line == f"error: {expected}"
    # long values are quoted back short: a power as written, else ends and digit count
    assert not re.search(r"\d{61}", line) and len(line) < 400, line
    for value in _quoted_values(line):
        assert len(value) <= 60, value


def test_a_long_value_is_shown_shortened_the_same_way_on_both_sides(work, capsys):
    # 3*10^1000 is no power: both sides show its ends and its digit count
    exc = _api_error(lambda: cw.orbit("3x+1", 3 * 10**1000))
    assert "30000000000000000000…00000000000000000000 (1001 digits)" in str(exc)
    line = _cli_line(["orbit", "3x+1", "3*10^1000"], capsys)
    assert line == "error: " + exc.named("N")
    # a power reads as a power, whichever way it was written
    exc = _api_error(lambda: cw.scan("3x+1", 100, workers=2**70, store=False))
    assert "got 2^70 (" in str(exc)
    assert _cli_line(["scan", "3x+1", "--to", "100", "--workers", "2^70"], capsys) == (
        "error: " + exc.named("--workers")
    )


STUDY = "[study]\ntitle = 't'\n[maps]\nuse = ['3x+1']\n[[analysis]]\nkind = '{kind}'\n{body}\n"

# a study key refused in the API's words, with the key's name: (kind, body, API call)
STUDY_CASES = [
    ("scan", "max_steps = '10^30'", lambda: cw.scan("3x+1", 100, max_steps=10**30, store=False)),
    ("count", "length = '10^7'\nodd = 5", lambda: cw.count("3x+1", 10**7, 5)),
    ("compare", "odd = '10^9'", lambda: cw.compare(["3x+1"], odd=10**9)),
    ("sweep", "extra_lengths = '10^6'", lambda: cw.sweep("3x+1", range(1, 3), 10**6)),
    ("compare", "to = '10^30'", lambda: cw.compare(["3x+1"], to=10**30)),
    ("records", "to = '10^30'", lambda: records("3x+1", 10**30, store=False)),
    ("records", "max_steps = '10^7'", lambda: records("3x+1", 100, max_steps=10**7, store=False)),
    ("scan", "to = '2^63'", lambda: cw.scan("3x+1", 2**63, store=False)),
    ("floor", "verified_to = '10^5000'", lambda: cw.floor("3x+1", 10**5000)),
    ("graph", "ceiling = '10^2000'", lambda: cw.functional_graph("3x+1", 10, ceiling=10**2000)),
]


@pytest.mark.parametrize(
    "kind, body, call", STUDY_CASES, ids=[f"{c[0]}-{c[1].split(' =')[0]}" for c in STUDY_CASES]
)
def test_a_study_file_says_the_api_sentence_with_its_key(kind, body, call, work):
    exc = _api_error(call)
    key = body.split(" =")[0]
    p = work / "s.toml"
    p.write_text(STUDY.format(kind=kind, body=body))
    with pytest.raises(StudyError) as info:
        load_study(p)
    assert str(info.value).endswith(f"[[analysis]] #1 ({kind}): {exc.named(key)}")


def test_a_time_limit_says_the_api_sentence_in_option_words(work, capsys):
    # MAX_RECORDS_MINUTES: the refusal quotes a measured estimate (heuristic), so the
    # figures may differ between two runs; the words may not. 2^63-1 starts take
    # far beyond 30 minutes on any machine.
    exc = _api_error(lambda: records("3x+1", 2**63 - 1, workers=2, store=False))
    assert exc.param == "max_minutes" and "(max_minutes): raise it, use more workers" in str(exc)
    expected = exc.renamed(
        {"max_minutes": "--max-minutes", "workers": "--workers", "executor": "--executor"}
        | {"scheduler": "--scheduler"}
    )
    line = _cli_line(["records", "3x+1", "--to", "2^63-1", "--workers", "2", "--no-store"], capsys)

    def words(text: str) -> str:  # figures and the units of durations masked
        return re.sub(r"\d[\d.,e+]*( (s|min|h|days|years)\b)?", "#", text)

    assert words(line) == "error: " + words(expected)
    assert (
        "(--max-minutes): raise it, use more --workers or a Dask cluster (--executor dask, --scheduler ADDRESS"
        in line
    )
    # the scan's refusal: the same sentence, built by the same check
    exc = _api_error(lambda: cw.scan("3x+1", 2**63 - 1, workers=2, store=False))
    assert exc.param == "max_minutes" and str(exc).startswith("scan of 3x+1 over")
    expected = exc.renamed(
        {"max_minutes": "--max-minutes", "workers": "--workers", "executor": "--executor"}
        | {"scheduler": "--scheduler"}
    )
    line = _cli_line(["scan", "3x+1", "--to", "2^63-1", "--workers", "2", "--no-store"], capsys)
    assert words(line) == "error: " + words(expected)


def test_every_limit_has_a_case_or_a_reason():
    declared = {n for n in dir(limits) if n.startswith("MAX_")} | {"MEMORY_BUDGET"}
    covered = {c[0] for c in CASES}
    missing = declared - covered - set(NO_TWIN)
    assert not missing, f"limits without a wording case: {sorted(missing)}"
    assert not set(NO_TWIN) & covered


def test_every_option_with_a_limit_is_documented():
    text = DOCS.read_text()
    for _, case, _, _, _, option in CASES:
        if option is not None:
            assert f"`{option}`" in text or f"`{option} " in text, (case, option)


def test_the_wording_is_built_in_one_place():
    # the API's refusal carries its parameter; the option's name comes from one table
    from cyclewright.cli.commands.scan_cmd import scan_cmd
    from cyclewright.cli.options import API_NAMES, option_name

    assert option_name(scan_cmd, "max_cycle_length") == "--max-length"
    assert option_name(scan_cmd, "start") == "--from"
    assert API_NAMES["n"] == ("start",)
    e = InputError("chunk_size 1 cuts 10 starts", param="chunk_size")
    assert e.named("--chunk-size") == "--chunk-size 1 cuts 10 starts"
    # a message that does not name its parameter where it says is left alone
    assert InputError("to is empty", param="workers").named("--workers") == "to is empty"
