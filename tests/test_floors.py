"""Tests of cycles.floors: continued fractions of log2 a and the least length of a further cycle."""

from __future__ import annotations

import itertools
import json
from fractions import Fraction

import pytest
import sympy
from hypothesis import given, settings
from strategies import floor_maps, rational_intervals

from cyclewright import maps
from cyclewright.cli.app import main
from cyclewright.cycles.continued_fractions import (
    continued_fraction_log,
    convergents,
    semiconvergents,
    simplest_fraction,
)
from cyclewright.cycles.errors import InputError
from cyclewright.cycles.floors import floor
from cyclewright.cycles.graph import functional_graph
from cyclewright.cycles.intervals import _is_one, _log_sign
from cyclewright.maps import Map

# --------------------------------------------------------------------------
# continued fractions
# --------------------------------------------------------------------------


def test_cf_log2_3_matches_oeis():
    # OEIS A028507 (continued fraction for log_2 3), from memory
    assert continued_fraction_log(3, 2, 15) == (1, 1, 1, 2, 2, 3, 1, 5, 2, 23, 2, 2, 1, 1, 55)


@pytest.mark.parametrize("a", [3, 5, 6, 7, 181])
def test_cf_matches_sympy(a):
    # reference library: sympy's continued_fraction_iterator on log(a)/log(2)
    ref = list(itertools.islice(sympy.continued_fraction_iterator(sympy.log(a) / sympy.log(2)), 30))
    assert continued_fraction_log(a, 2, 30) == tuple(ref)


def test_cf_rational_logs_are_exact():
    # common practice, no source: log_4 8 = 3/2, log_2 1024 = 10, log_9 (1/3) = -1/2
    assert continued_fraction_log(8, 4) == (1, 2)
    assert continued_fraction_log(1024, 2) == (10,)
    assert continued_fraction_log(Fraction(1, 3), 9) == (-1, 2)


def test_convergents_of_log2_3():
    # OEIS A005663 / A005664 (numerators / denominators of convergents to log_2 3), from memory
    cf = continued_fraction_log(3, 2, 16)
    got = convergents(cf)
    nums = [1, 2, 3, 8, 19, 65, 84, 485, 1054, 24727, 50508, 125743, 176251, 301994, 16785921]
    dens = [1, 1, 2, 5, 12, 41, 53, 306, 665, 15601, 31867, 79335, 111202, 190537, 10590737]
    assert [p for p, _ in got[:15]] == nums
    assert [q for _, q in got[:15]] == dens
    # reference library: sympy's convergents of the same expansion
    ref = list(sympy.continued_fraction_convergents(list(cf)))
    assert [Fraction(p, q) for p, q in got] == [Fraction(int(r.p), int(r.q)) for r in ref]


def test_semiconvergents_are_the_stern_brocot_path():
    # common practice, no source: the nodes on the Stern-Brocot path of an
    # irrational are exactly its convergents and intermediate fractions.
    cf = continued_fraction_log(3, 2, 8)
    semis = [(s.p, s.q) for s in semiconvergents(cf)]
    alpha = sympy.log(3) / sympy.log(2)
    path = []
    lp, lq, rp, rq = 0, 1, 1, 0
    while len(path) < len(semis):
        p, q = lp + rp, lq + rq
        path.append((p, q))
        if sympy.Rational(p, q) < alpha:
            lp, lq = p, q
        else:
            rp, rq = p, q
    assert semis == path


# --------------------------------------------------------------------------
# exact machinery
# --------------------------------------------------------------------------


def test_log_sign_equality_and_large_exponents():
    # common practice, no source: 4^(10^6) = 2^(2*10^6) exactly; decided
    # through valuations, beyond the reach of any precision.
    assert _log_sign([(2 * 10**6, Fraction(2)), (-(10**6), Fraction(4))]) == 0
    assert _is_one([(3, Fraction(4, 9)), (-6, Fraction(2, 3))])
    M = 2**40 + 1
    g = Fraction(3 * M + 1, M)
    # an exact integer comparison just above the exact-path threshold
    k, x = 3000, 1891
    exact = (2**k * M**x > (3 * M + 1) ** x) - (2**k * M**x < (3 * M + 1) ** x)
    assert _log_sign([(k, Fraction(2)), (-x, g)]) == exact


@pytest.mark.slow
@settings(max_examples=200, deadline=None)
@given(rational_intervals())
def test_simplest_fraction_is_least_denominator(iv):
    # common practice, no source: brute force over denominators
    lo, hi, lc, hc = iv

    def inside(f):
        return (lo < f or (lc and lo == f)) and (f < hi or (hc and f == hi))

    def where(p, q):
        f = Fraction(p, q)
        if not (lo < f or (lc and lo == f)):
            return -1
        if not (f < hi or (hc and f == hi)):
            return 1
        return 0

    p, q = simplest_fraction(where)
    assert inside(Fraction(p, q))
    for qq in range(1, q):
        pp = int(lo * qq)  # candidates around lo*qq
        for cand in range(max(pp - 1, 0), int(hi * qq) + 2):
            assert not inside(Fraction(cand, qq)), (cand, qq)
    # and among denominator q, p is the least numerator
    for cand in range(0, p):
        assert not inside(Fraction(cand, q))


# --------------------------------------------------------------------------
# published floors
# --------------------------------------------------------------------------


def test_eliahou_2_40():
    # Eliahou 1993, Discrete Mathematics 118: verified to 2^40 -> least length
    # 17,087,915 with 10,781,274 odd steps; p_15/q_15 of log2 3 (A005663/A005664 indexing)
    f = floor(maps.get("3x+1"), 2**40)
    assert (f.least_length, f.odd_steps) == (17_087_915, 10_781_274)
    assert f.approximant.is_convergent
    assert convergents(f.continued_fraction)[-1] == (17_087_915, 10_781_274)

    # Eliahou 1993 (from memory): every further cycle length is
    # 301994 a + 17087915 b + 85137581 c with b >= 1 and a c = 0.
    def eliahou_form(k):
        for b in range(1, k // 17_087_915 + 1):
            for c in range(0, (k - 17_087_915 * b) // 85_137_581 + 1):
                r = k - 17_087_915 * b - 85_137_581 * c
                if r % 301_994 == 0 and (c == 0 or r == 0):
                    return True
        return False

    assert all(eliahou_form(k) for k, _ in f.next_possible)
    assert f.labels["least_length"] == "proved"


def test_2_68():
    # from memory; reported in the literature after the 2^68 verification
    f = floor(maps.get("3x+1"), 2**68)
    assert f.least_length == 114_208_327_604
    assert f.approximant is not None  # a convergent or semiconvergent of log2 3


def test_undivided_form_adds_the_odd_steps():
    # docs/design.md, section 1, convention: undivided length = divided length + odd steps
    f = floor(maps.get("3x+1-undivided"), 2**40)
    assert (f.least_length, f.odd_steps) == (17_087_915 + 10_781_274, 10_781_274)


def test_exact_endpoints_decide_small_cases():
    # Lagarias 1985 survey (the cycles of 3x+1 on both sides), from memory:
    # {1, 2} (k=2, x=1), {-1} (1, 1), {-5, -7, -10} (3, 2), the cycle through -17 (11, 7).
    m = maps.get("3x+1")
    f = floor(m, 0)
    assert (f.least_length, f.odd_steps) == (2, 1)  # 2^2 = 3 + 1: the closed end decides
    f = floor(m, 0, side="negative")
    assert (f.least_length, f.odd_steps) == (1, 1)  # 2 = 3 - 1: closed end again
    f = floor(m, 4, side="negative")
    assert (f.least_length, f.odd_steps) == (3, 2)
    for n in (5, 16):
        f = floor(m, n, side="negative")
        assert (f.least_length, f.odd_steps) == (11, 7)
    assert floor(m, 16, "negative").allows(11, 7)
    assert not floor(m, 17, "negative").allows(3, 2)


# --------------------------------------------------------------------------
# the bound against real cycles
# --------------------------------------------------------------------------

_CASES = [
    ("3x+1", "both", 300),
    ("3x+5", "both", 400),  # OEIS A226607
    ("3x+7", "both", 100),
    ("3x+13", "both", 400),  # OEIS A226607
    ("3x-1", "positive", 200),  # OEIS A226623
    ("3x-11", "positive", 200),  # OEIS A226623
    ("5x+1", "positive", 40),  # OEIS A259207
]


@pytest.mark.parametrize("name,side,to", _CASES)
def test_floor_never_excludes_a_real_cycle(name, side, to):
    # Every cycle found exactly must be of a type the floor allows, with
    # N = |minimum| - 1 (the cycle is then a "further" one).
    m = maps.get(name)
    g = functional_graph(m, to, side=side, ceiling=10**9)
    assert g.cycles
    checked = 0
    for c in g.cycles:
        s = "positive" if c.minimum > 0 else "negative"
        mu = abs(c.minimum)
        try:
            f = floor(m, mu - 1, side=s)
        except InputError:
            continue  # the bound needs a larger N here
        assert f.possible
        assert f.least_length <= c.length
        assert f.allows(c.length, c.odd_steps), (name, c)
        checked += 1
    assert checked


@pytest.mark.slow
def test_general_two_branch_maps_against_real_cycles():
    # Maps outside ax+b: the halving branch carries an offset (mixed signs),
    # or the multiplying branch is residue 0. Cycles found exactly.
    for m in (
        Map(2, [(1, -2), (3, 1)]),
        Map(2, [(1, 2), (3, -1)]),
        Map(2, [(3, 2), (1, 1)]),
        Map(2, [(5, 2), (1, -1)]),
    ):
        g = functional_graph(m, 300, side="both", ceiling=10**9)
        for c in g.cycles:
            if c.minimum == 0:
                continue
            s = "positive" if c.minimum > 0 else "negative"
            try:
                f = floor(m, abs(c.minimum) - 1, side=s)
            except InputError:
                continue
            assert f.allows(c.length, c.odd_steps), (m, c)
            assert f.least_length <= c.length
            assert f.odd_steps <= c.odd_steps
            assert f.least_length - f.odd_steps <= c.length - c.odd_steps


@pytest.mark.slow
@settings(max_examples=60, deadline=None)
@given(floor_maps())
def test_floor_equals_brute_force(case):
    # The search (Stern-Brocot descent, lattice enumeration, certified signs)
    # against a brute force of the same inequality in exact integers.
    m, n, side = case
    try:
        f = floor(m, n, side=side, next_types=6)
    except InputError:
        return
    work = m if side == "positive" else m.conjugate()
    (a0, b0), (a1, b1) = work.branches
    e = 1 if a0 == 1 else 0
    a, b_e = work.branches[e]
    b_c = work.branches[1 - e].offset
    M = n + 1
    gc, ge = Fraction(M + b_c, M), Fraction(a * M + b_e, M)
    lo_c, hi_c = min(1, gc), max(1, gc)
    lo_e, hi_e = min(Fraction(a), ge), max(Fraction(a), ge)

    def ok(k, x):  # x = multiplying steps
        left, right = lo_c ** (k - x) * lo_e**x, hi_c ** (k - x) * hi_e**x
        strict_l = (b_c > 0 and k > x) or b_e > 0
        strict_r = (b_c < 0 and k > x) or b_e < 0
        two = Fraction(2) ** k
        return (left < two if strict_l else left <= two) and (
            two < right if strict_r else two <= right
        )

    K = 60
    brute = [(k, x) for k in range(1, K + 1) for x in range(1, k + 1) if ok(k, x)]
    if not f.possible:
        assert brute == []
        return
    mult = f.multiplying_steps
    assert ok(f.least_length, mult)
    got = [(f.least_length, mult)] + [(k, x if e == 1 else k - x) for k, x in f.next_possible]
    limit = min(K, got[-1][0] - 1)  # the list may stop in the middle of its last length
    assert [t for t in got if t[0] <= limit] == [t for t in brute if t[0] <= limit]
    if got[0][0] > K:
        assert brute == []
    else:
        assert got[0] == brute[0]


# --------------------------------------------------------------------------
# smoke tests and bad input
# --------------------------------------------------------------------------


@pytest.mark.parametrize(
    "name,side",
    [("5x+1", "positive"), ("5x+1", "negative"), ("3x+5", "positive"), ("3x+5", "negative")],
)
def test_smoke_other_maps(name, side):
    f = floor(maps.get(name), 10**12, side=side)
    assert f.possible and f.least_length > f.odd_steps > 0
    assert f.approximant is not None
    d = f.to_dict()
    assert d["labels"]["least_length"] == "proved"
    json.dumps(d, default=str)


def test_no_cycle_left():
    # 2x+2 negative side: n -> n + 1 (odd), n/2 (even) has no negative cycle
    f = floor(Map(2, [(1, 0), (2, 2)]), 10, side="negative")
    assert not f.possible and "there is no" in f.statement


@pytest.mark.parametrize(
    "m,n,side",
    [
        (maps.get("3x+1"), -1, "positive"),
        (maps.get("3x+1"), True, "positive"),
        (maps.get("3x+1"), 5, "up"),
        (maps.get("mod3-4x"), 100, "positive"),
        (Map(2, [(3, 0), (3, 1)]), 100, "positive"),
        (Map(2, [(1, 0), (4, 0)]), 100, "positive"),
        (maps.get("3x-11"), 2, "positive"),  # needs N >= 3: 3 - 11/n must stay positive
        (Map(2, [(1, 6), (3, 1)]), 3, "positive"),  # needs N >= 6
    ],
)
def test_bad_input(m, n, side):
    with pytest.raises(InputError):
        floor(m, n, side=side)


def _run(args, capsys):
    with pytest.raises(SystemExit) as exc:
        main(args)
    out = capsys.readouterr()
    return exc.value.code, out.out, out.err


def test_cli_json(capsys):
    code, out, _ = _run(
        ["floor", "3x+1", "--verified-to", "2^40", "--side", "both", "--json"], capsys
    )
    assert code == 0
    doc = json.loads(out)
    pos, neg = doc["floors"]
    assert pos["least_length"] == 17_087_915 and pos["odd_steps"] == 10_781_274
    assert neg["side"] == "negative" and isinstance(neg["least_length"], int)
    assert doc["verified_to"] == 2**40


@pytest.mark.parametrize(
    "form", ["1099511627776", "2^40", "2**40", "1_099_511_627_776", "1.099511627776e12"]
)
def test_cli_number_forms(form, capsys):
    code, out, _ = _run(["floor", "3x+1", "--verified-to", form, "--json", "--next", "0"], capsys)
    assert code == 0
    assert json.loads(out)["floors"][0]["least_length"] == 17_087_915


@pytest.mark.parametrize(
    "args",
    [
        ["floor", "3x+1", "--verified-to", "-5"],
        ["floor", "3x+1", "--verified-to", "1.5"],
        ["floor", "3x+1", "--verified-to", "2^"],
        ["floor", "3x+1", "--verified-to", "1e999999999"],
        ["floor", "mod3-4x", "--verified-to", "100"],
        ["floor", "3x+1", "--verified-to", "100", "--next", "-1"],
        ["floor", "nosuchmap", "--verified-to", "100"],
    ],
)
def test_cli_bad_input(args, capsys):
    code, out, err = _run(args, capsys)
    assert code == 2
    assert err.startswith("error: ") and err.count("\n") == 1
    assert "Traceback" not in err


def test_cli_table(capsys):
    code, out, _ = _run(["floor", "3x+1", "--verified-to", "2^40"], capsys)
    assert code == 0
    assert "17087915" in out and "proved" in out
