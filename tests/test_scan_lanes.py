"""The four-orbit lanes of the fast pass equal the plain exact reference.

For d = 2 maps with a_r >= 1 and a_r + b_r >= 1 (values stay positive) the
survivors of a sieve block
are followed four at a time (``cycles.kernels._lanes2``). The lanes finish
out of order, stop at the cap or before the int64 ceiling and hand over to
the one-orbit path; these tests aim at each of those exits and compare with
``cycles.reference`` (every value kept, plain Python integers) start by start.
"""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from cyclewright import maps
from cyclewright.cycles.scan import reference
from cyclewright.cycles.scan.kernel import KernelMap, _lanes_apply, classify_range
from cyclewright.cycles.scan.sieve import sieve_levels
from cyclewright.maps import Map

# d = 2 maps with a_r >= 1 and a_r + b_r >= 1 on the side scanned: 3x+k,
# 3x-1 (also the negative side of 3x+1), 5x+1 and 7x+1 (orbits climb past
# 2^63), an even branch other than n/2, and a negative offset.
LANE_MAPS = [
    maps.get("3x+1"),
    maps.get("3x+5"),
    maps.get("3x+13"),
    maps.get("5x+1"),
    maps.get("7x+1"),
    Map(2, [(3, 0), (1, 1)]),  # n even -> 3n/2, n odd -> (n+1)/2
    Map(2, [(1, 2), (5, 3)]),
    maps.get("3x-1"),
    maps.get("3x+1").conjugate(),
    Map(2, [(1, 0), (7, -5)]),
]


def _compare(m: Map, lo: int, hi: int, cap: int, depth: int) -> None:
    km = KernelMap.from_map(m)
    levels = sieve_levels(m, min(cap, depth))
    deep = levels[-1]
    if lo >= deep.modulus:
        assert _lanes_apply(km, deep.depth, cap, deep.qfast), (m, depth, cap)
    got = classify_range(km, lo, hi, cap, True, levels)
    ref = {s: reference.classify(m, s, cap) for s in range(lo, hi + 1)}
    outcomes = [o for o, _ in ref.values()]
    assert got.cycles == [(s, n) for s, (o, n) in ref.items() if o == "cycle"], m
    assert got.open_starts == [s for s, (o, _) in ref.items() if o == "open"], m
    assert got.other == outcomes.count("other_cycle"), m
    assert got.drops == outcomes.count("drop"), m


@pytest.mark.slow
@settings(max_examples=40, deadline=None)
@given(
    st.sampled_from(LANE_MAPS[:3] + LANE_MAPS[5:]),  # 5x+1, 7x+1: the next test
    st.integers(2**12, 2**44),
    st.integers(0, 300),
    st.sampled_from([9, 10, 12, 20, 1000]),
)
def test_lanes_match_reference(m, lo, width, cap):
    # depth-8 sieve: lanes from 256 on; caps just above the depth make lanes stop at the cap
    _compare(m, lo, lo + width, cap, depth=8)


@pytest.mark.slow
@settings(max_examples=15, deadline=None)
@given(st.sampled_from(LANE_MAPS[3:5]), st.integers(2**12, 2**40), st.sampled_from([10, 30, 60]))
def test_lanes_hand_over_before_the_ceiling(m, lo, cap):
    # 5x+1 and 7x+1: many orbits pass 2^63; the lane stops before the step
    # that would wrap and the exact continuation decides.
    _compare(m, lo, lo + 60, cap, depth=8)


def test_lanes_near_the_ceiling():
    m = maps.get("3x+1")
    lo = 2**61 // 3
    _compare(m, lo, lo + 400, 300, depth=8)


@pytest.mark.parametrize(
    ("name", "expected"),
    [
        # OEIS A226607: primitive cycle minima of 3x+13 include 259, 283, 287, 319
        ("3x+13", [259, 283, 287, 319]),
        # OEIS A226607: 3x+5 has the cycle minimum 347
        ("3x+5", [347]),
    ],
)
def test_cycles_found_in_lanes(name, expected):
    # with a depth-8 sieve these minima (all >= 2^8) are reached through the lanes
    m = maps.get(name)
    km = KernelMap.from_map(m)
    got = classify_range(km, 256, 400, 1000, True, sieve_levels(m, 8))
    assert [s for s, _ in got.cycles] == expected
    for s, length in got.cycles:
        assert reference.classify(m, s, 1000) == ("cycle", length)


def test_lanes_only_where_they_apply():
    # a negative multiplier, or a_r + b_r < 1 (values may turn negative): one orbit at a time
    for m in (maps.get("-3x+1"), Map(2, [(1, 0), (3, -5)])):
        t = sieve_levels(m, 8)[-1]
        assert not _lanes_apply(KernelMap.from_map(m), t.depth, 1000, max(t.qfast, 10))
    for m in LANE_MAPS:
        t = sieve_levels(m, 8)[-1]
        assert _lanes_apply(KernelMap.from_map(m), t.depth, 1000, t.qfast)
    t = sieve_levels(maps.get("3x+1"), 8)[-1]
    km = KernelMap.from_map(maps.get("3x+1"))
    assert not _lanes_apply(km, t.depth, t.depth, t.qfast)  # no room below the cap
