"""Orbits: classic step counts, stopping times, cycle detection."""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from strategies import valid_maps

from cyclewright import maps
from cyclewright.cycles.orbit import brent, orbit

# OEIS A006577 (n = 1..20): undivided 3x+1 steps to reach 1 (n = 1..18 checked against the
# OEIS data; 19 and 20 from memory)
A006577 = [0, 1, 7, 2, 5, 8, 16, 3, 19, 6, 14, 9, 9, 17, 17, 4, 12, 20, 20, 7]


@pytest.mark.parametrize("n,expected", list(enumerate(A006577, start=1)))
def test_a006577_from_divided_map(n, expected):
    o = orbit(maps.get("3x+1"), n)
    assert o.cycle == (1, 2)
    assert o.undivided_total_steps == expected


@pytest.mark.parametrize("n,expected", list(enumerate(A006577, start=1)))
def test_a006577_from_undivided_map(n, expected):
    o = orbit(maps.get("3x+1-undivided"), n)
    assert o.total_steps == expected
    assert o.cycle == (1, 4, 2)


def test_27():
    # OEIS A006577: a(27) = 111; peak 9232 (OEIS A025586, from memory)
    o = orbit(maps.get("3x+1"), 27)
    assert o.undivided_total_steps == 111 and o.undivided_peak == 9232
    o2 = orbit(maps.get("3x+1-undivided"), 27)
    assert o2.total_steps == 111 and o2.peak == 9232


def test_stopping_time_positive_and_negative():
    m = maps.get("3x+1")
    # Terras 1976 stopping time in the divided map: 3 -> 5 -> 8 -> 4 -> 2: 4 steps
    assert orbit(m, 3).stopping_time == 4
    assert orbit(m, 2).stopping_time == 1
    assert orbit(m, 1).stopping_time is None  # 1 is a cycle minimum
    # negative: -7 -> -10 -> -5: |-5| < 7 after 2 steps
    assert orbit(m, -7).stopping_time == 2
    assert orbit(m, 0).stopping_time is None


def test_negative_cycles():
    # Lagarias 1985 survey (from memory): -1, -5, -17 cycles of 3x+1
    m = maps.get("3x+1")
    assert orbit(m, -1).cycle == (-1,)
    assert orbit(m, -7).cycle == (-5, -7, -10)
    assert orbit(m, -17).cycle[0] == -17 and len(orbit(m, -17).cycle) == 11


def test_escape_and_cap():
    m = maps.get("5x+1")
    o = orbit(m, 7, max_steps=300)
    assert o.status == "capped" and o.cycle == () and o.steps == 300
    o2 = orbit(m, 7, ceiling=10**20)
    assert o2.status == "escaped" and abs(o2.values[-1]) > 10**20
    # 5x+1 cycle through 13 (OEIS A259207)
    assert orbit(m, 13).cycle == (13, 33, 83, 208, 104, 52, 26)


def test_mod3_map_orbit():
    m = maps.get("mod3-4x")
    o = orbit(m, 10)
    assert o.status == "cycle" and o.values[1] == 13  # (4*10 - 1)/3


@pytest.mark.slow
@settings(max_examples=200, deadline=None)
@given(valid_maps(), st.integers(-500, 500))
def test_orbit_cycle_is_a_real_cycle(m, n):
    o = orbit(m, n, max_steps=2000, ceiling=10**30)
    if o.status != "cycle":
        return
    c = o.cycle
    for i, v in enumerate(c):
        assert m.step(v) == c[(i + 1) % len(c)]
    assert o.values[o.tail] in c
    assert len(set(c)) == len(c)
    assert o.values[o.total_steps] == c[0]


@settings(max_examples=200, deadline=None)
@given(st.integers(1, 10**6))
def test_brent_agrees_with_orbit(n):
    m = maps.get("3x+1")
    o = orbit(m, n)
    assert brent(m.step, n, 10**5) == (o.tail, len(o.cycle))


def test_bad_arguments():
    with pytest.raises(ValueError):
        orbit(maps.get("3x+1"), 5, max_steps=0)
    with pytest.raises(TypeError):
        orbit(maps.get("3x+1"), 5.0)
