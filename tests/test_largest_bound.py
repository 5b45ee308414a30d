"""The largest bound over lengths <= K from the continued fraction of log2 a.

Checked against the per-type prefilter method (every length, exact
confirmation) for every K <= 10^5 on five maps, against brute force over all
fractions for small K, and against values computed independently.
"""

from __future__ import annotations

from fractions import Fraction

import pytest

from cyclewright import maps
from cyclewright.cycles import largest_bound as lbm
from cyclewright.cycles.continued_fractions import continued_fraction_log, semiconvergents
from cyclewright.cycles.errors import InputError
from cyclewright.cycles.largest_bound import (
    continued_fraction_applies,
    farey_neighbours_log,
    largest_bound_up_to,
)
from cyclewright.cycles.minimum_bound import _bound_of_content, minimum_bound

M31 = maps.get("3x+1")


def test_check_values_3x1_at_100000():
    # values computed independently of the project (exact integer arithmetic), quoted
    # with the task; the prefilter method of this project gives the same
    pos = largest_bound_up_to(M31, 100_000, "positive")
    neg = largest_bound_up_to(M31, 100_000, "negative")
    assert (pos.integer, pos.length, pos.odd) == (1_447_682_232, 75235, 47468)
    assert (neg.integer, neg.length, neg.odd) == (1_462_137_654, 50508, 31867)
    for lb in (pos, neg):
        assert lb.method.startswith("continued fraction")
        assert lb.integer <= lb.interval.lo <= lb.interval.hi < lb.integer + 1
        # the exact big-integer evaluation of the same type (Eliahou 1993 product bound)
        assert minimum_bound(M31, (lb.length, lb.odd), lb.side).integer == lb.integer


@pytest.mark.slow
def test_positive_side_constant_from_301994_to_16785920():
    # independent computation quoted with the task: 9.85e11 at (301994, 190537) for every
    # K from 301,994 to 16,785,920. From the continued fraction of log2 3 (OEIS A028507):
    # p_13 = 301994 (above), p_14 = 55 p_13 + p_12 = 16,785,921 (below), and the next
    # approximant above is p_13 + p_14 = 17,087,915
    for K in (301_994, 1_000_000, 8_000_000, 16_785_920):
        lb = largest_bound_up_to(M31, K, "positive")
        assert (lb.length, lb.odd) == (301_994, 190_537)
        assert lb.integer == 984_572_810_980
    assert largest_bound_up_to(M31, 301_993, "positive").length != 301_994
    assert largest_bound_up_to(M31, 17_087_914, "positive").length == 301_994
    assert largest_bound_up_to(M31, 17_087_915, "positive").length == 17_087_915
    assert largest_bound_up_to(M31, 16_785_921, "negative").length == 16_785_921


def test_negative_side_climbs_along_semiconvergents():
    # independent computation quoted with the task: j * 301994 + 176251, about 8.2e11 at
    # j = 25 (length 7,726,101)
    lb = largest_bound_up_to(M31, 7_726_101, "negative")
    assert lb.length == 25 * 301_994 + 176_251 == 7_726_101
    assert 8.1e11 < lb.integer < 8.3e11
    assert "semiconvergent" in lb.approximant
    assert largest_bound_up_to(M31, 8_000_000, "negative").length == 7_726_101


def test_continued_fraction_of_log2_3():
    # OEIS A028507 (from memory in the task; the first 15 terms also in the module doctest)
    assert continued_fraction_log(3, 2, 21) == (
        1, 1, 1, 2, 2, 3, 1, 5, 2, 23, 2, 2, 1, 1, 55, 1, 4, 3, 1, 1, 15,
    )  # fmt: skip


def _brute_neighbours(a: int, K: int):
    """Nearest p/q to log2 a below and above with p <= K, deciding 2^p vs a^q exactly."""
    below, above = Fraction(0), None
    for p in range(1, K + 1):
        for q in range(1, p + 1):
            f = Fraction(p, q)
            if 2**p < a**q:  # p/q < log2 a
                if f > below:
                    below = f
            elif 2**p > a**q and (above is None or f < above):
                above = f
    return below, above


@pytest.mark.parametrize("a", [3, 5, 7, 181])
def test_farey_neighbours_by_brute_force(a):
    # common practice, no source: every fraction p/q with p <= K compared exactly
    for K in (1, 2, 3, 5, 8, 13, 40, 97):
        (bp, bq), (ap, aq) = farey_neighbours_log(a, K)
        below, above = _brute_neighbours(a, K)
        assert Fraction(bp, bq) == below
        assert (aq == 0 and above is None) or Fraction(ap, aq) == above


def _prefix_max_by_prefilter(m, K, side):
    """The largest bound over lengths <= K for every K at once, by the prefilter method.

    One pass over the lengths with the prefilter's rigorous per-length upper
    bound ``M_hi`` (largest_bound._candidates_halving) and an exact evaluation
    whenever a length could beat the running maximum: the record lengths and values.
    """
    cands, _ = lbm._candidates_halving(m, 1, K, side)
    by_k = {k: (mhi, content) for mhi, k, content in cands}
    best, records = 0, [(1, 0)]
    for k in range(1, K + 1):
        if k not in by_k or by_k[k][0] < best + 1:
            continue
        b = _bound_of_content(m, by_k[k][1], side, with_interval=False)
        if b.applies and b.possible and b.integer > best:
            best = b.integer
            records.append((k, best))
    return records


@pytest.mark.slow
@pytest.mark.parametrize("name", ["3x+1", "3x+5", "3x-1", "5x+1", "181x+1"])
@pytest.mark.parametrize("side", ["positive", "negative"])
def test_equals_prefilter_for_every_K_up_to_100000(name, side):
    # common practice, no source: two independent methods must agree. Both results are
    # step functions of K; the prefilter's changes only at its record lengths, the
    # continued-fraction one only at numerators of approximants of log2 a. Equal at every
    # change point of either (and just before it) means equal for every K <= 10^5.
    m = maps.get(name)
    Kmax = 100_000
    records = _prefix_max_by_prefilter(m, Kmax, side)
    a = m.branches[1].multiplier
    nums = {s.p for s in semiconvergents(continued_fraction_log(a, 2, 40)) if s.p <= Kmax}
    points = {1, Kmax} | {r for r, _ in records} | nums
    points |= {p - 1 for p in points if p > 1}

    def old(K):
        return max(v for r, v in records if r <= K)

    for K in sorted(points):
        assert largest_bound_up_to(m, K, side).integer == old(K), K
    assert largest_bound_up_to(m, Kmax, side, method="prefilter").integer == old(Kmax)


@pytest.mark.parametrize("name", ["3x+1", "5x+1", "3x+7"])
def test_interval_path_equals_exact(name, monkeypatch):
    # the interval evaluation (used above EXACT_LENGTH_LIMIT) against exact big integers
    m = maps.get(name)
    monkeypatch.setattr(lbm, "EXACT_LENGTH_LIMIT", 0)
    for K in (1, 2, 7, 65, 1000, 40_000, 200_000):
        for side in ("positive", "negative"):
            lb = largest_bound_up_to(m, K, side)
            assert lb.bound is None
            if lb.content is None:
                continue
            exact = minimum_bound(m, (lb.length, lb.odd), side)
            assert lb.integer == exact.integer
            assert exact.interval.lo <= lb.interval.hi and lb.interval.lo <= exact.interval.hi


def test_huge_K():
    # K = 10^12: only O(log K) partial quotients and one interval evaluation
    lb = largest_bound_up_to(M31, 10**12, "positive")
    k, x = lb.length, lb.odd
    assert k <= 10**12 and (k, x) == farey_neighbours_log(3, 10**12)[1]
    assert lb.integer <= lb.interval.lo <= lb.interval.hi < lb.integer + 1
    # M* = 1 / (2^(k/x) - 3) to 40 digits (mpmath, the closed form of Eliahou 1993's bound)
    import mpmath

    with mpmath.workdps(60):
        ref = 1 / (mpmath.mpf(2) ** (mpmath.mpf(k) / x) - 3)
        assert 0 <= ref - lb.integer < 1


def test_applies_only_to_two_branch_halving_maps():
    assert continued_fraction_applies(M31)
    assert not continued_fraction_applies(maps.get("mod3-4x"))  # three branches
    assert not continued_fraction_applies(maps.get("mod3-mixed"))
    lb = largest_bound_up_to(maps.get("mod3-mixed"), 8)
    assert lb.method.startswith("float prefilter")
    with pytest.raises(InputError):
        largest_bound_up_to(maps.get("mod3-4x"), 8, method="continued-fraction")
    with pytest.raises(InputError):
        largest_bound_up_to(M31, 8, method="fast")
