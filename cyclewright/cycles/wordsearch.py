"""Integer cycles found from itineraries alone: a meet-in-the-middle search over words.

Inside
------
- :func:`integral_cycles_by_itinerary` -- every integer cycle of length at most
  ``K`` (both signs), found without iterating the map on any start: a word
  ``w`` of length ``k`` has an integral fixed point exactly when the
  denominator ``D = d^k - A_w`` divides ``B_w``. Each word is split as
  ``w = u v`` with ``|u| = floor(k/2)``; the composite of ``w`` is
  ``A_w = A_u A_v`` and ``B_w = A_v B_u + d^|u| B_v``, so for every pair of
  multiplier products ``(A_u, A_v) = (alpha, beta)`` the condition reads

      beta * B_u  ≡  -d^|u| * B_v   (mod |d^k - alpha beta|),

  a join between two tables of about ``d^(k/2)`` words each instead of a
  scan of ``d^k`` words.
- :func:`words_table` -- the composites ``(A, B)`` of all words of one length.

This is the census' *itinerary method* (method 2): it is independent of the
bound on cycle minima and of the integer scan, works for maps whose offsets
have mixed signs, and cross-checks the bound-and-scan method. Every cycle it
returns is verified by exact iteration (:func:`cyclewright.cycles.solver.solve`), so
itineraries that are not realized (possible when a multiplier shares a factor
with ``d``) are dropped.

Degenerate words with ``d^k = A_w`` have no fixed point unless ``B_w = 0``, in
which case every point following them is fixed; such maps are reported
through :class:`DegenerateMap` rather than listed -- unless no integer
follows the word at all (:func:`following_class`, decided exactly; possible
when a multiplier shares a factor with ``d``), when the word is skipped.

References
----------
.. [1] C. Böhm and G. Sontacchi, Atti Accad. Naz. Lincei 64 (1978) 260-264
   (fixed point of a word).
.. [2] E. Horowitz and S. Sahni, "Computing partitions with applications to the
   knapsack problem", J. ACM 21 (1974) 277-292 (meet in the middle).
"""

from __future__ import annotations

from collections import defaultdict
from dataclasses import dataclass

import numpy as np

from cyclewright.maps import Map, as_map

from .errors import InputError
from .integer_cycle import IntegerCycle, cycle_from_element
from .itinerary import primitive_root
from .limits import MAX_ITINERARY_WORK, limits_lifted, short_int
from .solver import cycle_representative, solve

__all__ = [
    "integral_cycles_by_itinerary",
    "itinerary_work",
    "words_table",
    "following_class",
    "DegenerateMap",
    "WordSearchResult",
]

_INT64_SAFE = 2**62


class DegenerateMap(InputError):
    """A word with ``d^k = A`` and ``B = 0``: every point following it is fixed (infinitely many cycles)."""


def words_table(m: Map | str, length: int) -> tuple[list[int], list[int]]:
    """Composites of all ``d^length`` words, in lexicographic order of the words.

    Returns two lists ``A, B`` indexed by the word read as a base-``d``
    number (first letter most significant).

    Examples
    --------
    >>> from cyclewright import maps
    >>> words_table(maps.get("3x+1"), 2)   # words 00, 01, 10, 11
    ([1, 3, 3, 9], [0, 2, 1, 5])
    """
    m = as_map(m)
    d = m.divisor
    A, B = [1], [0]
    dt = 1
    for _ in range(length):
        nA, nB = [], []
        for a0, b0 in zip(A, B):
            for a, b in m.branches:
                nA.append(a * a0)
                nB.append(a * b0 + b * dt)
        A, B = nA, nB
        dt *= d
    return A, B


def following_class(m: Map | str, word) -> tuple[int, int] | None:
    """The integers whose first ``len(word)`` steps follow ``word``: a class ``s mod N``, or None.

    With every multiplier prime to ``d`` every word is followed by the class
    of ``d^k`` integers; when a multiplier shares a factor with ``d`` some
    words are followed by no integer at all. Decided exactly: the current
    value is an affine function ``alpha x + beta`` of the start on the class
    found so far, and each letter adds one linear congruence in the class's
    parameter.

    Parameters
    ----------
    m : Map or str
    word : sequence of int
        Residues.

    Returns
    -------
    (s, N) or None
        ``0 <= s < N``; None when no integer follows the word.

    Examples
    --------
    >>> from cyclewright.maps import Map
    >>> m = Map(3, [(-3, 12), (5, 13), (2, 11)])
    >>> following_class(m, (0, 0)) is None     # T(n) = 4 - n on residue 0 lands in residue 1
    True
    >>> following_class(m, (0, 1))
    (0, 3)
    >>> following_class("3x+1", (1, 0))        # n = 1 mod 4: (3n+1)/2 is even
    (1, 4)
    >>> following_class("3x+1-undivided", (1, 1)) is None   # 3n+1 is even for odd n
    True

    References
    ----------
    Matthews and Watts 1985 (residue classes followed by a word; from memory).
    """
    from fractions import Fraction
    from math import gcd

    m = as_map(m)
    d = m.divisor
    s, N = 0, 1
    alpha, beta = Fraction(1), Fraction(0)
    for r in word:
        c0 = alpha * s + beta
        c1 = alpha * N
        if c0.denominator != 1 or c1.denominator != 1:  # pragma: no cover - kept integral
            raise AssertionError("the affine value left the integers")
        c0, c1 = int(c0), int(c1)
        g = gcd(c1, d)
        if (r - c0) % g:
            return None
        dg = d // g
        t0 = ((r - c0) // g * pow(c1 // g, -1, dg)) % dg if dg > 1 else 0
        s, N = s + N * t0, N * dg
        a, b = m.branches[r]
        alpha, beta = alpha * a / d, (beta * a + b) / d
    return s % N, N


def _decode(index: int, length: int, d: int) -> tuple[int, ...]:
    word = []
    for _ in range(length):
        index, r = divmod(index, d)
        word.append(r)
    return tuple(reversed(word))


def _mulmod(x: np.ndarray, y: int, modulus: int) -> np.ndarray:
    """``x * y mod modulus`` elementwise, for ``0 <= x < modulus < 2^50`` (int64 arrays).

    The quotient is estimated in floating point (error below 1 when the
    modulus is under 2^50) and the remainder corrected in wrapping 64-bit
    arithmetic, where it is exact modulo 2^64 and lies in (-2M, 2M).
    """
    y %= modulus
    if modulus * max(y, 1) < _INT64_SAFE:
        return (x * y) % modulus
    xu = x.astype(np.uint64)
    q = np.floor(x.astype(np.float64) * float(y) / float(modulus)).astype(np.uint64)
    with np.errstate(over="ignore"):
        r = (xu * np.uint64(y) - q * np.uint64(modulus)).astype(np.int64)
    r = np.where(r < 0, r + modulus, r)
    r = np.where(r >= modulus, r - modulus, r)
    return r


@dataclass(frozen=True)
class WordSearchResult:
    """Integer cycles of length at most ``max_length`` found by the itinerary method.

    ``cycles`` are verified :class:`~cyclewright.cycles.integer_cycle.IntegerCycle`
    records, one per cycle, sorted by (sign, |minimum|). ``words_examined`` counts the half-words joined (for reports).
    """

    map: Map
    max_length: int
    cycles: tuple[IntegerCycle, ...]
    words_examined: int
    method: str = (
        "itineraries (meet in the middle over words; each hit verified by exact iteration)"
    )

    def minima(self, side: str = "both") -> tuple[int, ...]:
        vals = [int(c.minimum) for c in self.cycles]
        if side == "positive":
            vals = [v for v in vals if v > 0]
        elif side == "negative":
            vals = [v for v in vals if v < 0]
        elif side == "zero":
            vals = [v for v in vals if v == 0]
        return tuple(sorted(vals, key=lambda v: (v < 0, abs(v))))


def itinerary_work(m: Map | str, max_length: int, stop_above: int | None = None) -> int:
    """Half-words the itinerary method joins up to ``max_length`` (for feasibility checks).

    For each length ``k`` the join pairs every product class of the prefixes
    (length ``floor(k/2)``) with every class of the suffixes, so the work is
    ``sum_k (classes_j * d^i + classes_i * d^j)``. With ``stop_above`` the sum stops
    as soon as it exceeds ``stop_above`` (the answer is then some value above it),
    so the estimate itself costs little for any length.

    >>> from cyclewright import maps
    >>> itinerary_work(maps.get("3x+1"), 4)
    50
    >>> itinerary_work(maps.get("3x+1"), 10**9, stop_above=10**8) > 10**8
    True
    """
    m = as_map(m)
    d = m.divisor
    classes = [1]
    products = {1}
    total = 0
    for k in range(1, max_length + 1):
        i, j = k // 2, k - k // 2
        while len(classes) <= j:
            products = {p * a for p in products for a in m.multipliers}
            classes.append(len(products))
        total += classes[j] * d**i + classes[i] * d**j
        if stop_above is not None and total > stop_above:
            break
    return total


def integral_cycles_by_itinerary(m: Map | str, max_length: int) -> WordSearchResult:
    """Every integer cycle of ``m`` with length at most ``max_length``, from itineraries.

    Parameters
    ----------
    m : Map
    max_length : int
        ``K >= 1``. The work grows like ``d^(K/2)`` half-words per length.

    Returns
    -------
    WordSearchResult

    Raises
    ------
    DegenerateMap
        When a word with ``d^k = A`` and ``B = 0`` exists (infinitely many
        fixed points follow it).
    InputError
        When the estimated work (:func:`itinerary_work`) passes
        :data:`~cyclewright.cycles.limits.MAX_ITINERARY_WORK` (not checked
        inside :func:`~cyclewright.cycles.limits.lift_limits`).

    Examples
    --------
    >>> from cyclewright import maps
    >>> integral_cycles_by_itinerary(maps.get("3x+1"), 12).minima()
    (0, 1, -1, -5, -17)
    >>> integral_cycles_by_itinerary(maps.get("3x+5"), 10).minima("positive")
    (1, 5, 19, 23)

    References
    ----------
    Böhm and Sontacchi 1978 (the fixed point of a word); Horowitz and Sahni
    1974 (meet in the middle). See the module docstring.
    """
    m = as_map(m)
    if isinstance(max_length, bool) or not isinstance(max_length, int):
        raise InputError(f"the maximal length must be an integer, got {max_length!r}")
    if max_length < 1:
        raise InputError(f"the maximal length must be at least 1, got {max_length}")
    if not limits_lifted():
        work = itinerary_work(m, max_length, stop_above=MAX_ITINERARY_WORK)
        if work > MAX_ITINERARY_WORK:
            raise InputError(
                f"{m.label}: the itineraries up to length {short_int(max_length)} need more than "
                f"{MAX_ITINERARY_WORK:.0e} half-words joined (the limit); lower the length"
            )
    d = m.divisor
    half = (max_length + 1) // 2
    tables = [words_table(m, t) for t in range(half + 1)]
    # group word indices of each length by their multiplier product A
    groups: list[dict[int, list[int]]] = []
    for A, _ in tables:
        g: dict[int, list[int]] = defaultdict(list)
        for idx, a in enumerate(A):
            g[a].append(idx)
        groups.append(g)
    np_B = []
    for _, B in tables:
        big = max((abs(b) for b in B), default=0) >= 2**62
        np_B.append(None if big else np.array(B, dtype=np.int64))

    found: dict[tuple, IntegerCycle] = {}
    examined = 0
    for k in range(1, max_length + 1):
        i, j = k // 2, k - k // 2
        dk = d**k
        di = d**i
        Bu_all, Bv_all = tables[i][1], tables[j][1]
        for alpha, u_idx in groups[i].items():
            for beta, v_idx in groups[j].items():
                D = dk - alpha * beta
                examined += len(u_idx) + len(v_idx)
                if D == 0:
                    for ui in u_idx:
                        for vi in v_idx:
                            if beta * Bu_all[ui] + di * Bv_all[vi] == 0:
                                word = _decode(ui, i, d) + _decode(vi, j, d)
                                if following_class(m, word) is None:
                                    continue  # no integer follows this itinerary: no cycle
                                raise DegenerateMap(
                                    f"{m.label}: the itinerary {_decode(ui, i, d) + _decode(vi, j, d)} has "
                                    f"d^k = A and B = 0, so every point following it is fixed"
                                )
                    continue
                M = abs(D)
                for ui, vi in _join(u_idx, v_idx, Bu_all, Bv_all, np_B[i], np_B[j], beta, di, M):
                    word = _decode(ui, i, d) + _decode(vi, j, d)
                    _record(m, word, found)
    cycles = sorted(found.values(), key=lambda c: (c.minimum < 0, abs(c.minimum)))
    return WordSearchResult(m, max_length, tuple(cycles), examined)


def _join(u_idx, v_idx, Bu_all, Bv_all, npBu, npBv, beta, di, M):
    """Pairs (u, v) with beta*B_u + d^i*B_v ≡ 0 (mod M)."""
    if M == 1:
        for ui in u_idx:
            for vi in v_idx:
                yield ui, vi
        return
    if M < 2**50 and npBu is not None and npBv is not None:
        bu = npBu[np.asarray(u_idx, dtype=np.int64)] % M
        bv = npBv[np.asarray(v_idx, dtype=np.int64)] % M
        ku = _mulmod(bu, beta, M)
        kv = (-_mulmod(bv, di, M)) % M
        order = np.argsort(kv, kind="stable")
        skv = kv[order]
        lo = np.searchsorted(skv, ku, side="left")
        hi = np.searchsorted(skv, ku, side="right")
        hits = np.nonzero(hi > lo)[0]
        for h in hits:
            for pos in range(lo[h], hi[h]):
                yield u_idx[h], v_idx[order[pos]]
        return
    table: dict[int, list[int]] = defaultdict(list)
    for vi in v_idx:
        table[(-di * Bv_all[vi]) % M].append(vi)
    for ui in u_idx:
        for vi in table.get((beta * Bu_all[ui]) % M, ()):
            yield ui, vi


def _record(m: Map, word: tuple[int, ...], found: dict) -> None:
    root = primitive_root(word)
    c = solve(m, root)
    if not c.integral:
        return  # an integral fixed point whose itinerary the map does not follow
    elems = [int(e) for e in c.elements]
    key = tuple(sorted(elems))
    if key in found:
        return
    found[key] = cycle_from_element(m, cycle_representative(elems), len(elems))
