"""The exact solver: properties (hypothesis) and published cycles."""

from __future__ import annotations

from fractions import Fraction

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from strategies import ax_b_maps, maps_and_words

from cyclewright import maps
from cyclewright.cycles.itinerary import (
    ItineraryError,
    composite,
    least_rotation,
    parse_itinerary,
    rotations,
)
from cyclewright.cycles.solver import solve


# --- invariants ------------------------------------------------------------------------
@pytest.mark.slow
@settings(max_examples=300, deadline=None)
@given(maps_and_words())
def test_fixed_point_is_fixed_by_the_composite(mw):
    m, word = mw
    c = solve(m, word)
    d, k = m.divisor, len(word)
    if c.denominator == 0:
        assert c.fixed_point is None and c.note
        return
    A, B = composite(m.branches, d, word)
    n = c.fixed_point
    assert (A * n + B) / Fraction(d**k) == n


@pytest.mark.slow
@settings(max_examples=300, deadline=None)
@given(maps_and_words())
def test_realized_cycles_are_fixed_by_exact_iteration(mw):
    m, word = mw
    c = solve(m, word)
    if not c.realized:
        return
    n = c.fixed_point
    for r in word:
        assert m.residue_of(n) == r
        n = m.step_rational(n)
    assert n == c.fixed_point
    if m.multipliers_prime_to_divisor():
        pass  # realized is guaranteed; checked below
    assert all(e.denominator % 1 == 0 for e in c.elements)


@pytest.mark.slow
@settings(max_examples=300, deadline=None)
@given(maps_and_words())
def test_multipliers_prime_to_d_always_realize(mw):
    # d-adic conjugacy (Terras 1976 for 3x+1; Matthews and Watts 1984 in general)
    m, word = mw
    c = solve(m, word)
    if m.multipliers_prime_to_divisor() and c.denominator != 0:
        assert c.realized


@pytest.mark.slow
@settings(max_examples=200, deadline=None)
@given(maps_and_words(max_len=8))
def test_rotations_give_the_same_cycle(mw):
    m, word = mw
    base = solve(m, word)
    if base.fixed_point is None or not base.realized:
        return
    for rot in rotations(word):
        c = solve(m, rot)
        assert set(c.elements) == set(base.elements)
        assert c.minimum == base.minimum


@pytest.mark.parametrize("k", range(1, 11))
@pytest.mark.parametrize("a,b", [(3, 1), (5, 1), (3, -1), (7, 3), (181, 1)])
def test_terras_bijection_words_and_residues(k, a, b):
    # Terras 1976: for odd a the first k parities of n determine n mod 2^k and vice versa.
    m = maps.parse_shorthand(f"{a}x{b:+d}")
    seen = {}
    for n in range(2**k):
        word, v = [], n
        for _ in range(k):
            word.append(v % 2)
            v = m.step(v)
        seen[tuple(word)] = n
    assert len(seen) == 2**k


@settings(max_examples=100, deadline=None)
@given(ax_b_maps(), st.lists(st.integers(0, 1), min_size=1, max_size=12))
def test_ax_b_fixed_point_denominator_divides_D(m, word):
    c = solve(m, word)
    if c.fixed_point is not None:
        assert c.denominator % c.fixed_point.denominator == 0
        assert c.realized


# --- published cycles --------------------------------------------------------------------
def test_3x5_cycle_19():
    c = solve(maps.get("3x+5"), "11100")  # issue check; OEIS A226607 lists 19 for k = 5
    assert c.integral and c.minimum == 19 and c.denominator == 5
    assert [int(e) for e in c.elements] == [19, 31, 49, 76, 38]
    assert c.lagarias_primitive


def test_3x1_trivial_cycle():
    c = solve(maps.get("3x+1"), "10")  # common practice, no source
    assert [int(e) for e in c.elements] == [1, 2] and c.integral


def test_3x7_cycle_through_5():
    # OEIS A226607 example: the 3x+7 cycle {5, 11, 20, 10}
    c = solve(maps.get("3x+7"), "1100")
    assert sorted(int(e) for e in c.elements) == [5, 10, 11, 20]
    assert c.lagarias_primitive


def test_3x7_scaled_trivial_cycle_is_not_primitive():
    # OEIS A226607: 7 is listed apart, the cycle {7, 14} is 7 times {1, 2}
    c = solve(maps.get("3x+7"), "10")
    assert sorted(int(e) for e in c.elements) == [7, 14] and c.lagarias_primitive is False


def test_3xm11_cycle():
    # OEIS A226623 example: the 3x-11 cycle {19, 23, 29, 38}
    c = solve(maps.parse_shorthand("3x-11"), "1110")
    assert sorted(int(e) for e in c.elements) == [19, 23, 29, 38]


def test_5x1_cycle_through_13():
    # OEIS A259207: undivided 13, 66, 33, 166, 83, 416, 208, 104, 52, 26; divided itinerary 1 1 1 0 0 0 0
    c = solve(maps.get("5x+1"), "1110000")
    assert [int(e) for e in c.elements] == [13, 33, 83, 208, 104, 52, 26]
    und = solve(maps.get("3x+1-undivided"), "10")
    assert und.realized  # (6n+2)/2 on odd n: the classic 1 -> 4 -> 2 -> 1 needs 3 steps
    c_und = solve(maps.parse_shorthand("5x+1", undivided=True), "1010100000")
    assert [int(e) for e in c_und.elements] == [13, 66, 33, 166, 83, 416, 208, 104, 52, 26]


def test_negative_cycles_3x1():
    # Lagarias 1985 survey (from memory): 3x+1 cycles through -1, -5, -17
    assert solve(maps.get("3x+1"), "1").elements == (Fraction(-1),)
    assert solve(maps.get("3x+1"), "110").minimum == -5
    c = solve(maps.get("3x+1"), "11110111000")
    assert c.minimum == -17 and c.integral and len(c.elements) == 11


def test_not_realized_when_multiplier_shares_factor():
    # undivided 3x+1 (branch 1 = (6, 2)): the fixed point of "110" is -4/7, which is even
    c = solve(maps.get("3x+1-undivided"), "110")
    assert c.fixed_point == Fraction(-4, 7)
    assert not c.realized and not c.integral
    assert "residue 0, not 1" in c.note
    # "11": the fixed point -1/2 is outside the map's domain
    c2 = solve(maps.get("3x+1-undivided"), "11")
    assert not c2.realized and "not defined" in c2.note
    # "100" is the classic cycle 1 -> 4 -> 2
    assert [int(e) for e in solve(maps.get("3x+1-undivided"), "100").elements] == [1, 4, 2]


def test_no_fixed_point_when_dk_equals_A():
    m = maps.Map(2, [(2, 0), (3, 1)])  # branch 0 doubles then halves: n -> n
    c = solve(m, "0")
    assert c.fixed_point is None and "identity" in c.note
    m2 = maps.Map(2, [(2, 2), (3, 1)])  # n -> n + 1 on even n
    c2 = solve(m2, "00")
    assert c2.fixed_point is None and "no fixed point" in c2.note


def test_non_primitive_itinerary():
    c = solve(maps.get("3x+1"), "1010")
    assert not c.primitive_itinerary and c.repetitions == 2
    assert [int(e) for e in c.elements] == [1, 2]


def test_long_itinerary_stays_exact():
    word = "1" * 300 + "0" * 476
    c = solve(maps.get("3x+1"), word)
    assert c.denominator == 2**776 - 3**300
    assert c.fixed_point * c.denominator == c.B


def test_itinerary_parsing():
    assert parse_itinerary("1^3 0^2", 2) == (1, 1, 1, 0, 0)
    assert parse_itinerary("10^2,0", 2) == (1, 0, 1, 0, 0)
    assert parse_itinerary("11,0,3^2", 12) == (11, 0, 3, 3)
    assert least_rotation((1, 0, 0)) == (0, 0, 1)
    for bad in ["", "1^0", "1x", "2"]:
        with pytest.raises(ItineraryError):
            parse_itinerary(bad, 2)
