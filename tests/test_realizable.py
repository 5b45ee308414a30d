"""Realizable itineraries for maps whose multipliers share a factor with d, against brute force.

A word is followed when some integer's first k steps visit its residues; a
necklace is realizable when its rational cycle exists, has denominators prime
to d and is followed (docs/design.md, section 3). The brute forces here share
no code with the program's walks: followed words from the itineraries of
every residue below d^k, realizable necklaces from every word's own fixed
point iterated with Fractions.
"""

from __future__ import annotations

from fractions import Fraction
from itertools import product

import pytest
from brute import follows, word_map

from cyclewright import maps
from cyclewright.cycles.counting import count
from cyclewright.cycles.necklaces import contents_of_length, necklace_count
from cyclewright.cycles.realizable import (
    followed_word_count,
    realizable_necklace_counts,
    realizable_rho,
)
from cyclewright.cycles.sweep import rho
from cyclewright.maps import Map

SHARED = {
    "3x+1-undivided": maps.get("3x+1-undivided"),  # n/2, 3n+1
    "n/2,5n+1": Map(2, [(1, 0), (10, 2)]),  # a = 10 = 2 * 5, b/2 = 1 odd
    "n/2,3n+2": Map(2, [(1, 0), (6, 4)]),  # b/2 = 2 even: odd steps forever
    "n/2,6n+1": Map(2, [(1, 0), (12, 2)]),  # 4 | a
    "n+1,(3n+1)/2": Map(2, [(2, 2), (3, 1)]),  # the even branch shares the factor
    "d3 -3,5,2": Map(3, [(-3, 12), (5, 13), (2, 11)]),
    "d3 9,1,1": Map(3, [(9, 0), (1, 2), (1, 1)]),
    "d3 6,1,2": Map(3, [(6, 0), (1, 2), (2, 2)]),
}


def _itinerary(m: Map, n: int, k: int) -> tuple[int, ...]:
    out = []
    for _ in range(k):
        out.append(n % m.divisor)
        n = m.step(n)
    return tuple(out)


def _brute_followed(m: Map, k: int) -> dict[tuple[int, ...], int]:
    """common practice, no source: the first k letters of n depend only on n mod d^k
    (T(n + d^j t) = T(n) + a_r d^(j-1) t), so the followed words of length k are the
    itineraries of 0 .. d^k - 1; counted per content."""
    d = m.divisor
    words = {_itinerary(m, n, k) for n in range(d**k)}
    per: dict[tuple[int, ...], int] = {}
    for w in words:
        c = tuple(w.count(r) for r in range(d))
        per[c] = per.get(c, 0) + 1
    return per


def _brute_realizable(m: Map, c: tuple[int, ...]) -> tuple[int, int]:
    """common practice, no source: every word of the content, its own fixed point
    B/(d^k - A) in Fractions, iterated by the map itself; necklaces by least rotation."""
    d, k = m.divisor, sum(c)
    real = set()
    for w in product(range(d), repeat=k):
        if tuple(w.count(r) for r in range(d)) != c:
            continue
        A, B = word_map(m, w)
        ok = A != 1 and follows(m, B / (1 - A), w)
        if ok:
            real.add(min(w[i:] + w[:i] for i in range(k)))
    prim = sum(1 for w in real if all(w[i:] + w[:i] != w for i in range(1, k)))
    return len(real), prim


@pytest.mark.parametrize("name", list(SHARED))
def test_followed_words_against_every_residue(name):
    m = SHARED[name]
    K = 10 if m.divisor == 2 else 6
    for k in range(1, K + 1):
        brute = _brute_followed(m, k)
        for c in contents_of_length(m.divisor, k):
            assert followed_word_count(m, c) == brute.get(c, 0), (k, c)


@pytest.mark.parametrize("name", list(SHARED))
def test_realizable_necklaces_against_every_word(name):
    m = SHARED[name]
    K = 11 if m.divisor == 2 else 6
    for k in range(1, K + 1):
        for c in contents_of_length(m.divisor, k):
            got = realizable_necklace_counts(m, c)
            assert (got.necklaces, got.primitive_necklaces) == _brute_realizable(m, c), (k, c)
            assert got.necklaces <= got.all_necklaces


@pytest.mark.parametrize("name", ["3x+1", "5x+1", "mod3-4x"])
def test_prime_multipliers_realize_every_necklace(name):
    # common practice, no source (the rational cycle is the fixed point of a d-adic
    # contraction onto the class following the word): brute force equals the closed form
    m = maps.get(name)
    for k in range(1, 8 if m.divisor == 2 else 6):
        for c in contents_of_length(m.divisor, k):
            A = 1
            for a, cr in zip(m.multipliers, c):
                A *= a**cr
            if m.divisor**k == A:
                continue
            got = realizable_necklace_counts(m, c)
            assert got.necklaces == got.all_necklaces == _brute_realizable(m, c)[0]
            assert followed_word_count(m, c) == _brute_followed(m, k).get(c, 0)


@pytest.mark.parametrize("name, a1", [("3x+1-undivided", 3), ("n/2,5n+1", 5)])
def test_rho_of_realizable_necklaces(name, a1):
    # common practice, no source: with a = 2a' (a' odd) and b/2 odd every 1 is followed by 0,
    # and the realizable necklaces of type (k, x) are the necklaces of type (k - x, x) (brute
    # force above confirms the counts), so the growth rate is that of a' (OEIS A047996 counts)
    m = SHARED[name]
    for k in range(2, 12):
        for x in range(1, k // 2 + 1):
            if 2 ** (k - x) == a1**x:
                continue
            got = realizable_necklace_counts(m, (k - x, x))
            assert got.necklaces == necklace_count((k - 2 * x, x)), (k, x)
    r, exact, _note = realizable_rho(m)
    assert r == rho(f"{a1}x+1") and exact == f"t^t / (t-1)^(t-1), t = log_2 {a1}"
    # a forced odd step after an odd step: nothing realizable in the critical types
    assert realizable_rho(SHARED["n/2,3n+2"])[0] is None
    assert realizable_rho(SHARED["n/2,6n+1"])[0] is None


@pytest.mark.parametrize("name", ["3x+1-undivided", "d3 -3,5,2", "n/2,3n+2"])
def test_count_reports_the_realizable_figures(name):
    # common practice, no source: the brute forces above, through count(); the heuristic
    # divides the realizable necklaces (not every necklace) by |D|
    m = SHARED[name]
    for c in [(9, 4), (8, 3), (5, 5)] if m.divisor == 2 else [(2, 1, 1), (1, 2, 2), (3, 0, 2)]:
        k = sum(c)
        A = 1
        for a, cr in zip(m.multipliers, c):
            A *= a**cr
        if m.divisor**k == A:
            continue
        tc = count(m, content=c)
        real, prim = _brute_realizable(m, c)
        assert (tc.realizable_necklaces, tc.realizable_primitive_necklaces) == (real, prim)
        assert tc.followed_words == _brute_followed(m, k).get(c, 0)
        assert tc.heuristic == Fraction(real, abs(tc.denominator))
        assert tc.labels["realizable_necklaces"] == "exact"
        rows = {r[0]: r[1] for r in tc.figures_table().rows}
        assert rows["realizable necklaces"] == real
        assert len(tc.primitive_integer_cycles) <= prim  # every integer cycle is realizable


def test_count_above_the_limit_says_it_did_not_count():
    m = SHARED["3x+1-undivided"]
    tc = count(m, 40, 15, limit=10)
    assert tc.realizable_necklaces is None and tc.heuristic_counts_every_itinerary
    assert "over-count" in tc.enumeration_note
    rows = {r[0]: r for r in tc.figures_table().rows}
    assert rows["realizable necklaces"][1].startswith("not counted")
    assert "(every itinerary: over-counts)" in " ".join(rows)


def test_compare_rho_counts_realizable_necklaces():
    # common practice, no source: for n/2, 3n+1 the realizable rate is that of 3x+1
    from cyclewright.cycles.compare import compare

    cmp = compare(
        ["3x+1", "3x+1-undivided", "mod3-4x"],
        max_length=6,
        to=100,
        odd=4,
        store=False,
        workers=1,
    )
    rows = {r["map"]: r for r in cmp.rows()}
    assert rows["3x+1-undivided"]["rho"] == rows["3x+1"]["rho"] == rho("3x+1")
    assert rows["3x+1-undivided"]["rho_assumes"].startswith("realizable necklaces only")
    assert rows["3x+1-undivided"]["rho_exact"] == "t^t / (t-1)^(t-1), t = log_2 3"
    assert (
        rows["3x+1-undivided"]["realizable_necklaces_at_x"]
        <= rows["3x+1-undivided"]["necklaces_at_x"]
    )
    assert rows["3x+1"]["rho_assumes"].startswith("every itinerary is realizable")
