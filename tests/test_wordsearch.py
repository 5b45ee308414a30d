"""The itinerary method (meet in the middle over words) against sources and brute force."""

from __future__ import annotations

import itertools

import pytest
from hypothesis import given, settings
from strategies import valid_maps

from cyclewright import maps
from cyclewright.cycles.solver import solve
from cyclewright.cycles.wordsearch import DegenerateMap, integral_cycles_by_itinerary


def _brute(m, K):
    """Solve every word of length <= K (reference implementation)."""
    found = set()
    for k in range(1, K + 1):
        for word in itertools.product(range(m.divisor), repeat=k):
            c = solve(m, word)
            if c.integral:
                found.add(int(c.minimum))
    return found


@pytest.mark.slow
def test_3x5_up_to_30():
    # OEIS A226607 (k = 5): primitive cycle minima 1, 19, 23, 187, 347; plus the scaled cycle through 5
    r = integral_cycles_by_itinerary(maps.get("3x+5"), 30)
    assert r.minima("positive") == (1, 5, 19, 23, 187, 347)


def test_3x13_up_to_24():
    # OEIS A226607 (k = 13): 1, 131, 211, 227, 251, 259, 283, 287, 319; plus 13 (scaled 3x+1 cycle)
    r = integral_cycles_by_itinerary(maps.get("3x+13"), 24)
    assert r.minima("positive") == (1, 13, 131, 211, 227, 251, 259, 283, 287, 319)
    prim = {int(c.minimum) for c in r.cycles if c.lagarias_primitive and c.minimum > 0}
    assert prim == {1, 131, 211, 227, 251, 259, 283, 287, 319}


def test_3x1_both_sides():
    # Lagarias 1985 survey (from memory): 1, -1, -5, -17 (and the fixed point 0)
    r = integral_cycles_by_itinerary(maps.get("3x+1"), 30)
    assert r.minima() == (0, 1, -1, -5, -17)


def test_3xm1_and_3xm11():
    # OEIS A226623: 3x-1: 1, 5, 17; 3x-11: 19 among its cycles
    assert integral_cycles_by_itinerary(maps.get("3x-1"), 20).minima("positive") == (1, 5, 17)
    assert 19 in integral_cycles_by_itinerary(maps.parse_shorthand("3x-11"), 12).minima("positive")


def test_5x1_cycles():
    # 5x+1: 13 (OEIS A259207), 1 and 17 (from memory)
    assert integral_cycles_by_itinerary(maps.get("5x+1"), 20).minima("positive") == (1, 13, 17)


@pytest.mark.slow
@settings(max_examples=40, deadline=None)
@given(valid_maps(max_divisor=3, max_multiplier=7, max_offset=9))
def test_matches_brute_force_over_all_words(m):
    K = 7 if m.divisor == 2 else 5
    try:
        r = integral_cycles_by_itinerary(m, K)
    except DegenerateMap:
        return
    assert set(r.minima()) == _brute(m, K)
    for c in r.cycles:
        rc = solve(m, c.itinerary)  # the record's itinerary has the record as its cycle
        assert rc.integral and rc.realized and rc.fixed_point == c.minimum
        elems = [int(e) for e in c.elements]
        for i, v in enumerate(elems):
            assert m.step(v) == elems[(i + 1) % len(elems)]


def test_not_realized_words_are_dropped():
    # undivided 3x+1: 1 -> 4 -> 2 -> 1 and the negative cycles, every one verified by iteration
    r = integral_cycles_by_itinerary(maps.get("3x+1-undivided"), 18)  # -17 needs 11 + 7 steps
    assert r.minima() == (0, 1, -1, -5, -17)


def test_degenerate_map_is_reported():
    with pytest.raises(DegenerateMap, match="every point following it is fixed"):
        integral_cycles_by_itinerary(maps.Map(2, [(2, 0), (3, 1)]), 3)
