"""Exactness: the compiled kernels equal the plain exact reference start by start.

The reference (cycles/reference.py) follows every orbit in Python integers and
keeps every value, so its classification is the definition. hypothesis draws
random valid maps (divisor up to 5, negative multipliers, multipliers sharing
factors with d, zero offsets) and random ranges, small ones and ones near
2^61 .. 2^63, where every step of 5x+1 and 181x+1 passes the int64 ceiling.
"""

from __future__ import annotations

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from strategies import TOP, scan_caps, scan_starts, sides, valid_maps

from cyclewright import maps
from cyclewright.cycles.scan import reference
from cyclewright.cycles.scan.codes import CYCLE, DROP, OPEN, OTHER
from cyclewright.cycles.scan.kernel import KernelMap, classify_range, classify_starts
from cyclewright.cycles.scan.sieve import (
    class_word,
    jump_table,
    safe_depth,
    sieve_levels,
    sieve_table,
)
from cyclewright.maps import Map

_NAMES = {DROP: "drop", CYCLE: "cycle", OTHER: "other_cycle", OPEN: "open"}


def _kernel_outcomes(m: Map, side: str, lo: int, hi: int, cap: int, depth: int):
    """Per start: (outcome, steps) from one-start kernel calls, plus the range call."""
    mm = m if side == "positive" else m.conjugate()
    km = KernelMap.from_map(mm)
    table = sieve_levels(mm, min(cap, depth))
    tie = side == "positive"
    per = {}
    for s in range(lo, hi + 1):
        out = classify_range(km, s, s, cap, tie, table)
        if out.cycles:
            per[s] = ("cycle", out.cycles[0][1])
        elif out.open_starts:
            per[s] = ("open", cap)
        elif out.other:
            per[s] = ("other_cycle", None)
        else:
            assert out.drops == 1
            per[s] = ("drop", None)
    whole = classify_range(km, lo, hi, cap, tie, table)
    code, steps, _ = classify_starts(km, list(range(lo, hi + 1)), cap, tie)
    exact = {s: (_NAMES[int(c)], int(n)) for s, c, n in zip(range(lo, hi + 1), code, steps)}
    return per, whole, exact


def _check(m: Map, side: str, lo: int, hi: int, cap: int, depth: int = 8) -> None:
    sign = 1 if side == "positive" else -1
    ref = {s: reference.classify(m, sign * s, cap) for s in range(lo, hi + 1)}
    per, whole, exact = _kernel_outcomes(m, side, lo, hi, cap, depth)
    for s in range(lo, hi + 1):
        outcome, steps = ref[s]
        got, got_steps = per[s]
        assert got == outcome, (m, side, s, cap, ref[s], per[s])
        if outcome == "cycle":
            assert got_steps == steps
        # the exact continuation alone gives the same, with the same step counts
        e_out, e_steps = exact[s]
        assert e_out == outcome, (m, side, s, cap, ref[s], exact[s])
        if outcome in ("cycle", "other_cycle"):
            assert e_steps == steps
    outcomes = [o for o, _ in ref.values()]
    assert whole.drops == outcomes.count("drop")
    assert whole.other == outcomes.count("other_cycle")
    assert whole.cycles == [(s, n) for s, (o, n) in ref.items() if o == "cycle"]
    assert whole.open_starts == [s for s, (o, _) in ref.items() if o == "open"]


@pytest.mark.slow
@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(valid_maps(), scan_starts, st.integers(0, 30), scan_caps, sides)
def test_random_maps_match_reference(m, lo, width, cap, side):
    hi = min(lo + width, TOP)
    _check(m, side, lo, hi, cap)


@pytest.mark.slow
@settings(max_examples=30, deadline=None)
@given(
    st.sampled_from(["3x+1", "5x+1", "181x+1", "3x-1", "3x+13", "-3x+1", "7x-3"]),
    st.integers(2**61, TOP),
    st.integers(0, 40),
    st.sampled_from([20, 100, 300]),
    sides,
)
def test_named_maps_near_the_ceiling(name, lo, width, cap, side):
    # 5x+1 and 181x+1 pass 2^63 within a step or two here; 3x+1 near 2^61..2^63
    # needs the ceiling checks at every odd step.
    _check(maps.get(name), side, lo, min(lo + width, TOP), cap, depth=24)


@pytest.mark.slow
@settings(max_examples=25, deadline=None)
@given(st.sampled_from(["3x+1", "3x-1", "5x+1", "3x+5"]), st.integers(2**24, 2**36), sides)
def test_full_depth_sieve_region(name, lo, side):
    # starts above 2^24 use the depth-24 sieve and its 24-step jumps
    _check(maps.get(name), side, lo, lo + 200, 400, depth=24)


@pytest.mark.slow
@settings(max_examples=40, deadline=None)
@given(valid_maps(), st.integers(1, TOP - 10), st.sampled_from([150, 400]), sides)
def test_exact_continuation_with_limb_jumps(m, s, cap, side):
    # The multi-limb path alone, long enough for orbits to grow far past 2^76,
    # where it takes J steps at a time (negative values included).
    sign = 1 if side == "positive" else -1
    mm = m if side == "positive" else m.conjugate()
    km = KernelMap.from_map(mm)
    starts = list(range(s, s + 5))
    code, steps, _ = classify_starts(km, starts, cap, side == "positive")
    for x, c, n in zip(starts, code, steps):
        outcome, ref_steps = reference.classify(m, sign * x, cap)
        assert _NAMES[int(c)] == outcome, (m, side, x, cap)
        if outcome in ("cycle", "other_cycle"):
            assert int(n) == ref_steps


@pytest.mark.parametrize("name", ["3x+1", "5x+1", "181x+1"])
def test_top_of_the_range(name):
    _check(maps.get(name), "positive", TOP - 60, TOP, 150, depth=24)
    _check(maps.get(name), "negative", TOP - 60, TOP, 150, depth=24)


@pytest.mark.slow
def test_brent_path_other_cycles():
    # 3x+13: starts below the large cycle minima enter those cycles; with a
    # small cap the residue certificate sees repeats and Brent decides.
    m = maps.get("3x+13")
    for cap in (8, 30, 200):
        _check(m, "positive", 1, 400, cap)


# ----------------------------------------------------------------- the sieve's proof, by brute force
def _brute_drop_within(m: Map, s: int, K: int) -> bool:
    v = s
    for _ in range(K):
        v = m.step(v)
        if abs(v) < s:
            return True
    return False


@settings(max_examples=40, deadline=None)
@given(valid_maps(max_divisor=4, max_multiplier=7), st.integers(1, 6), st.integers(1, 10**6))
def test_sieve_table_claims_hold(m, K, mult):
    t = sieve_table(m, K)
    if t.depth == 0:
        return
    K, M = t.depth, t.modulus
    survivors = dict(zip(t.classes.tolist(), range(t.survivors)))
    for c in range(M):
        for q in (1, 2, mult, 2**40 + mult):
            s = q * M + c
            if c not in survivors:
                assert _brute_drop_within(m, s, K), (m, K, c, s)
                continue
            i = survivors[c]
            if t.jump[i]:
                v = s
                for _ in range(K - 1):
                    v = m.step(v)
                    assert abs(v) > s, (m, K, c, s)
                v = m.step(v)
                if q <= t.qmax[i]:
                    assert v == int(t.A[i]) * q + int(t.C[i])
                    assert abs(int(t.A[i]) * int(t.qmax[i])) + abs(int(t.C[i])) <= TOP


@settings(max_examples=40, deadline=None)
@given(valid_maps(), st.integers(1, 5), st.data())
def test_jump_table_is_the_exact_composite(m, j, data):
    table = jump_table(m, j)
    dj = m.divisor**j
    for _ in range(5):
        r = data.draw(st.integers(0, dj - 1))
        q = data.draw(st.integers(-(10**12), 10**12))
        A, C = table[r]
        v = q * dj + r
        word = []
        for _ in range(j):
            word.append(v % m.divisor)
            v = m.step(v)
        assert v == A * q + C
        assert tuple(word) == class_word(m, r, j)


def test_sieve_counts_oeis():
    # OEIS A076227 (values from memory): residues mod 2^k not yet decided by the coefficient
    # stopping time (3x+1): 2^10 -> 64, 2^20 -> 27328
    assert sieve_table(maps.get("3x+1"), 10).survivors == 64
    assert sieve_table(maps.get("3x+1"), 20).survivors == 27328


def test_safe_depth_is_conservative():
    # the walk's quantities are bounded exactly; large multipliers get shallow sieves
    assert safe_depth(maps.get("3x+1")) == 24
    assert 0 < safe_depth(maps.get("181x+1")) < 12
    assert safe_depth(Map(2, [(1, 0), (2**29 + 1, 1)])) <= 2
