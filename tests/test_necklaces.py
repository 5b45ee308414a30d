"""Closed-form necklace counts and the fixed-content generator, against outside references."""

from __future__ import annotations

import itertools
from collections import Counter

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from sympy.utilities.iterables import multiset_permutations
from sympy.utilities.iterables import necklaces as sympy_necklaces

from cyclewright.cycles.errors import InputError
from cyclewright.cycles.itinerary import composite, is_primitive, least_rotation
from cyclewright.cycles.necklaces import (
    _search,
    lyndon_count,
    lyndon_words,
    multinomial,
    necklace_count,
    necklace_numerators,
    necklaces,
    normalize_content,
    type_content,
    word_count,
)


def _sympy_binary_by_ones(k: int) -> Counter:
    # reference library: sympy.utilities.iterables.necklaces (fixed necklaces, 2 colours)
    return Counter(sum(w) for w in sympy_necklaces(k, 2))


@pytest.mark.parametrize("k", range(1, 15))
def test_binary_counts_and_generation_match_sympy_bruteforce(k):
    # reference library: sympy.utilities.iterables (brute-force enumeration), all k <= 14
    ref = _sympy_binary_by_ones(k)
    ref_words = {tuple(w) for w in sympy_necklaces(k, 2)}
    for x in range(k + 1):
        c = type_content(k, x)
        got = list(necklaces(c))
        assert len(got) == necklace_count(c) == ref[x]
        assert got == sorted(got)  # lexicographic order
        assert len(set(got)) == len(got)
        assert all(least_rotation(w) == w for w in got)
        assert {w for w in ref_words if sum(w) == x} == set(got)
        prim = [w for w in got if is_primitive(w)]
        assert lyndon_count(c) == len(prim) == len(list(lyndon_words(c)))
        assert word_count(c) == len(list(multiset_permutations([0] * (k - x) + [1] * x)))


def test_oeis_a047996_row_8():
    # OEIS A047996 (binary necklaces of length n with k ones), row n = 8 (from memory)
    assert [necklace_count(type_content(8, x)) for x in range(9)] == [1, 1, 4, 7, 10, 7, 4, 1, 1]


def test_oeis_a051168_row_8():
    # OEIS A051168 (binary Lyndon words of length n with k ones), row n = 8 (from memory)
    assert [lyndon_count(type_content(8, x)) for x in range(9)] == [0, 1, 3, 7, 8, 7, 3, 1, 0]


def test_row_sums_oeis_a000031_and_a001037():
    # OEIS A000031 (binary necklaces) and A001037 (binary Lyndon words), n = 1..14 (from memory)
    a000031 = [2, 3, 4, 6, 8, 14, 20, 36, 60, 108, 188, 352, 632, 1182]
    a001037 = [2, 1, 2, 3, 6, 9, 18, 30, 56, 99, 186, 335, 630, 1161]
    for n in range(1, 15):
        assert sum(necklace_count(type_content(n, x)) for x in range(n + 1)) == a000031[n - 1]
        assert sum(lyndon_count(type_content(n, x)) for x in range(n + 1)) == a001037[n - 1]


@pytest.mark.parametrize("d", [3, 4])
def test_general_content_matches_multiset_bruteforce(d):
    # reference library: sympy multiset_permutations, deduplicated by least rotation
    kmax = 8 if d == 3 else 6
    for k in range(1, kmax + 1):
        for c in itertools.product(range(k + 1), repeat=d):
            if sum(c) != k:
                continue
            letters = [r for r in range(d) for _ in range(c[r])]
            ref = {least_rotation(tuple(w)) for w in multiset_permutations(letters)}
            got = list(necklaces(c))
            assert got == sorted(ref)
            assert necklace_count(c) == len(ref)
            assert lyndon_count(c) == sum(is_primitive(w) for w in ref)
            assert multinomial(c) == len(list(multiset_permutations(letters)))


@settings(max_examples=60, deadline=None)
@given(st.lists(st.integers(0, 4), min_size=2, max_size=4).filter(lambda c: 0 < sum(c) <= 11))
def test_generator_count_equals_formula(content):
    # Burnside's lemma (closed form) against the generator, random contents
    c = tuple(content)
    words = list(necklaces(c))
    assert len(words) == necklace_count(c)
    assert all(least_rotation(w) == w for w in words)
    assert all(Counter(w) == Counter({r: n for r, n in enumerate(c) if n}) for w in words)


MAP_BRANCHES = {
    "3x+1": (2, [(1, 0), (3, 1)]),
    "5x-1": (2, [(1, 0), (5, -1)]),
    "undivided 3x+1": (2, [(1, 0), (6, 2)]),
    "mod3-4x": (3, [(1, 0), (4, -1), (4, 1)]),
}


@pytest.mark.parametrize("name", sorted(MAP_BRANCHES))
def test_incremental_numerators_equal_composite(name):
    # docs/design.md, sections 2-3: the recursion (Böhm and Sontacchi 1978): B carried along the
    # search tree equals the composite computed from scratch for every word
    d, br = MAP_BRANCHES[name]
    contents = [type_content(9, 4), type_content(12, 7)] if d == 2 else [(2, 2, 2), (3, 1, 2)]
    for c in contents:
        seen = 0
        for w, B, p in necklace_numerators(br, d, c):
            assert composite(br, d, w)[1] == B
            assert w[:p] * (len(w) // p) == w
            seen += 1
        assert seen == necklace_count(c)


def test_search_tree_size_is_modest():
    # structural, not timed: nodes visited per necklace on 3x+1 critical types
    stats: dict = {}
    n = sum(1 for _ in _search(type_content(21, 13), [(1, 0), (3, 1)], 2, stats))
    assert n == necklace_count(type_content(21, 13))
    assert stats["nodes"] <= 12 * n


@pytest.mark.slow
def test_long_word_with_one_odd_step():
    # one necklace of length 5000: the search keeps O(k) state (no table of powers)
    (w,) = list(necklaces(type_content(5000, 1)))
    assert w[-1] == 1 and sum(w) == 1


@pytest.mark.parametrize(
    "bad",
    [lambda: type_content(0, 0), lambda: type_content(5, 6), lambda: type_content(5, -1)],
)
def test_bad_types(bad):
    with pytest.raises(InputError):
        bad()


def test_bad_contents():
    with pytest.raises(InputError):
        normalize_content([1, 2], 3)
    with pytest.raises(InputError):
        normalize_content([0, 0], 2)
    with pytest.raises(InputError):
        normalize_content({5: 1}, 3)
    with pytest.raises(InputError):
        normalize_content([1, -1, 2], 3)
    assert normalize_content({2: 1}, 3) == (0, 0, 1)
