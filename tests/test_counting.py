"""cycles.count and cycles.sweep: check values, brute force, properties, bad input."""

from __future__ import annotations

import itertools
import math
from fractions import Fraction

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from cyclewright import maps
from cyclewright.cycles.counting import count, enumeration_estimate
from cyclewright.cycles.errors import InputError
from cyclewright.cycles.itinerary import composite, least_rotation
from cyclewright.cycles.labels import EXACT, HEURISTIC, PROVED
from cyclewright.cycles.solver import solve
from cyclewright.cycles.sweep import critical_lengths, rho, sweep

M31 = maps.get("3x+1")


def test_issue_check_values_3x1_13_8():
    # common practice, no source: 3x+1, k = 13, x = 8
    c = count(M31, 13, 8)
    assert c.necklaces == 99
    assert c.denominator == 1631
    assert c.largest_min_numerator == 14501
    assert c.candidates == 8
    assert c.integer_cycles == ()
    assert c.side == "positive"
    assert c.labels["candidates"] == EXACT.value
    assert c.labels["min_bound"] == PROVED.value
    assert c.labels["heuristic"] == HEURISTIC.value
    assert c.heuristic == Fraction(99, 1631)


def test_issue_check_values_3x1_8_5():
    # common practice, no source: k = 8, x = 5
    c = count(M31, 8, 5)
    assert (c.necklaces, c.denominator) == (7, 13)


def test_3x5_cycles_19_and_23():
    # OEIS A226607: 3x+5 has cycles with minima 19 and 23, both of type (5, 3)
    c = count(maps.get("3x+5"), 5, 3)
    minima = {cy.minimum for cy in c.integer_cycles}
    assert {19, 23} <= minima
    its = {cy.minimum: cy.itinerary for cy in c.integer_cycles}
    assert its[19] == "11100"


def test_3x1_negative_cycle_of_minus_17():
    # the cycle of -17 (Lagarias 1985 survey, from memory): type (11, 7), D < 0
    c = count(M31, 11, 7)
    assert c.side == "negative" and c.denominator == -139
    assert [cy.minimum for cy in c.integer_cycles] == [-17]


def _brute_force(m, k, x):
    """Every word of the type, deduplicated by rotation, solved from scratch with `solve`."""
    seen = {}
    for ones in itertools.combinations(range(k), x):
        w = tuple(1 if i in ones else 0 for i in range(k))
        rep = least_rotation(w)
        if rep not in seen:
            seen[rep] = solve(m, rep)
    return seen


@pytest.mark.parametrize(
    "name", ["3x+1", "3x+5", "3x+7", "3x+13", "5x+1", "3x-1", "3x+1-undivided"]
)
def test_enumeration_agrees_with_enumerate_and_solve(name):
    # reference: cycles.solve on every necklace (brute force over all C(k, x) words)
    m = maps.get(name)
    for k in range(1, 12):
        for x in range(0, k + 1):
            a = m.branches[1].multiplier
            if 2**k == a**x:
                continue
            tc = count(m, k, x)
            ref = _brute_force(m, k, x)
            assert tc.necklaces == len(ref)
            D = tc.denominator
            mins = []
            for rc in ref.values():
                nums = [abs(e * D) for e in rc.elements]
                assert all(v.denominator == 1 for v in nums)
                mins.append(min(int(v) for v in nums))
            assert tc.smallest_min_numerator == min(mins)
            assert tc.largest_min_numerator == max(mins)
            assert tc.candidates == max(mins) // abs(D)
            ref_int = sorted(int(rc.minimum) for rc in ref.values() if rc.integral)
            assert sorted(cy.minimum for cy in tc.integer_cycles) == ref_int


def _cycles_by_iteration(m, k, content, bound, side):
    """Brute force: every start 1..bound (or its negative) that is the minimum of a cycle of
    exactly this type (k steps return to the start, residues with this content)."""
    found = set()
    sgn = 1 if side == "positive" else -1
    for n0 in range(1, bound + 1):
        n = sgn * n0
        path = []
        v = n
        for _ in range(k):
            path.append(v % m.divisor)
            v = m.step(v)
        if v != n:
            continue
        cnt = tuple(path.count(r) for r in range(m.divisor))
        if cnt != content:
            continue
        # n must be the cycle minimum (least absolute value)
        cyc = []
        v = n
        for _ in range(k):
            cyc.append(v)
            v = m.step(v)
        if min(abs(e) for e in cyc) == n0 and min(cyc, key=lambda e: (abs(e), e)) == n:
            found.add(n)
    return found


@pytest.mark.parametrize("name", ["3x+1", "3x+5", "3x+7", "3x+13", "5x+1", "mod3-mixed"])
def test_integer_cycles_equal_iteration_of_all_starts_up_to_the_bound(name):
    # brute-force iteration of every start up to the proved bound (small types)
    m = maps.get(name)
    d = m.divisor
    for k in range(1, 10 if d == 2 else 7):
        for c in itertools.product(range(k + 1), repeat=d):
            if sum(c) != k:
                continue
            A = math.prod(a**cr for (a, _b), cr in zip(m.branches, c))
            if d**k == A:
                continue
            tc = count(m, content=c)
            if tc.side not in ("positive", "negative"):
                continue
            b = tc.min_bound
            assert b.applies
            listed = {cy.minimum for cy in tc.integer_cycles}
            if not b.possible:
                assert not listed
                continue
            brute = _cycles_by_iteration(m, k, c, b.integer, tc.side)
            assert listed == brute, (name, c)
            assert all(abs(v) <= b.integer for v in listed)


CATALOG = [m for m in maps.load_catalog()]


@settings(max_examples=60, deadline=None)
@given(st.sampled_from(CATALOG), st.integers(1, 11), st.data())
def test_listed_integer_cycles_agree_with_solve(m, k, data):
    # property: every enumerated integer cycle is solve()'s integral cycle, same minimum
    d = m.divisor
    if d == 2:
        x = data.draw(st.integers(0, k))
        c = (k - x, x)
    else:
        parts = data.draw(st.lists(st.integers(0, k), min_size=d - 1, max_size=d - 1))
        if sum(parts) > k:
            return
        c = (k - sum(parts), *parts)
    A = math.prod(a**cr for (a, _b), cr in zip(m.branches, c))
    if d**k == A:
        with pytest.raises(InputError):
            count(m, content=c)
        return
    tc = count(m, content=c)
    assert tc.necklaces >= len(tc.integer_cycles)
    for cy in tc.integer_cycles:
        rc = solve(m, cy.itinerary)
        assert rc.integral
        assert rc.minimum == cy.minimum
        assert rc.fixed_point == cy.minimum  # the itinerary starts at the minimum
        assert k % cy.length == 0  # the cycle runs k / length times round the type's word
        word = tuple(int(ch) for ch in cy.itinerary) * (k // cy.length)
        assert composite(m.branches, d, word)[0] == A


def test_non_enumerated_type_uses_the_proved_bound():
    tc = count(M31, 60, 37)
    assert not tc.enumerated and tc.integer_cycles is None
    assert tc.candidates == tc.min_bound.integer
    assert tc.labels["candidates"] == PROVED.value
    assert tc.candidates_linear_forms >= tc.candidates


def test_exact_big_integers_in_the_thousands():
    # exact Burnside sum with math.comb (standard library) for x = 2000
    s = sweep(M31, [2000])
    (row,) = s.rows
    k, x = row.length, row.odd
    assert k == (3**2000).bit_length()
    g = math.gcd(k, x)
    assert (
        row.necklaces
        == sum(_phi(j) * math.comb(k // j, x // j) for j in range(1, g + 1) if g % j == 0) // k
    )
    assert row.denominator == 2**k - 3**2000


def _phi(n):
    return sum(1 for i in range(1, n + 1) if math.gcd(i, n) == 1)


def test_rho_for_3x1():
    # common practice, no source: rho = 2.8396 to four digits; identity rho = t^t/(t-1)^(t-1)
    r = rho(M31)
    assert abs(r - 2.8396) < 1e-4
    t = math.log2(3)
    assert r == pytest.approx(t**t / (t - 1) ** (t - 1), rel=1e-12)


@pytest.mark.slow
def test_fitted_rate_approaches_rho():
    r = rho(M31)
    s100 = sweep(M31, range(1, 101))
    s400 = sweep(M31, range(1, 401))
    e100 = abs(s100.fitted_rate_corrected - r)
    e400 = abs(s400.fitted_rate_corrected - r)
    assert e400 < e100 and e400 < 2e-3
    assert abs(s400.fitted_rate - r) < abs(s100.fitted_rate - r)


def test_critical_lengths_are_bit_lengths_of_powers_of_3():
    # OEIS A020914 (number of binary digits of 3^n; from memory): 1, 2, 4, 5, 7, 8, 10, 12, 13, 15
    a020914 = [2, 4, 5, 7, 8, 10, 12, 13, 15]
    assert [critical_lengths(M31, (x,))[0] for x in range(1, 10)] == a020914
    assert critical_lengths(M31, (7,), 2, side="negative") == [11, 10, 9]


def test_sweep_rows_and_crossover():
    s = sweep(M31, range(1, 61), extra_lengths=1)
    assert len(s) == 120
    rows = s.to_dicts()
    assert rows[0]["x"] == 1 and "necklaces" in rows[0]
    cx = s.crossover_x
    assert cx is not None
    for r in s.rows:
        if r.odd >= cx:
            assert r.candidates_bound < r.necklaces
    before = [r for r in s.rows if r.odd == cx - 1]
    assert any(r.candidates_bound >= r.necklaces for r in before)
    # integer cycles found along the way: {1, 2} at k = 2 and its square at k = 4
    found = {(r.length, cy.minimum) for r in s.rows for cy in (r.integer_cycles or ())}
    assert (2, 1) in found


def test_sweep_negative_side_finds_the_negative_cycles():
    s = sweep(M31, range(1, 8), side="negative")
    minima = {cy.minimum for r in s.rows for cy in (r.integer_cycles or ())}
    assert {-1, -5, -17} <= minima


def test_sweep_general_divisor():
    s = sweep(maps.get("mod3-mixed"), range(1, 5))
    assert all(r.content[0] == r.length - r.off_zero for r in s.rows)
    assert s.rho is None


def test_to_pandas_is_optional():
    s = sweep(M31, range(1, 4))
    try:
        import pandas  # noqa: F401
    except ImportError:
        with pytest.raises(ImportError):
            s.to_pandas()
    else:  # pragma: no cover - pandas is not a dependency
        assert len(s.to_pandas()) == 3


def test_repr_reads_well():
    text = repr(count(M31, 13, 8))
    assert "99 necklaces" in text and "D=1631" in text and "8 candidates (exact)" in text
    assert "Sweep(3x+1" in repr(sweep(M31, range(1, 5)))


@pytest.mark.parametrize(
    "call",
    [
        lambda: count(M31, 0, 0),
        lambda: count(M31, 5, 6),
        lambda: count(M31, 5, -1),
        lambda: count(M31, 5, content=[2, 2]),
        lambda: count(maps.get("4x+2"), 2, 1),  # D = 4 - 4 = 0
        lambda: count(M31, 200, 126, limit=10**80),  # memory refusal with the estimate
        lambda: count(maps.get("mod3-4x"), 3, 1),
        lambda: count(M31, 13, 8, limit=-1),
        lambda: sweep(M31, []),
        lambda: sweep(M31, range(1, 4), side="up"),
    ],
)
def test_bad_input(call):
    with pytest.raises(InputError):
        call()


def test_memory_refusal_message_states_the_estimate():
    with pytest.raises(InputError, match="could need up to"):
        count(M31, 200, 126, limit=10**80)
    mem, secs = enumeration_estimate(10**6, 30)
    assert mem == 10**6 * (240 + 60 + 30 * (36 + 30 // 8)) and secs > 0
