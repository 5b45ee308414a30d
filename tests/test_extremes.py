"""Extremes: huge integers, huge lengths and hostile files give results or refusals, never crashes.

Valid inputs whose figures pass Python's 4300-digit limit on integer/text
conversion give exact results (all digits in JSON, elided digits in
tables, ``~10^x`` for bounds); an orbit stops at a value cap reported as an
escape; work that cannot finish is refused before it starts (see
tests/test_bad_input.py for the refusals). No test here depends on the
machine's speed.
"""

from __future__ import annotations

import contextlib
import json
import math
import sys

import pytest

from cyclewright import maps
from cyclewright.cli.app import main
from cyclewright.cli.numbers import MAX_DIGITS, int_expression, limit_text, quote
from cyclewright.cli.render import int_digits, magnitude, short
from cyclewright.cycles.orbit import default_ceiling, orbit, orbit_memory_estimate


@contextlib.contextmanager
def digits_lifted():
    old = sys.get_int_max_str_digits()
    sys.set_int_max_str_digits(0)
    try:
        yield
    finally:
        sys.set_int_max_str_digits(old)


def run(args, capsys):
    with pytest.raises(SystemExit) as info:
        main(list(args))
    out, err = capsys.readouterr()
    return info.value.code or 0, out, err


def run_json(args, capsys):
    code, out, err = run([*args, "--json"], capsys)
    assert code == 0, err
    with digits_lifted():
        return json.loads(out)


# ------------------------------------------------------------------ the formatter
def test_short_and_magnitude_never_convert_past_the_limit():
    # under Python's default limit, the formatter still renders any integer
    assert sys.get_int_max_str_digits() in (0, 4300)
    n = 3**30000  # 14314 digits
    assert int_digits(n) == 14314  # common practice, no source: floor(30000 log10 3) + 1
    text = short(n)
    assert text.endswith("(14314 digits)") and "…" in text
    with digits_lifted():
        full = str(n)
    assert text.startswith(full[:20]) and text.split("…")[1].startswith(full[-20:])
    assert magnitude(n) == f"~10^{30000 * math.log10(3):.2f}"
    assert int_digits(10**5000) == 5001 and int_digits(10**5000 - 1) == 5000


def test_int_expression_limits_and_quoting():
    assert int_expression("10^99999") == 10**99999
    for text in ("10^100000", "1e100001", "10^60000*10^60000", "9" * 100_001):
        with pytest.raises(ValueError, match="too"):
            int_expression(text)
    assert int_digits(int_expression("9" * MAX_DIGITS)) == MAX_DIGITS
    assert quote("x" * 1000).endswith("(1000 characters)") and len(quote("x" * 1000)) < 70
    assert limit_text(10**30) == "10^30" and limit_text(2**63 - 1) == "2^63-1"


# ------------------------------------------------------------------ orbits
def test_orbit_value_cap_reports_an_escape():
    m = maps.get("5x+1")
    o = orbit(m, 7, max_steps=10**5)
    assert o.status == "escaped" and o.ceiling == default_ceiling(7) == 7 * 10**1000
    assert abs(o.values[-1]) > 7 * 10**1000 >= max(abs(v) for v in o.values[:-1])
    # independent plain iteration: the first value above the cap is reached at the same step
    n, steps = 7, 0
    while n <= 7 * 10**1000:
        n = n // 2 if n % 2 == 0 else (5 * n + 1) // 2
        steps += 1
    assert steps == o.steps and n == o.values[-1]  # common practice, no source
    assert orbit_memory_estimate(10**5, 10**1000) < 10**8


def test_orbit_5x1_7_with_default_options_escapes(capsys):
    doc = run_json(["orbit", "5x+1", "7"], capsys)
    assert doc["status"] == "escaped" and doc["values"][0] == 7  # passed the default ceiling
    code, out, _ = run(["orbit", "5x+1", "7"], capsys)
    assert code == 0 and "escaped" in out and "the ceiling" in out
    # without a ceiling the value cap still stops it, with thousand-digit values shown
    args = ["orbit", "5x+1", "7", "--ceiling", "none", "--max-steps", "10^5"]
    doc = run_json(args, capsys)
    assert doc["status"] == "escaped" and int_digits(doc["peak"]) >= 1001
    code, out, _ = run(args, capsys)
    assert code == 0 and "value cap" in out and "digits)" in out


def test_orbit_of_a_thousand_digit_start(capsys):
    doc = run_json(["orbit", "3x+1", "10^999", "--ceiling", "none", "--max-steps", "10^5"], capsys)
    # 10^999 = 2^999 5^999: the first 999 steps halve it (common practice, no source)
    assert doc["values"][999] == 5**999 and doc["status"] == "cycle"
    assert doc["cycle"] == [1, 2]  # the trivial cycle of 3x+1 (Lagarias 1985)


# ------------------------------------------------------------------ counting and solving
@pytest.mark.parametrize("k,x", [(20000, 12619), (15850, 10000)])
def test_count_types_with_thousands_of_digits(capsys, k, x):
    doc = run_json(["count", "3x+1", "--length", str(k), "--odd", str(x)], capsys)
    with digits_lifted():
        assert doc["denominator"] == 2**k - 3**x  # D = 2^k - 3^x (Böhm and Sontacchi 1978)
        assert doc["words"] == math.comb(k, x)  # words with x ones: binomial (Python's math.comb)
    code, out, err = run(["count", "3x+1", "--length", str(k), "--odd", str(x)], capsys)
    assert code == 0, err
    assert "digits)" in out


def test_count_181x1_table_and_json(capsys):
    doc = run_json(["count", "181x+1", "--length", "15", "--odd", "2"], capsys)
    assert isinstance(doc["candidates_linear_forms"], int)  # exact, all digits
    # the two cycles of 181x+1 of length 15 (from memory: minima 27 and 35)
    assert sorted(c["minimum"] for c in doc["integer_cycles"]) == [27, 35]
    code, out, _ = run(["count", "181x+1", "--length", "15", "--odd", "2"], capsys)
    assert code == 0 and "proved" in out


def test_a_bound_is_shown_by_its_size():
    from cyclewright.cli.render import jsonable, tex_number
    from cyclewright.cycles.presentation import Magnitude

    b = Magnitude(3**10000)  # common practice, no source: 10000 log10 3 = 4771.21
    assert short(b) == "~10^4771.21" and tex_number(b) == "$\\sim 10^{4771.21}$"
    assert jsonable({"b": b})["b"] == 3**10000  # JSON keeps every digit
    assert tex_number(10**60).endswith("(61 digits)")


def test_latex_tables_follow_the_same_rule(capsys):
    code, out, _ = run(["count", "3x+1", "--length", "20000", "--odd", "12619", "--latex"], capsys)
    assert code == 0 and "(5713 digits)" in out and len(out) < 20_000


def test_solve_an_itinerary_of_ten_thousand_letters(capsys):
    doc = run_json(["solve", "3x+1", "1^10000"], capsys)
    # all odd steps: the fixed point of n -> (3n+1)/2 is -1 (common practice, no source)
    assert doc["minimum"] == "-1" and doc["length"] == 10000
    code, out, _ = run(["solve", "3x+1", "1^10000"], capsys)
    assert code == 0 and "(length 10000" in out and "fixed point: -1" in out


def test_sweep_rows_with_thousand_digit_figures(capsys):
    doc = run_json(["sweep", "3x+1", "--odd", "9995..10000"], capsys)
    assert len(doc["rows"]) == 6
    code, out, _ = run(["sweep", "3x+1", "--odd", "9995..10000"], capsys)
    assert code == 0 and "digits)" in out


def test_floor_with_a_thousand_digit_range(capsys):
    doc = run_json(["floor", "3x+1", "--verified-to", "10^999"], capsys)
    assert doc  # a result, not a refusal


def test_study_with_huge_figures(tmp_path, capsys):
    study = tmp_path / "big.toml"
    study.write_text(
        "[study]\ntitle = 'big'\n[maps]\nuse = ['3x+1']\n"
        "[[analysis]]\nkind = 'count'\nlength = 20000\nodd = 12619\n"
        "[[analysis]]\nkind = 'sweep'\nodd = '9998..10000'\n"
        "[[analysis]]\nkind = 'floor'\nverified_to = '10^999'\n"
    )
    code, _, err = run(["study", str(study), "--out", str(tmp_path / "out")], capsys)
    assert code == 0, err
    names = [p.name for p in (tmp_path / "out").iterdir()]
    assert "report.md" in names and all(len(n) < 100 for n in names)


# ------------------------------------------------------------------ map files
def test_override_opt_in_is_explicit_and_visible(tmp_path, capsys):
    f = tmp_path / "m.toml"
    f.write_text('[fake]\nname = "3x+1"\nshorthand = "5x+1"\noverride = true\n')
    doc = run_json(["solve", "3x+1", "10", "--maps", str(f)], capsys)
    # itinerary 10 under 5x+1: T_w(n) = (5n+1)/4, so D = 2^2 - 5 = -1 (common practice, no source)
    assert doc["denominator"] == -1
    code, out, _ = run(["solve", "3x+1", "10", "--maps", str(f)], capsys)
    assert code == 0 and "overridden: 5x+1" in out
    same = tmp_path / "same.toml"
    same.write_text('[again]\nname = "3x+1"\nshorthand = "3x+1"\n')  # same meaning: fine
    assert run(["solve", "3x+1", "10", "--maps", str(same)], capsys)[0] == 0


def test_a_large_map_file_loads_whole(tmp_path):
    from cyclewright.maps import load_catalog

    f = tmp_path / "many.toml"
    f.write_text("".join(f'[m{i}]\nshorthand = "{2 * i + 3}x+1"\n' for i in range(3000)))
    cat = load_catalog([f], include_user=False)
    assert cat.get("m2999").ax_b == (6001, 1) and len(cat) >= 3000
    f.write_text(f.read_text() + '[m3000]\nname = "m5"\nshorthand = "3x+5"\noverride = true\n')
    cat = load_catalog([f], include_user=False)
    assert cat.get("m5").ax_b == (3, 5) and len([m for m in cat if m.name == "m5"]) == 1


def test_itinerary_work_estimate_stops_at_its_cap():
    from cyclewright.cycles.census import itinerary_work

    assert itinerary_work(maps.get("3x+1"), 10**12, stop_above=10**6) > 10**6


def test_census_beyond_max_scan_is_refused_without_measuring(capsys):
    # K = 10^9 of 3x+1 is within the continued-fraction limit; the scan it needs
    # (about 1.25 * 10^18 starts) is far beyond --max-scan, so the plan refuses it at
    # once with its estimate at the nominal rate (no chunk near 10^18 is measured)
    code, out, err = run(["census", "3x+1", "--max-length", "10^9"], capsys)
    assert code == 2 and out == "" and err.count("\n") == 1
    assert "1,252,079,477,257,659,530" in err and "beyond the limit of" in err


def test_compare_with_a_census_beyond_its_scan_keeps_the_other_columns(capsys):
    # compare's census of 3x+1 up to K = 10^6 needs a scan of about 10^12 starts:
    # refused at once inside compare, its row says so, every other figure is there
    args = ["compare", "3x+1", "--max-length", "10^6", "--to", "1000", "--no-store"]
    code, out, err = run(args, capsys)
    assert code == 0, err
    assert "3x+1: no census:" in out and "run census for more" in out
    # the delay record of 1..1000 is 871, 178 steps of n -> 3n+1, n/2 (OEIS A006877 lists
    # 871 as a record setter; 178 from memory); with (3n+1)/2 as one step its 65 odd
    # steps merge: 178 - 65 = 113 (common practice, no source); the console may wrap the
    # cell "113 at 871" of the overview, so its two figures are looked for apart
    assert "113 at" in out and "871" in out


def test_graph_of_5x1_over_a_large_range_stops_at_the_node_limit(capsys):
    from cyclewright.cycles.limits import MAX_GRAPH_NODES

    code, out, err = run(["graph", "5x+1", "--to", "500000"], capsys)
    assert code == 2 and out == "" and err.count("\n") == 1
    assert f"at most {MAX_GRAPH_NODES} nodes" in err and "nothing was written" in err


def test_graph_without_ceiling_and_a_huge_step_cap_is_bounded(capsys):
    # every walk stops at the value cap shared with the orbit (largest start times
    # 10^1000), reported as an escape; the quick graph of 3x+1 with the same step
    # cap still gives its result (cycle 1 -> 2 -> 1; Lagarias 1985)
    args = ["graph", "5x+1", "--to", "10", "--ceiling", "none", "--max-steps", "10^9"]
    doc = run_json(args, capsys)
    assert doc["ceiling"] is None and doc["value_cap"] == 10 * 10**1000
    assert doc["escaped"] >= 1 and "not a proof" in doc["escaped_note"]
    code, out, err = run(args, capsys)
    assert code == 0 and "value cap 10 * 10^1000" in out and "not a proof" in out
    doc = run_json(["graph", "3x+1", "--to", "100", "--max-steps", "10^9"], capsys)
    assert [c["minimum"] for c in doc["cycles"]] == [1] and doc["escaped"] == 0
