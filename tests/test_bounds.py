"""The proved bound on a cycle minimum, linear forms in logarithms, and the largest bound."""

from __future__ import annotations

from fractions import Fraction

import mpmath
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from cyclewright import maps
from cyclewright.cycles.errors import InputError
from cyclewright.cycles.intervals import log_form
from cyclewright.cycles.itinerary import content as word_content
from cyclewright.cycles.largest_bound import bound_for_length, largest_bound_up_to
from cyclewright.cycles.linear_forms import candidates_from_linear_form, linear_form_bound
from cyclewright.cycles.minimum_bound import minimum_bound
from cyclewright.cycles.orbit import orbit
from cyclewright.cycles.solver import cycle_representative

M31 = maps.get("3x+1")


def _product_allows(m, content, side, n: int) -> bool:
    """Independent exact check of the necessary condition (docs/design.md, section 4; Eliahou 1993):
    prod_r (1 + s b_r/(a_r n))^{c_r} compared with d^k / A using Fractions only."""
    s = 1 if side == "positive" else -1
    k = sum(content)
    A = 1
    prod = Fraction(1)
    signs = set()
    for (a, b), c in zip(m.branches, content):
        if not c:
            continue
        A *= a**c
        if b:
            signs.add(s * b > 0)
            prod *= (1 + Fraction(s * b, a * n)) ** c
    target = Fraction(m.divisor**k, A)
    if signs == {True}:
        return prod >= target
    if any(1 + Fraction(s * b, a * n) <= 0 for (a, b), c in zip(m.branches, content) if c and b):
        return True
    return prod <= target


@pytest.mark.parametrize("name", ["3x+1", "3x+5", "5x+1", "3x-1", "3x+1-undivided"])
@pytest.mark.parametrize("side", ["positive", "negative"])
def test_integer_bound_is_exactly_the_largest_allowed_minimum(name, side):
    # Eliahou 1993 / docs/design.md, section 4: M is the largest n passing the product inequality
    m = maps.get(name)
    for k in range(1, 31):
        for x in range(1, k + 1):
            b = minimum_bound(m, (k, x), side)
            assert b.applies
            if not b.possible:
                assert b.integer == 0
                D = 2**k - m.branches[1].multiplier ** x
                assert D == 0 or (D > 0) != ((m.branches[1].offset > 0) == (side == "positive"))
                continue
            c = (k - x, x)
            M = b.integer
            if M >= 1:
                assert _product_allows(m, c, side, M)
            assert not _product_allows(m, c, side, M + 1)
            assert b.interval.lo >= M and b.interval.hi <= M + 1


def test_interval_matches_closed_form_in_mpmath():
    # docs/design.md, section 4, formula n_min <= b / (a ((2^k/a^x)^(1/x) - 1)), evaluated by
    # mpmath at 60 digits (reference library)
    mpmath.mp.dps = 60
    try:
        for name, k, x in [("3x+1", 13, 8), ("3x+1", 65, 41), ("5x+1", 7, 3), ("7x+1", 17, 6)]:
            m = maps.get(name)
            a, b = m.ax_b
            val = mpmath.mpf(b) / (
                a * ((mpmath.mpf(2) ** k / mpmath.mpf(a) ** x) ** (mpmath.mpf(1) / x) - 1)
            )
            iv = minimum_bound(m, (k, x)).interval
            assert mpmath.mpf(iv.lo.numerator) / iv.lo.denominator <= val
            assert val <= mpmath.mpf(iv.hi.numerator) / iv.hi.denominator
            assert iv.width < Fraction(1, 10**9)
    finally:
        mpmath.mp.dps = 15


def _integer_cycles(m, limit: int, steps: int = 400):
    """Cycles reached from every start |n| <= limit, by exact iteration (brute force)."""
    seen = {}
    for n in range(-limit, limit + 1):
        o = orbit(m, n, max_steps=steps, ceiling=10**12)
        if o.cycle:
            cyc = tuple(o.cycle)
            mn = cycle_representative(cyc)
            if mn != 0:
                seen[mn] = cyc
    return seen


@pytest.mark.parametrize(
    "name, expected_minima",
    [
        ("3x+1", {1, -1, -5, -17}),  # Lagarias 1985 survey (from memory): known 3x+1 cycles
        ("5x+1", {1, 13, 17}),  # Lagarias 1985 survey (from memory): three known 5x+1 cycles
        # 19 and 23: OEIS A226607; 1, 5, 187, 347: Lagarias 1990 table of 3x+5 cycles (from memory)
        ("3x+5", {1, 5, 19, 23, 187, 347}),
    ],
)
def test_known_cycles_lie_below_their_type_bound(name, expected_minima):
    m = maps.get(name)
    found = _integer_cycles(m, 400)
    positives = {mn for mn in found if mn > 0}
    assert expected_minima <= set(found) | positives
    for mn, cyc in found.items():
        word = tuple(v % 2 for v in cyc)
        c = word_content(word, 2)
        side = "positive" if mn > 0 else "negative"
        b = minimum_bound(m, {0: c[0], 1: c[1]}, side)
        assert b.applies and b.possible
        assert abs(mn) <= b.integer


def test_bound_is_attained_by_negative_3x1_cycles():
    # the cycles {-1} and {-5, -7, -10} of 3x+1 (Lagarias 1985, from memory) sit exactly on the bound
    assert minimum_bound(M31, (1, 1), "negative").integer == 1
    assert minimum_bound(M31, (3, 2), "negative").integer == 5


def test_negative_side_is_positive_side_of_conjugate():
    # conjugation n -> -T(-n) (docs/design.md, section 1); common practice, no source
    for name in ["3x+1", "5x+1", "3x+7"]:
        m = maps.get(name)
        conj = m.conjugate()
        for k in range(1, 25):
            for x in range(1, k + 1):
                a = minimum_bound(m, (k, x), "negative")
                b = minimum_bound(conj, (k, x), "positive")
                assert (a.possible, a.integer) == (b.possible, b.integer)


def test_mixed_offsets_do_not_apply_and_d3_bound_is_exact():
    m = maps.get("mod3-4x")
    assert not minimum_bound(m, (1, 1, 1)).applies
    mm = maps.get("mod3-mixed")
    for c in [(2, 3, 1), (1, 5, 4), (3, 7, 6), (2, 0, 9)]:
        b = minimum_bound(mm, c)
        if b.possible:
            assert b.integer == 0 or _product_allows(mm, c, "positive", b.integer)
            assert not _product_allows(mm, c, "positive", b.integer + 1)
            assert b.interval.lo >= b.integer and b.interval.hi <= b.integer + 1


def test_possible_false_is_a_proof_of_absence():
    # D = 1631 > 0: no negative cycle of 3x+1 of type (13, 8)
    b = minimum_bound(M31, (13, 8), "negative")
    assert b.applies and not b.possible and b.integer == 0
    # only residue 0 used: the only cycle is 0
    assert not minimum_bound(M31, (5, 0)).possible


def test_log_form_is_certified_against_mpmath():
    # reference library: mpmath at 80 digits
    mpmath.mp.dps = 80
    try:
        for name, k, x in [("3x+1", 13, 8), ("3x+1", 3170, 2000), ("5x+1", 7, 3)]:
            m = maps.get(name)
            a = m.branches[1].multiplier
            val = k * mpmath.log(2) - x * mpmath.log(a)
            iv = log_form(m, (k, x))
            assert mpmath.mpf(iv.lo.numerator) / iv.lo.denominator <= val
            assert val <= mpmath.mpf(iv.hi.numerator) / iv.hi.denominator
    finally:
        mpmath.mp.dps = 15


@pytest.mark.slow
def test_rhin_lower_bound_is_not_violated_by_actual_values():
    # Rhin 1987 (from memory): |k ln 2 - x ln 3| >= max(k, x)^(-13.3). A violation would
    # reveal a misremembered constant; check every x <= 3000 at the critical lengths.
    for x in range(1, 3001):
        k = (3**x).bit_length()
        for kk in (k, k - 1):
            if kk < x:
                continue
            lf = linear_form_bound(M31, (kk, x))
            lam = log_form(M31, (kk, x))
            assert lf.source in ("Rhin 1987", "Laurent 2008, Corollary 2", "elementary")
            actual_log = mpmath.log(abs(mpmath.mpf(lam.lo.numerator) / lam.lo.denominator))
            assert actual_log >= mpmath.mpf(lf.log_lower.numerator) / lf.log_lower.denominator


@pytest.mark.parametrize("name", ["5x+1", "7x+1", "181x+1", "5x-1"])
def test_laurent_lower_bound_is_not_violated(name):
    # Laurent 2008, Corollary 2 (from memory), against the certified |Λ|
    m = maps.get(name)
    a = m.branches[1].multiplier
    for x in range(1, 300):
        k = (a**x).bit_length()
        lf = linear_form_bound(m, (k, x))
        lam = log_form(m, (k, x))
        assert lf.applies
        lo = min(abs(lam.lo), abs(lam.hi))
        assert mpmath.log(mpmath.mpf(lo.numerator) / lo.denominator) >= float(lf.log_lower)


def test_linear_form_sources():
    assert linear_form_bound(M31, (13, 8)).source == "Rhin 1987"
    assert linear_form_bound(maps.get("5x+1"), (7, 3)).source == "Laurent 2008, Corollary 2"
    # undivided 3x+1: 2^k vs 6^x = (k - x) ln 2 - x ln 3, Rhin again
    assert linear_form_bound(maps.get("3x+1-undivided"), (20, 7)).source == "Rhin 1987"
    # no cancellation: elementary
    assert linear_form_bound(M31, (5, 0)).source == "elementary"


@settings(max_examples=40, deadline=None)
@given(st.integers(1, 200), st.data())
def test_linear_form_candidates_dominate_the_exact_bound(k, data):
    x = data.draw(st.integers(1, k))
    for side in ("positive", "negative"):
        b = minimum_bound(M31, (k, x), side)
        M_lf, _lf = candidates_from_linear_form(M31, (k, x), side)
        assert M_lf is not None and M_lf >= b.integer


def _exhaustive_max(m, K, side):
    best = 0
    d = m.divisor
    import itertools

    for k in range(1, K + 1):
        for c in itertools.product(range(k + 1), repeat=d):
            if sum(c) != k:
                continue
            b = minimum_bound(m, dict(enumerate(c)), side)
            if b.applies and b.possible and b.integer > best:
                best = b.integer
    return best


@pytest.mark.parametrize(
    "name, K",
    [("3x+1", 70), ("5x+1", 40), ("3x+5", 40), ("3x+1-undivided", 40), ("mod3-mixed", 10)],
)
@pytest.mark.parametrize("side", ["positive", "negative"])
def test_largest_bound_equals_exhaustive_maximum(name, K, side):
    # the float prefilter never drops the winner: compare with every type evaluated exactly
    m = maps.get(name)
    lb = largest_bound_up_to(m, K, side)
    assert lb.applies
    assert lb.integer == _exhaustive_max(m, K, side)
    if lb.integer:
        assert minimum_bound(m, dict(enumerate(lb.content)), side).integer == lb.integer


def test_largest_bound_3x1_to_100000():
    # a census-sized query; the winner sits at an intermediate fraction of log2(3)
    lb = largest_bound_up_to(M31, 100000, "positive")
    k, x = lb.length, lb.odd
    assert 2**k > 3**x
    assert abs(k / x - 1.5849625007211562) < 1e-8
    assert lb.exact_checks <= 20
    assert lb.integer == minimum_bound(M31, (k, x)).integer


def test_largest_bound_mixed_offsets_does_not_apply():
    lb = largest_bound_up_to(maps.get("mod3-4x"), 4)
    assert not lb.applies and lb.witness is not None


def test_bound_for_length_matches_best_x():
    b = bound_for_length(M31, 13)
    assert b.odd == 8 and b.integer == 11


def test_bad_side_and_lengths():
    with pytest.raises(InputError):
        minimum_bound(M31, (13, 8), "upward")
    with pytest.raises(InputError):
        largest_bound_up_to(M31, 0)
    with pytest.raises(InputError):
        minimum_bound(M31, (5, 7))


def test_linear_form_candidates_dominate_the_exact_bound_for_every_small_type():
    # the same invariant as above, on every type with k <= 24 (includes (2, 1), the
    # type of the cycle {1, 2}: common practice, no source)
    for k in range(1, 25):
        for x in range(1, k + 1):
            for side in ("positive", "negative"):
                b = minimum_bound(M31, (k, x), side)
                M_lf, _lf = candidates_from_linear_form(M31, (k, x), side)
                assert M_lf is not None and M_lf >= b.integer, (k, x, side)
