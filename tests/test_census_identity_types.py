"""Types with ``d^k = A`` (``D = 0``) in the census: decided exactly, never skipped blindly.

docs/census.md, "Types with d^k = A": a word of such a type carries a cycle
only when ``B = 0``, and then some integer following it means infinitely
many cycles (the census refuses); otherwise the type carries none. Checked
against a brute force over every word (independent of the census code) and,
for the refusals, by iterating members of the class the message names.
"""

from __future__ import annotations

import re

import pytest
from brute import brute_force_cycles

from cyclewright.cycles.census import census
from cyclewright.cycles.errors import InputError
from cyclewright.cycles.wordsearch import following_class
from cyclewright.maps import Map


def _brute_force(m: Map, K: int) -> dict[int, int]:
    """Minimum -> length of every integer cycle of length <= K, trying every word.

    common practice, no source (tests/brute.py): for d^p != A the only candidate is
    B/(d^p - A); a word with d^p = A and B = 0 that some start below d^p follows would
    make the answer infinite, and is asserted absent.
    """
    return brute_force_cycles(m, K, check_identity=True)


FINITE = [
    # (-3n+12)/3 = 4 - n on residue 0 lands in residue 1: (0, 0) has B = 0, no integer follows
    (Map(3, [(-3, 12), (5, 13), (2, 11)]), 9),
    # n + 1 on even n: the word 0 has A = 2 = d and B = 2 != 0
    (Map(2, [(2, 2), (3, 1)]), 10),
    # 3n on residue 0 stays on residue 0: the words 01, 10, 02, 20 (A = 9) are followed by nothing
    (Map(3, [(9, 0), (1, 2), (1, 1)]), 7),
]


@pytest.mark.parametrize("m, K", FINITE, ids=["divisor3-neg", "n+1-on-even", "3n-on-0"])
@pytest.mark.parametrize("method", ["necklaces", "itineraries"])
def test_identity_types_without_cycles_are_skipped_exactly(m, K, method):
    # common practice, no source: brute force over every word (see _brute_force)
    got = census(m, K, method=method, side="both", store=False, workers=1)
    assert {c.minimum: c.length for c in got.cycles} == _brute_force(m, K)


INFINITE = [
    # every even integer is fixed: n -> 2n/2
    Map(2, [(2, 0), (3, 1)]),
    # n -> -n on residue 0 (d = 3): {n, -n} is a cycle for every multiple of 3
    Map(3, [(-3, 0), (1, 2), (1, 1)]),
    # n -> -n on even n (d = 2): the square of the word 0 has A = 4 = d^2 and B = 0
    Map(2, [(-2, 0), (3, 1)]),
]


@pytest.mark.parametrize("m", INFINITE, ids=["2n/2", "-n mod 3", "-n mod 2"])
@pytest.mark.parametrize("method", ["necklaces", "itineraries"])
def test_identity_types_with_cycles_are_refused(m, method):
    with pytest.raises(InputError, match="d\\^k = A and B = 0") as info:
        census(m, 6, method=method, side="both", store=False, workers=1)
    if method == "necklaces":
        # common practice, no source: members of the class named are periodic (iterate them)
        s, N, k = (
            int(v)
            for v in re.search(
                r"integers (-?\d+) mod (\d+) follow.*most (\d+)", str(info.value)
            ).groups()
        )
        for n in (s, s + N, s + 7 * N, s - 11 * N):
            v = n
            for _ in range(k):
                v = m.step(v)
            assert v == n


def test_the_class_is_what_following_class_says():
    # common practice, no source: the residues below d^2 whose first two steps follow (0, 0)
    m = Map(3, [(-3, 0), (1, 2), (1, 1)])
    s, N = following_class(m, (0, 0))
    brute = {n for n in range(9) if n % 3 == 0 and m.step(n) % 3 == 0}
    assert brute == {n for n in range(9) if n % N == s}


def _random_divisor3_maps(count: int, seed: int) -> list[Map]:
    """Valid divisor-3 maps with a multiplier ±3 or ±9 (the maps that meet d^k = A types)."""
    import random

    rng = random.Random(seed)
    out = []
    while len(out) < count:
        mults = [rng.choice([-9, -3, 3, 9])] + [
            rng.choice([-7, -5, -4, -2, -1, 1, 2, 4, 5, 7]) for _ in range(2)
        ]
        rng.shuffle(mults)
        branches = []
        for r, a in enumerate(mults):
            b = -a * r + 3 * rng.randint(-4, 4)  # a r + b ≡ 0 (mod 3)
            branches.append((a, b))
        out.append(Map(3, branches))
    return out


@pytest.mark.parametrize("m", _random_divisor3_maps(24, 10), ids=lambda m: m.key[:40])
def test_random_divisor3_maps_agree_with_brute_force(m):
    # common practice, no source: brute force over every word up to length 5; a refusal
    # must name a class whose members really are periodic (iterated here)
    K = 5
    results: dict = {}
    message = ""
    for method in ("necklaces", "itineraries"):
        try:
            c = census(m, K, method=method, side="both", store=False, workers=1)
            results[method] = {x.minimum: x.length for x in c.cycles}
        except InputError as exc:
            assert "d^k = A and B = 0" in str(exc)
            results[method] = "refused"
            message = message or str(exc)
    assert (results["necklaces"] == "refused") == (results["itineraries"] == "refused")
    if results["necklaces"] == "refused":
        s, N, k = (
            int(v)
            for v in re.search(r"integers (-?\d+) mod (\d+) follow.*most (\d+)", message).groups()
        )
        v = s + 5 * N
        for _ in range(k):
            v = m.step(v)
        assert v == s + 5 * N
    else:
        assert results["necklaces"] == results["itineraries"] == _brute_force(m, K)
