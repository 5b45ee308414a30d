"""The scan against outside sources (OEIS, Lagarias) and its API contract."""

from __future__ import annotations

import json

import pytest

from cyclewright import maps
from cyclewright.cycles.errors import InputError
from cyclewright.cycles.integer_cycle import IntegerCycle, verified_cycle
from cyclewright.cycles.scan import scan
from cyclewright.cycles.scan.chunks import ChunkTask, default_chunk_size, plan_chunks, run_chunk
from cyclewright.cycles.scan.reference import classify, cycle_minima
from cyclewright.cycles.solver import solve


@pytest.fixture(autouse=True)
def _data_dir(tmp_path, monkeypatch):
    monkeypatch.setenv("CYCLEWRIGHT_DATA_DIR", str(tmp_path / "data"))
    monkeypatch.setenv("CYCLEWRIGHT_CONFIG_DIR", str(tmp_path / "config"))


def _scan(name, to, **kw):
    kw.setdefault("store", False)
    kw.setdefault("workers", 1)
    return scan(maps.get(name), to, **kw)


def _primitive_minima(r, side="positive"):
    return [c.minimum for c in r.cycles if c.side == side and c.lagarias_primitive]


def _other_minima(r, side="positive"):
    return [c.minimum for c in r.cycles if c.side == side and not c.lagarias_primitive]


# ----------------------------------------------------------------- OEIS A226607: 3x+k
def test_3x_plus_5_primitive_minima():
    r = _scan("3x+5", 10**5)
    # OEIS A226607 (k = 5): 1, 19, 23, 187, 347
    assert _primitive_minima(r) == [1, 19, 23, 187, 347]
    # 5 * (the cycle {1, 2} of 3x+1) is the only other one: 5 = gcd with the offset
    assert _other_minima(r) == [5]
    assert r.complete and r.label == "certified"


def test_3x_plus_13_primitive_minima():
    r = _scan("3x+13", 10**5)
    # OEIS A226607 (k = 13): 1, 131, 211, 227, 251, 259, 283, 287, 319
    assert _primitive_minima(r) == [1, 131, 211, 227, 251, 259, 283, 287, 319]
    assert _other_minima(r) == [13]


def test_3x_plus_7():
    r = _scan("3x+7", 10**5)
    # OEIS A226607 (k = 7): 5; plus the non-primitive cycle {7, 14} (7 times 3x+1's {1, 2})
    assert _primitive_minima(r) == [5]
    assert _other_minima(r) == [7]
    seven = [c for c in r.cycles if c.minimum == 7][0]
    assert seven.elements == (7, 14) and not seven.lagarias_primitive


# ----------------------------------------------------------------- OEIS A226623: 3x-k
def test_3x_minus_1_and_3x_minus_11():
    # OEIS A226623 (k = 1): 1, 5, 17
    assert _primitive_minima(_scan("3x-1", 10**5)) == [1, 5, 17]
    r = _scan("3x-11", 10**5)
    # OEIS A226623 (k = 11): 19; the others are 11 times 3x-1's cycles
    assert _primitive_minima(r) == [19]
    assert _other_minima(r) == [11, 55, 187]


# ----------------------------------------------------------------- 3x+1 negative side
def test_3x_plus_1_negative_cycles_below_a_million():
    # Lagarias 1985 survey (from memory): the negative cycles through -1, -5, -17
    # and no others below 10^6 in absolute value; positive side: only {1, 2}.
    r = _scan("3x+1", 10**6, side="both")
    assert r.minima == {"positive": (1,), "negative": (-1, -5, -17)}
    neg = {c.minimum: c for c in r.cycles if c.side == "negative"}
    assert neg[-1].elements == (-1,)
    assert neg[-5].elements == (-5, -7, -10)
    assert neg[-17].length == 11 and neg[-17].odd_steps == 7
    assert all(e < 0 for c in neg.values() for e in c.elements)
    assert r.complete


# ----------------------------------------------------------------- 5x+1
@pytest.mark.slow
def test_5x_plus_1_cycles_and_unresolved():
    r = _scan("5x+1", 10**5)
    # 13: OEIS A259207; 1 and 17 from memory
    assert r.minima["positive"] == (1, 13, 17)
    c13 = [c for c in r.cycles if c.minimum == 13][0]
    assert c13.length == 7 and c13.odd_steps == 3
    # Divergent-looking orbits: a large share never gets below its start within
    # the cap; all of those passed 2^63 and were followed in exact arithmetic.
    n = r.unresolved_count["positive"]
    assert n > 10**5 // 10
    assert r.unresolved_escaped["positive"] == n
    assert not r.complete and r.label == "exact"
    assert len(r.unresolved_first["positive"]) == 20
    for s in r.unresolved_first["positive"][:5]:
        assert classify(maps.get("5x+1"), s, 1000) == ("open", 1000)


# ----------------------------------------------------------------- every cycle is proved
def test_found_cycles_agree_with_solver():
    r = _scan("3x+5", 1000, side="both")
    m = maps.get("3x+5")
    for c in r.cycles:
        sol = solve(m, c.itinerary)
        assert sol.integral and sol.minimum == c.minimum
        assert [int(e) for e in sol.elements] == list(c.elements)
        assert sol.lagarias_primitive == c.lagarias_primitive
        assert c.denominator == sol.denominator


def test_verified_cycle_refuses_a_non_cycle():
    with pytest.raises(RuntimeError):
        verified_cycle(maps.get("3x+1"), "positive", 7, 5)


def test_identity_branch_fixed_points_are_proved_by_iteration():
    # d = 2, even n -> n (a0 = 2, b0 = 0): every even number is a fixed point,
    # the itinerary "0" has d^k - A = 0 (no unique rational fixed point).
    m = maps.Map(2, [(2, 0), (3, 1)])
    r = scan(m, 20, store=False, workers=1)
    evens = [c for c in r.cycles if c.length == 1 and c.itinerary == "0"]
    assert [c.minimum for c in evens] == list(range(2, 21, 2))
    assert all(c.denominator is None for c in evens)
    assert cycle_minima(m, 1, 20, 1000) == list(r.minima["positive"])


# ----------------------------------------------------------------- cycle-length bound
def test_max_cycle_length_mode_matches_reference():
    m = maps.get("3x+1")
    K = 12
    r = scan(m, 3000, store=False, workers=1, max_cycle_length=K)
    ref = [classify(m, s, K)[0] for s in range(1, 3001)]
    assert r.counts["positive"]["beyond_length"] == ref.count("open")
    assert r.counts["positive"]["drops"] == ref.count("drop")
    assert r.counts["positive"]["unresolved"] == 0
    assert r.minima["positive"] == (1,)
    assert r.complete and r.label == "certified"


def test_cycle_length_bound_excludes_longer_cycles():
    # 3x-1's cycle through 17 has length 11: found with K = 11, not with K = 10.
    assert _scan("3x-1", 100, max_cycle_length=11).minima["positive"] == (1, 5, 17)
    r = _scan("3x-1", 100, max_cycle_length=10)
    assert r.minima["positive"] == (1, 5)
    assert r.counts["positive"]["beyond_length"] >= 1


# ----------------------------------------------------------------- chunking and plumbing
def test_chunking_does_not_change_results():
    a = _scan("3x+13", 5000, side="both")
    b = _scan("3x+13", 5000, side="both", chunk_size=333)
    assert a.counts == b.counts and a.cycles == b.cycles
    assert b.chunks_total == 2 * len(plan_chunks(1, 5000, 333))


def test_range_start_and_counts_add_up():
    r = _scan("3x+5", 400, start=20)
    assert r.minima["positive"] == (23, 187, 347)
    assert sum(r.counts["positive"].values()) == 381


def test_run_chunk_outcome():
    m = maps.get("3x+1")
    out = run_chunk(ChunkTask(2, tuple(m.branches), "positive", 1, 10, 100, False))
    assert out.counts["cycles"] == 1 and out.counts["drops"] == 9
    assert out.cycles[0]["elements"] == [1, 2]


def test_default_chunk_size_and_plan():
    assert default_chunk_size(maps.get("3x+1")) == 2**27
    assert plan_chunks(5, 5, 10) == [(5, 5)]
    assert plan_chunks(1, 2**63 - 1, 2**62)[-1] == (2**62, 2**63 - 1)


def test_result_to_dict_is_json_with_labels():
    r = _scan("3x+1", 100, side="both")
    doc = json.loads(json.dumps(r.to_dict()))
    assert doc["minima"] == {"positive": [1], "negative": [-1, -5, -17]}
    assert doc["labels"]["counts"] == "certified" and doc["label"] == "certified"
    assert doc["counts"]["negative"]["cycles"] == 3
    assert doc["cycles"][0]["elements"] == [1, 2]
    assert "ScanResult(3x+1" in repr(r)
    assert IntegerCycle.from_record(doc["cycles"][1]) == r.cycles[1]


def test_default_store_location(tmp_path):
    r = scan(maps.get("3x+1"), 50, workers=1)
    assert r.store_path.startswith(str(tmp_path / "data"))
    again = scan(maps.get("3x+1"), 50, workers=1)
    assert again.chunks_reused == again.chunks_total == 1
    assert again.cycles == r.cycles


def test_progress_callback():
    seen = []
    _scan("3x+1", 1000, chunk_size=100, progress=seen.append)
    assert seen[-1].done == seen[-1].total == 1000
    assert all(p.phase == "scan" and p.detail.startswith("positive side") for p in seen)


# ----------------------------------------------------------------- bad input
@pytest.mark.parametrize(
    "kw, text",
    [
        ({"to": 10, "start": 20}, "empty range"),
        ({"to": 0}, "empty range"),
        ({"to": 10, "start": 0}, "start = 0"),
        ({"to": 2**63}, r"to must be at most 2\^63-1, got 2\^63"),
        ({"to": 10, "workers": 0}, "workers"),
        ({"to": 10, "max_steps": 0}, "max_steps"),
        ({"to": 10, "max_cycle_length": 0}, "max_cycle_length"),
        ({"to": 10, "side": "up"}, "side"),
        ({"to": 10, "executor": "mpi"}, "executor"),
        ({"to": 10, "executor": "dask"}, "scheduler"),
        ({"to": 10, "chunk_size": 0}, "chunk_size"),
        ({"to": 10.5}, "integer"),
    ],
)
def test_bad_input(kw, text):
    to = kw.pop("to")
    with pytest.raises(InputError, match=text):
        scan(maps.get("3x+1"), to, store=False, **kw)


def test_huge_coefficients_use_the_exact_python_path():
    # a = 2^40 + 1 is beyond the compiled path's limits; results equal the reference
    m = maps.get("1099511627777x+1")
    r = scan(m, 60, store=False, workers=1, max_steps=50, side="both")
    for side, sign in (("positive", 1), ("negative", -1)):
        ref = [classify(m, sign * s, 50)[0] for s in range(1, 61)]
        assert r.counts[side]["drops"] == ref.count("drop")
        assert r.counts[side]["unresolved"] == ref.count("open")
        assert list(r.minima[side]) == [sign * s for s in range(1, 61) if ref[s - 1] == "cycle"]
    assert r.sieve_depth == {"positive": 0, "negative": 0}


@pytest.mark.slow
def test_scan_module_and_function_are_both_reachable():
    # the module cyclewright.cycles.scan keeps its classes whatever was imported
    # first, and the notebook API's cw.scan is the function
    import subprocess
    import sys

    code = (
        "import cyclewright.cycles.scan as mod\n"
        "import cyclewright as cw\n"
        "assert mod.ScanResult.__name__ == 'ScanResult' and callable(mod.scan)\n"
        "r = cw.scan('3x+1', 100, store=False, workers=1, side='negative')\n"
        "assert cw.scan(cw.get_map('3x+1'), 100, store=False, workers=1).minima == {'positive': (1,)}\n"
        "import cyclewright.cycles.orbit, cyclewright.cycles.census, cyclewright.cycles.compare\n"
        "import cyclewright.cycles.excursions\n"
        "assert cyclewright.cycles.orbit.Orbit and cyclewright.cycles.census.Census\n"
        "assert cyclewright.cycles.compare.Comparison and cyclewright.cycles.excursions.Excursions\n"
        "print(r.minima['negative'])\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=300)
    assert out.returncode == 0, out.stderr
    assert out.stdout.strip() == "(-1, -5, -17)"
