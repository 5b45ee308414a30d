"""Every label true: label names, counts of primitive cycles, maps the framework claims.

Each figure of every ``--json`` output carries one of the documented labels;
repeated traversals are not counted as new cycles; a negative multiplier is
counted; a divisor-3 map whose degenerate words no integer follows is
censused exactly.
"""

from __future__ import annotations

import json

import pytest
from brute import brute_force_cycles
from conftest import run_cli

from cyclewright import maps
from cyclewright.cycles.census import census
from cyclewright.cycles.counting import count
from cyclewright.cycles.labels import LABELS
from cyclewright.cycles.sweep import sweep
from cyclewright.cycles.wordsearch import following_class
from cyclewright.maps import Map


def _brute_force_cycles(m: Map, K: int) -> dict[int, int]:
    """Every integer cycle of length <= K by trying every word (tests/brute.py)."""
    return brute_force_cycles(m, K)


def m_iter(m: Map, x: int, n: int) -> int:
    for _ in range(n):
        x = m.step(x)
    return x


def test_divisor3_degenerate_words_decided_exactly():
    # common practice, no source (brute force over every word, Fractions): the words with
    # d^k = A and B = 0 (such as (0, 0)) are followed by no integer, so the census is finite:
    # minima -59 (length 2), 1 (3), 11 (1), 31 (3)
    m = Map(3, [(-3, 12), (5, 13), (2, 11)])
    assert following_class(m, (0, 0)) is None
    c = census(m, 9, side="both", store=False, workers=1)
    got = {x.minimum: x.length for x in c.cycles}
    assert got == {-59: 2, 1: 3, 11: 1, 31: 3}
    assert got == _brute_force_cycles(m, 9)


def test_negative_multiplier_is_counted():
    # common practice, no source (brute force over every word): n/2 on even n, (-3n+1)/2 on
    # odd n; |A| enters Λ, the sign of A only D = d^k - A
    m = Map(2, [(1, 0), (-3, 1)])
    brute = _brute_force_cycles(m, 8)
    for k in range(1, 9):
        for x in range(1, k + 1):
            tc = count(m, k, x)
            assert tc.denominator == 2**k - (-3) ** x
            assert tc.log_form.lo > 0 or tc.log_form.hi < 0 or 2**k == 3**x
            for c in tc.primitive_integer_cycles:
                assert brute[c.minimum] == k
    assert brute  # the map has cycles (e.g. the fixed point -1 of (-3n+1)/2 ... and 1 -> -1)


def test_repeated_traversal_is_not_a_new_cycle():
    # common practice, no source: the word 1010 is the cycle {1, 2} of 3x+1 traversed twice
    # (Lagarias 1985 survey: the only positive cycle of 3x+1 below these lengths is {1, 2})
    tc = count(maps.get("3x+1"), 4, 2)
    assert len(tc.integer_cycles) == 1
    assert len(tc.primitive_integer_cycles) == 0 and len(tc.repeated_integer_cycles) == 1
    assert tc.row()["primitive_integer_cycles"] == 0
    s = sweep(maps.get("3x+1"), range(1, 7))
    summary = s.summary_table()
    found = summary.rows[0][list(summary.columns).index("integer cycles found (primitive)")]
    assert found == 1  # {1, 2} once, not again at k = 4


def test_census_statement_counts_primitive_cycles():
    # OEIS A226607 (k = 5): the primitive cycles of 3x+5 have minima 1, 19, 23, 187, 347;
    # 0 and 5 (= 5 x the cycle 1 of 3x+1) are not primitive (Lagarias 1990)
    c = census(maps.get("3x+5"), 30, side="positive", store=False, workers=1)
    assert "exactly 7 integer cycles" in c.statement()
    assert "5 of them primitive in Lagarias' sense" in c.statement()


COMMANDS = [
    ["maps", "--json"],
    ["maps", "show", "3x+1-undivided", "--json"],
    ["orbit", "3x+1", "27", "--json"],
    ["solve", "3x+5", "11100", "--json"],
    ["count", "3x+1", "--length", "13", "--odd", "8", "--json"],
    ["count", "3x+1", "--length", "4", "--odd", "2", "--json"],
    ["count", "3x+1-undivided", "--length", "20", "--odd", "7", "--json"],
    ["sweep", "3x+1", "--odd", "1..6", "--json"],
    ["floor", "3x+1", "--verified-to", "2^40", "--json"],
    ["scan", "3x+1", "--to", "1000", "--no-store", "--json"],
    ["census", "3x+1", "--max-length", "50", "--json"],
    ["census", "3x+k", "--offsets", "1..7", "--max-length", "10", "--json"],
    [
        "compare",
        "3x+1",
        "5x+1",
        "3x+1-undivided",
        "--max-length",
        "10",
        "--to",
        "1000",
        "--odd",
        "6",
        "--no-store",
        "--json",
    ],
    ["graph", "3x+1", "--to", "100", "--json"],
]


def _labels(obj, path, out):
    if isinstance(obj, dict):
        for k, v in obj.items():
            if k == "labels" and isinstance(v, dict):
                for f, lab in v.items():
                    out.append((f"{path}.{f}", lab, obj.get(f)))
            elif k == "label" and isinstance(v, str):
                out.append((f"{path}.label", v, None))
            else:
                _labels(v, f"{path}.{k}", out)
    elif isinstance(obj, list):
        for i, v in enumerate(obj[:40]):
            _labels(v, f"{path}[{i}]", out)


@pytest.mark.slow
@pytest.mark.parametrize("args", COMMANDS, ids=[" ".join(a[:2]) for a in COMMANDS])
def test_every_json_label_is_documented(args):
    # common practice, no source: the five labels of cycles/labels.py, and no float is exact
    out = run_cli(*args)
    assert out.returncode == 0, out.stderr
    found: list = []
    _labels(json.loads(out.stdout), "", found)
    assert found, "the output carries no labels"
    for where, lab, value in found:
        assert lab in LABELS, f"{where}: label {lab!r} is not one of {sorted(LABELS)}"
        if lab == "exact":
            assert not isinstance(value, float), f"{where}: a float labelled exact"


def test_best_approximation_bound_matches_direct_minimum():
    # sympy's continued fractions (reference library) of log_2 3; Khinchin, Continued
    # Fractions, Theorems 16-17: the least |k ln 2 - x ln 3| over x <= X is at a convergent,
    # so the direct minimum over every convergent and semiconvergent must equal the bound
    import mpmath
    import sympy

    from cyclewright.cycles.continued_fractions import best_approximation_bound

    X = 10**6
    approx = sympy.Rational(str(sympy.N(sympy.log(3) / sympy.log(2), 60)))
    terms = []
    for t in sympy.continued_fraction_iterator(approx):
        terms.append(int(t))
        if len(terms) > 25:
            break
    p0, q0, p1, q1 = 0, 1, 1, 0
    fractions = []
    for t in terms:
        for j in range(1, t + 1):
            fractions.append((p0 + j * p1, q0 + j * q1))
        p0, q0, p1, q1 = p1, q1, t * p1 + p0, t * q1 + q0
    mpmath.mp.dps = 60
    best = min(
        (abs(p * mpmath.log(2) - q * mpmath.log(3)), p, q) for p, q in fractions if 1 <= q <= X
    )
    lo, k, x = best_approximation_bound(3, 2, X)
    assert (k, x) == (best[1], best[2]) == (301994, 190537)
    assert mpmath.mpf(lo.numerator) / lo.denominator <= best[0]
    assert best[0] - mpmath.mpf(lo.numerator) / lo.denominator < best[0] * mpmath.mpf(10) ** -15


@pytest.mark.parametrize("a, d", [(3, 2), (5, 2), (7, 3), (181, 2)])
def test_best_approximation_bound_against_brute_force_for_small_ranges(a, d):
    # definition checked directly (common practice, no source): for every X the bound is
    # at most |k ln d - x ln a| for every x <= X and the two integers k nearest x log_d a,
    # and it is attained; X = 1 with a_1 = 1 (log_2 3 = [1; 1, 1, 2, ...]) is the edge case
    import mpmath

    from cyclewright.cycles.continued_fractions import best_approximation_bound

    mpmath.mp.dps = 50
    ld, la = mpmath.log(d), mpmath.log(a)
    for X in range(1, 41):
        direct = min(
            abs(k * ld - x * la)
            for x in range(1, X + 1)
            for k in (int(mpmath.floor(x * la / ld)), int(mpmath.floor(x * la / ld)) + 1)
        )
        lo, k, x = best_approximation_bound(a, d, X)
        assert mpmath.mpf(lo.numerator) / lo.denominator <= direct
        assert abs(abs(k * ld - x * la) - direct) < mpmath.mpf(10) ** -30
