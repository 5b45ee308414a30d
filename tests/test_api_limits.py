"""The API refuses work beyond its limits, quickly and in one line (no MemoryError, no hang).

Every case calls a public function of the API with an extreme input, as a
notebook user could, and expects :class:`cyclewright.InputError` (or the
itinerary parser's own input error) with the one-line message of
:mod:`cyclewright.cycles.limits`. The cases run in one child process with
its address space capped (4 GiB) and an alarm per case (60 s): a limit that
stopped working ends as a failed case, never as a machine out of memory or
a hung suite. The limits and the rule are the project's own (docs/limits.md;
common practice, no source). No assertion depends on machine speed.
"""

from __future__ import annotations

import json
import subprocess
import sys
import textwrap

import pytest

CHILD = textwrap.dedent(
    r"""
    import json, resource, signal, sys
    resource.setrlimit(resource.RLIMIT_AS, (4 * 2**30, 4 * 2**30))

    import cyclewright as cw
    from cyclewright.cycles import graph as graph_module
    from cyclewright.cycles.census import census_family
    from cyclewright.cycles.wordsearch import integral_cycles_by_itinerary

    def small_budget(call):
        # the budget scaled down to 64 MiB (the mechanism, not the machine's memory)
        def run():
            graph_module.MEMORY_BUDGET = 2**26
            try:
                return call()
            finally:
                graph_module.MEMORY_BUDGET = cw.cycles.limits.MEMORY_BUDGET
        return run

    # the node bound of a graph whose orbits escape without a ceiling (they stop
    # at the value cap 30 * 10^1000, so a node's size is known before the walk)
    no_ceiling_graph_small_budget = small_budget(
        lambda: cw.functional_graph("5x+1", 30, ceiling=None, max_steps=10**9)
    )
    # the starts alone (every start is a node) beyond the budget: refused up front
    graph_starts_over_budget = small_budget(
        lambda: cw.functional_graph("3x+1", 400_000, ceiling=10**1000)
    )

    CASES = {
        "census-K-10^30": lambda: cw.census("3x+1", 10**30),
        "census-K-10^9-max-scan": lambda: cw.census("3x+1", 10**9, rate=1e9, store=False),
        "census-K-2*10^6-general": lambda: cw.census("mod3-4x", 2 * 10**6),
        "census-K-10^7-itineraries": lambda: cw.census("3x+1", 10**7, method="itineraries"),
        "plan-K-10^12": lambda: cw.cycles.census.plan_census("3x+1", 10**12),
        "census-workers-256": lambda: cw.census("3x+1", 5, workers=256, store=False),
        "family-offsets-10^30": lambda: census_family("3x+k", range(1, 10**30), 5),
        "family-K-2*10^6": lambda: census_family("3x+k", range(1, 4), 2 * 10**6),
        "orbit-start-10^10^5": lambda: cw.orbit("3x+1", 10**10**5),
        "orbit-memory": lambda: cw.orbit("5x+1", 7, max_steps=10**8),
        "orbit-max-steps-10^30": lambda: cw.orbit("3x+1", 7, max_steps=10**30),
        "count-length-10^7": lambda: cw.count("3x+1", 10**7, 10**6),
        "count-content-10^7": lambda: cw.count("3x+1", content=(9 * 10**6, 10**6)),
        "sweep-range-10^30": lambda: cw.sweep("3x+1", range(1, 10**30)),
        "sweep-generator": lambda: cw.sweep("3x+1", (x for x in range(10**30))),
        "sweep-x-10^6": lambda: cw.sweep("3x+1", range(10**6, 10**6 + 2)),
        "sweep-extra-10^6": lambda: cw.sweep("3x+1", range(1, 3), 10**6),
        "scan-to-10^30": lambda: cw.scan("3x+1", 10**30, store=False),
        "scan-chunk-size-1": lambda: cw.scan("3x+1", 10**5, chunk_size=1, store=False),
        "scan-max-steps-10^30": lambda: cw.scan("3x+1", 100, max_steps=10**30, store=False),
        "scan-workers-256": lambda: cw.scan("3x+1", 100, workers=256, store=False),
        "graph-to-10^30": lambda: cw.functional_graph("3x+1", 10**30),
        "graph-ceiling-10^2000": lambda: cw.functional_graph("3x+1", 10, ceiling=10**2000),
        "graph-escaping-5x+1": lambda: cw.functional_graph("5x+1", 100_000),
        "graph-no-ceiling": no_ceiling_graph_small_budget,
        "graph-starts-over-budget": graph_starts_over_budget,
        "solve-10^7-letters": lambda: cw.solve("3x+1", "1" * 10**7),
        "solve-repeat-10^6": lambda: cw.solve("3x+1", "1^1000000"),
        "itineraries-K-10^6": lambda: integral_cycles_by_itinerary("3x+1", 10**6),
        "floor-10^10^5": lambda: cw.floor("3x+1", 10**10**5),
        "floor-next-10^6": lambda: cw.floor("3x+1", 100, next_types=10**6),
        "compare-odd-10^9": lambda: cw.compare(["3x+1"], odd=10**9),
        "compare-K-10^9": lambda: cw.compare(["3x+1"], max_length=10**9),
        "compare-to-10^30": lambda: cw.compare(["3x+1"], to=10**30),
        "excursions-max-steps-10^30": lambda: cw.excursions("3x+1", 100, max_steps=10**30),
        # timed on pieces of the range itself, then refused with the estimate: no
        # machine walks 2^62 starts in 30 minutes
        "excursions-to-2^62-1": lambda: cw.excursions("3x+1", 2**62 - 1),
        "excursions-rate-given": lambda: cw.excursions("3x+1", 10**9, rate=1e3),
        "records-to-2^63-1": lambda: cw.records("3x+1", 2**63 - 1, store=False),
        "records-rate-given": lambda: cw.records(
            "3x+1", 10**9, rate=1e3, workers=2, store=False
        ),
        "records-memory-step-cap-10^6": lambda: cw.records(
            "5x+1", 1000, max_steps=10**6, store=False
        ),
        # scan: timed on pieces of the range (sieve counted), refused with the estimate;
        # no machine classifies 2^63 starts in 30 minutes
        "scan-to-2^63-1": lambda: cw.scan("3x+1", 2**63 - 1, store=False),
        "scan-rate-given": lambda: cw.scan("3x+1", 10**9, rate=1e3, workers=2, store=False),
        "scan-max-minutes-negative": lambda: cw.scan("3x+1", 100, max_minutes=-1, store=False),
        # orbits that grow: a few starts walked with growing step caps; a limit of
        # 0.001 min (60 ms) is below any machine's time for 1000 walks of 10^7 steps
        "scan-growing-5x+1": lambda: cw.scan(
            "5x+1", 1000, max_steps=10**7, workers=1, max_minutes=0.001, store=False
        ),
        # a family's and a comparison's whole run, estimated before it starts
        "family-whole-time": lambda: census_family(
            "3x+k", range(1, 10001), 20, member_seconds=1.0, store=False
        ),
        "compare-whole-time": lambda: cw.compare(["5x+1", "7x+1"], max_minutes=0, store=False),
        "scan-cycle-length-rate": lambda: cw.scan(
            "3x+1", 10**12, max_cycle_length=1000, rate=1e6, workers=1, store=False
        ),
    }

    def alarm(*_):
        raise TimeoutError("no refusal within the safety timeout")

    signal.signal(signal.SIGALRM, alarm)
    out = {}
    for name in sys.argv[1:]:
        signal.alarm(60)
        try:
            CASES[name]()
            out[name] = {"type": None, "message": ""}
        except BaseException as exc:
            out[name] = {"type": type(exc).__name__, "message": str(exc)}
        finally:
            signal.alarm(0)
    print(json.dumps(out))
    """
)

# case -> (expected exception type, a piece of its one-line message)
EXPECTED: dict[str, tuple[str, str]] = {
    "census-K-10^30": ("InputError", "must be at most 10^9"),
    "census-K-10^9-max-scan": ("InputError", "beyond the limit of 1,000,000,000,000 starts"),
    "census-K-2*10^6-general": ("InputError", "must be at most 10^6"),
    "census-K-10^7-itineraries": ("InputError", "with the itineraries method"),
    "plan-K-10^12": ("InputError", "must be at most 10^9"),
    "census-workers-256": ("InputError", "workers must be at most 64"),
    "family-offsets-10^30": ("InputError", "at most 10000 are taken in one run"),
    "family-K-2*10^6": ("InputError", "a family: planning alone grows with K"),
    "orbit-start-10^10^5": ("InputError", "n must be at most 10^1000, got 10^100000"),
    "orbit-memory": ("InputError", "of memory, more than the 2.1 GB allowed"),
    "orbit-max-steps-10^30": ("InputError", "max_steps must be at most 10^9"),
    "count-length-10^7": ("InputError", "k must be at most 100000, got 10^7"),
    "count-content-10^7": ("InputError", "k must be at most 100000, got 10^7"),
    "sweep-range-10^30": ("InputError", "at most 100000 are taken in one run"),
    "sweep-generator": ("InputError", "more than 100000 members"),
    "sweep-x-10^6": ("InputError", "the largest value of odd must be at most 100000"),
    "sweep-extra-10^6": ("InputError", "extra_lengths must be at most 1000, got 10^6"),
    "scan-to-10^30": ("InputError", "to must be at most 2^63-1, got 10^30 (the store holds"),
    "scan-chunk-size-1": ("InputError", "into 100000 chunks; at most 10000"),
    "scan-max-steps-10^30": ("InputError", "max_steps must be at most 10^9"),
    "scan-workers-256": ("InputError", "workers must be at most 64"),
    "graph-to-10^30": ("InputError", "the graph holds at most 500000 starts"),
    "graph-ceiling-10^2000": ("InputError", "ceiling must be at most 10^1000, got 10^2000"),
    "graph-escaping-5x+1": ("InputError", "one graph holds at most 933688 nodes"),
    "graph-no-ceiling": ("InputError", "orbits climbing towards the value cap 30000000000"),
    "graph-starts-over-budget": ("InputError", "400,000 starts with values up to"),
    "solve-10^7-letters": ("ItineraryError", "more than 100000 letters"),
    "solve-repeat-10^6": ("ItineraryError", "more than 100000 letters"),
    "itineraries-K-10^6": ("InputError", "half-words joined (the limit)"),
    "floor-10^10^5": ("InputError", "verified_to must be at most 10^1000-1, got 10^100000"),
    "floor-next-10^6": ("InputError", "next_types must be at most 1000, got 10^6"),
    "compare-odd-10^9": ("InputError", "odd must be at most 100000, got 10^9"),
    "compare-K-10^9": ("InputError", "must be at most 10^6"),
    "compare-to-10^30": ("InputError", "to must be at most 10^9, got 10^30"),
    "excursions-max-steps-10^30": ("InputError", "max_steps must be at most 10^9"),
    "excursions-to-2^62-1": ("InputError", "beyond the limit of 30 min (max_minutes)"),
    "excursions-rate-given": ("InputError", "1e+09 starts, about 12 days at 1e+03 starts/s"),
    "records-to-2^63-1": ("InputError", "9.22e+18 starts, about"),
    "records-rate-given": ("InputError", "x 2 workers (rate given; heuristic)"),
    "records-memory-step-cap-10^6": ("InputError", "of memory, more than the 2.1 GB allowed"),
    "scan-to-2^63-1": ("InputError", "scan of 3x+1 over 1..9,223,372,036,854,775,807"),
    "scan-rate-given": ("InputError", "about 6 days at 1e+03 starts/s per worker x 2 workers"),
    "scan-max-minutes-negative": ("InputError", "max_minutes must be a number of minutes >= 0"),
    "scan-growing-5x+1": ("InputError", "scaled to the cap (orbits grow; leaning high)"),
    "family-whole-time": (
        "InputError",
        "census of the family 3x+k (3,333 members, length <= 20), about 56 min",
    ),
    "compare-whole-time": ("InputError", "comparison of 2 maps (to 100,000, step cap 1,000)"),
    "scan-cycle-length-rate": ("InputError", "beyond the limit of 30 min (max_minutes)"),
}


@pytest.fixture(scope="module")
def outcomes(tmp_path_factory):
    """Every case run once in a child process with capped memory (JSON: type and message)."""
    import os

    base = tmp_path_factory.mktemp("api-limits")
    env = dict(os.environ)
    for var, sub in (
        ("CYCLEWRIGHT_CONFIG_DIR", "config"),
        ("CYCLEWRIGHT_DATA_DIR", "data"),
        ("CYCLEWRIGHT_CACHE_DIR", "cache"),
    ):
        env[var] = str(base / sub)
    res = subprocess.run(
        [sys.executable, "-c", CHILD, *EXPECTED],
        capture_output=True,
        text=True,
        env=env,
        timeout=1200,  # a safety net only: every case has its own alarm
    )
    assert res.returncode == 0, res.stderr[-2000:]
    return json.loads(res.stdout.strip().splitlines()[-1])


@pytest.mark.parametrize("case", list(EXPECTED))
def test_api_refuses_in_one_line(outcomes, case):
    kind, piece = EXPECTED[case]
    got = outcomes[case]
    assert got["type"] == kind, got
    assert piece in got["message"], got["message"][:500]
    assert "\n" not in got["message"] and len(got["message"]) < 600


def test_the_cli_and_the_api_share_the_limits():
    # one declaration: the CLI's numbers module re-exports the API's limits and checks
    from cyclewright.cli import numbers
    from cyclewright.cycles import limits

    for name in ("MAX_CENSUS_LENGTH", "MAX_CF_CENSUS_LENGTH", "MAX_STEP_CAP", "MAX_WORKERS"):
        assert getattr(numbers, name) is getattr(limits, name)
    assert numbers.check_range is limits.check_range
    # solve's refusal is the project's input error type too
    from cyclewright.cycles.errors import InputError
    from cyclewright.cycles.itinerary import ItineraryError

    assert issubclass(ItineraryError, InputError)
    assert limits.MAX_CF_CENSUS_LENGTH == 10**9 and limits.MAX_CENSUS_LENGTH == 10**6


def test_lift_limits_lets_a_caller_through():
    import cyclewright as cw
    from cyclewright.cycles.census import check_census_length
    from cyclewright.cycles.graph import check_graph

    with pytest.raises(cw.InputError):
        cw.orbit("3x+1", 2**3330, max_steps=5000)
    with cw.lift_limits():
        # 2^3330 halves to 1 in 3330 steps, then the cycle 1 -> 2 -> 1 (exact)
        o = cw.orbit("3x+1", 2**3330, max_steps=5000)
        assert o.status == "cycle" and o.cycle == (1, 2)
        assert check_census_length("mod3-4x", 2 * 10**6) == 2 * 10**6
        assert check_graph(10**6, side="both")[0] == 10**6
    # the limits are back after the block
    with pytest.raises(cw.InputError):
        check_census_length("mod3-4x", 2 * 10**6)
    # a limit that guards correctness stays: the store holds 64-bit starts
    with cw.lift_limits(), pytest.raises(cw.InputError, match="the store holds starts as 64-bit"):
        cw.scan("3x+1", 10**30, store=False)


def test_graph_of_an_escaping_map_small_range_still_works():
    # 5x+1 from 1..20 with ceiling 10^6: cycles with minima 1, 13, 17 (Lagarias 1985,
    # the three known cycles of 5x+1 on the positive side), 5 starts escape
    import cyclewright as cw

    g = cw.functional_graph("5x+1", 20, ceiling=10**6)
    assert g.cycle_minima() == [1, 13, 17] and g.escaped == 5


def test_graph_without_ceiling_stops_at_the_shared_value_cap():
    # 5x+1 from 1..10 with no ceiling and a step cap of 10^9: every walk ends in a
    # cycle or at the value cap 10 * 10^1000 (the orbit's cap, shared), reported
    # as escaped -- an exact count, not a proof of divergence. The cycles reached
    # are among the known positive cycles of 5x+1, minima 1, 13, 17 (Lagarias 1985).
    import cyclewright as cw
    from cyclewright.cycles.limits import value_cap
    from cyclewright.cycles.orbit import default_ceiling

    g = cw.functional_graph("5x+1", 10, ceiling=None, max_steps=10**9)
    assert g.value_cap == value_cap(10) == default_ceiling(10) == 10 * 10**1000
    assert set(g.cycle_minima()) <= {1, 13, 17} and 1 in g.cycle_minima()
    assert g.escaped >= 1 and g.unresolved == 0
    beyond = [n for n, a in g.graph.nodes(data=True) if a["frontier"] == "beyond_ceiling"]
    assert beyond and all(abs(n) > g.value_cap for n in beyond)
    inside = [n for n, a in g.graph.nodes(data=True) if a["frontier"] == ""]
    assert all(abs(n) <= g.value_cap for n in inside)
    d = g.to_dict()
    assert d["ceiling"] is None and d["value_cap"] == 10 * 10**1000
    assert "value cap" in d["escaped_note"] and "not a proof" in d["escaped_note"]
    # each escaping start's own orbit passes the same cap (the orbit's default)
    for s in range(1, 11):
        if g.basin_of(s) == "escaped":
            assert cw.orbit("5x+1", s, max_steps=10**6, ceiling=g.value_cap).status == "escaped"


def test_graph_bound_is_known_before_the_walk():
    # the bound's arithmetic (common practice, no source): each step adds a node or
    # ends the walk; a node's value is at most the frontier's a * cap + b
    import cyclewright as cw
    from cyclewright.cycles import limits
    from cyclewright.cycles.graph import graph_bound

    b = graph_bound("3x+1", 10, max_steps=5)
    assert (b.starts, b.nodes, b.steps) == (10, 60, 70)
    big = graph_bound("3x+1", 100, max_steps=10**9)
    assert big.nodes == limits.MAX_GRAPH_NODES and big.node_bytes == limits.GRAPH_BYTES_PER_NODE
    capped = graph_bound("5x+1", 100, ceiling=None, max_steps=10**9)
    assert capped.cap == 100 * 10**1000
    assert capped.node_bytes > limits.GRAPH_BYTES_PER_NODE
    assert capped.bytes <= limits.MEMORY_BUDGET
    assert capped.nodes == limits.MEMORY_BUDGET // capped.node_bytes
    with cw.lift_limits():
        assert graph_bound("3x+1", 100, max_steps=10**9).nodes == 100 * (10**9 + 1)
    # the starts of a quick graph stay well inside the bound: it gives its result
    g = cw.functional_graph("3x+1", 100, max_steps=10**9)
    assert g.cycle_minima() == [1] and g.graph.number_of_nodes() <= big.nodes


# ---------------------------------------------------------------- audit of the extremes
# Found by re-running the extremes as a hostile tester would (the project's rule for
# bad input and huge values, docs/limits.md; common practice, no source).


def test_huge_results_of_the_api_print_under_pythons_digit_limit():
    # valid types whose figures pass 4300 digits: computed and shown without lifting
    # Python's limit on integer/text conversion (the command line lifts it; the API must not need it)
    import sys

    import cyclewright as cw

    assert sys.get_int_max_str_digits() in (0, 4300)
    old = sys.get_int_max_str_digits()
    sys.set_int_max_str_digits(4300)
    try:
        c = cw.count("3x+1", 20000, 12619)  # D = 2^20000 - 3^12619 has 6021 digits
        assert "digits" in repr(c) and "necklaces exceed the limit" in c.enumeration_note
        r = cw.solve("3x+1", "1^10000")  # the cycle of 1^10000: elements of about 4771 digits
        assert "digits" in repr(r)
        assert (
            "digits" in cw.count("3x+1", 20, 12, limit=10**5000).enumeration_note
        )  # the limit as a threshold
    finally:
        sys.set_int_max_str_digits(old)


def test_count_of_a_long_type_with_one_odd_step_has_a_bound():
    # k = 2000, x = 1: Lambda = 2000 ln 2 - ln 3 is far above what exp() takes; the real
    # bound is then below 1 (its float estimate used to overflow): 2^2000 - 3 > 0, exact
    import cyclewright as cw

    c = cw.count("3x+1", 2000, 1, limit=0)
    assert c.denominator == 2**2000 - 3 and c.necklaces == 1


def test_count_refuses_an_enumeration_estimated_too_long(monkeypatch):
    import cyclewright as cw
    from cyclewright.cycles import counting

    # one necklace of length 10^5 costs minutes (each letter's rotation compared, numerators
    # of 10^5 bits): refused before it starts
    with pytest.raises(cw.InputError, match="would take about"):
        cw.count("3x+1", 100_000, 1)
    # the mechanism at a small size: a budget of 0 s refuses, lift_limits lets it through
    monkeypatch.setattr(counting, "MAX_ENUMERATION_SECONDS", 0.0)
    with pytest.raises(cw.InputError, match="would take about"):
        cw.count("3x+1", 13, 8)
    with cw.lift_limits():
        assert cw.count("3x+1", 13, 8).necklaces == 99  # Lagarias 1985 counts, from memory


def test_sweep_refuses_a_run_estimated_too_long(monkeypatch):
    import cyclewright as cw
    from cyclewright.cycles import sweep as sweep_module

    monkeypatch.setattr(sweep_module, "MAX_SWEEP_SECONDS", 0.0)
    with pytest.raises(cw.InputError, match="would take about .* narrow the range of x"):
        cw.sweep("3x+1", range(1, 41))
    with cw.lift_limits():
        assert len(cw.sweep("3x+1", range(1, 41))) == 40


def test_sweep_contents_are_iterative_for_large_divisors():
    # every way to write x as d - 1 counts, in the order of the plain recursive definition
    from cyclewright.cycles.sweep import _contents_rest

    def plain(total, parts):
        if parts == 1:
            yield (total,)
            return
        for first in range(total, -1, -1):
            for rest in plain(total - first, parts - 1):
                yield (first, *rest)

    for d in range(2, 7):
        for x in range(0, 6):
            assert list(_contents_rest(d, x)) == list(plain(x, d - 1))
    # divisor 1000: stars and bars, C(2 + 998, 998) contents, and no recursion depth
    assert sum(1 for _ in _contents_rest(1000, 2)) == 499_500


def test_scan_of_growing_orbits_refuses_a_step_cap_beyond_memory():
    # 5x+1 orbits grow on average: at a step cap of 10^9 each worker would keep 8 GB of
    # history (the compiled kernel allocated it and died with MemoryError)
    import cyclewright as cw

    with pytest.raises(cw.InputError, match="orbits grow on average.*lower max_steps"):
        cw.scan("5x+1", 1000, max_steps=10**9, store=False, workers=1)
