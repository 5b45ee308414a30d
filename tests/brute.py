"""Brute forces shared by the tests: every word tried, with Fractions, no program code.

common practice, no source: a word ``w`` of length ``k`` composes to
``x -> A x + B`` with ``A = prod a_r / d^k``; its only rational fixed point
(when ``A != 1``) is ``B / (1 - A)``, and it is a cycle of the map when the
map, iterated on it, visits the residues of ``w``.
"""

from __future__ import annotations

from fractions import Fraction
from itertools import product

from cyclewright.maps import Map


def word_map(m: Map, word) -> tuple[Fraction, Fraction]:
    """``(A, B)`` with ``T_w(x) = A x + B`` (Fractions)."""
    d = m.divisor
    A, B = Fraction(1), Fraction(0)
    for r in word:
        a, b = m.branches[r]
        A, B = A * Fraction(a, d), (a * B + b) / d
    return A, B


def follows(m: Map, x, word) -> bool:
    """Whether ``x`` (an integer, or a rational with denominator prime to d) follows ``word``."""
    for r in word:
        try:
            if m.residue_of(x) != r:
                return False
        except ValueError:  # a denominator sharing a factor with d
            return False
        x = m.step_rational(Fraction(x))
    return True


def brute_force_cycles(m: Map, K: int, check_identity: bool = False) -> dict[int, int]:
    """Minimum -> length of every integer cycle of length <= K (by least absolute value).

    With ``check_identity``, a word with ``A = 1`` and ``B = 0`` (every follower
    periodic) that some start below ``d^k`` follows raises AssertionError, so the
    answer is known to be finite.
    """
    d = m.divisor
    out: dict[int, int] = {}
    for k in range(1, K + 1):
        for word in product(range(d), repeat=k):
            A, B = word_map(m, word)
            if A == 1:
                if check_identity and B == 0:
                    hit = next((n for n in range(-(d**k), d**k) if follows(m, n, word)), None)
                    assert hit is None, f"{word}: {hit} follows an identity word"
                continue
            x = B / (1 - A)
            if x.denominator != 1 or not follows(m, x, word):
                continue
            orbit, v = [], int(x)
            for _ in range(k):
                orbit.append(v)
                v = m.step(v)
            period = next(p for p in range(1, k + 1) if orbit[p % k] == orbit[0])
            out[min(orbit[:period], key=lambda q: (abs(q), q))] = period
    return out
