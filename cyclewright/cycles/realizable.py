"""Which itineraries can occur: realizable necklaces, followed words and their growth rate.

When every multiplier ``a_r`` is prime to ``d``, every word of length ``k``
is followed by exactly one class of integers modulo ``d^k``, and every
necklace with ``D = d^k - A != 0`` is the itinerary of its rational cycle.
When a multiplier shares a factor with ``d`` some residue sequences never
occur (for ``n/2, 3n+1`` an odd step is always followed by an even one), so
the closed-form counts of :mod:`cyclewright.cycles.necklaces` over-count.
This module counts only what can occur (docs/design.md, section 3):

- a word is **followed** when some integer's first ``k`` steps visit its
  residues (:func:`following_class`; equivalently some rational with
  denominator prime to ``d``, since the followers form a class ``s mod N``);
- a necklace is **realizable** when its rational cycle exists (``D != 0``),
  has denominators prime to ``d`` and the map really follows the necklace
  from it -- the rational cycles of the type in the ``d``-adic integers.
  Every integer cycle's itinerary is a realizable necklace.

Inside
------
- :func:`followed_word_count` -- the words of a content followed by some
  integer, by a depth-first walk over the classes of starts (exact).
- :func:`realizable_necklace_counts` -- realizable necklaces and primitive
  necklaces of a content, by walking every necklace with its carried
  numerator (exact; refused above a limit).
- :func:`realizable_rho` -- the growth rate of realizable necklaces along
  the critical line of a map ``n/2, (a n + b)/2``: proved in closed form
  where the structure allows, otherwise None with the reason.

References
----------
.. [1] K. R. Matthews and A. M. Watts, "A generalization of Hasse's
   generalization of the Syracuse algorithm", Acta Arithmetica 43 (1984)
   167-175, and "A Markov approach to the generalized Syracuse algorithm",
   Acta Arithmetica 45 (1985) 29-42 (residue classes followed by a word;
   bibliographic details from memory).
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from fractions import Fraction

from cyclewright.maps import Map, as_map

from .necklaces import _search, lyndon_count, necklace_count, normalize_content, word_count

__all__ = [
    "followed_word_count",
    "realizable_necklace_counts",
    "RealizableCounts",
    "realizable_rho",
    "necklace_realized",
]

DEFAULT_REALIZABLE_LIMIT = 10**6
"""Walk at most this many necklaces (or followed word prefixes) by default."""


def _content_of(m: Map, content) -> tuple[int, ...]:
    return normalize_content(content, m.divisor)


def followed_word_count(
    m: Map | str,
    content: Sequence[int] | Mapping[int, int],
    limit: int = DEFAULT_REALIZABLE_LIMIT,
) -> int | None:
    """How many words with the content are followed by some integer (exact), or None above ``limit``.

    The starts following a prefix form a class, and the values after the
    prefix an arithmetic progression ``c + M t``; a letter ``r`` keeps the
    ``t`` with ``c + M t ≡ r (mod d)`` (none when ``gcd(M, d)`` does not
    divide ``r - c``), and the branch maps the progression to
    ``(a_r c' + b_r)/d + (|a_r| M / g) t``. A depth-first walk over the
    prefixes counts the followed words; every multiplier prime to ``d``
    gives the multinomial coefficient.

    Parameters
    ----------
    m : Map or str
    content : sequence of int or mapping residue -> count
    limit : int
        Give up (None) after visiting this many prefixes.

    Returns
    -------
    int or None
        Exact.

    Examples
    --------
    >>> followed_word_count("3x+1", (2, 2))                 # every word: C(4, 2)
    6
    >>> followed_word_count("3x+1-undivided", (2, 2))       # 1010, 1001, 0101: no 11
    3

    References
    ----------
    Matthews and Watts 1984, 1985 (module docstring).
    """
    m = as_map(m)
    c = _content_of(m, content)
    if m.multipliers_prime_to_divisor():
        return word_count(c)
    d = m.divisor
    branches = [tuple(br) for br in m.branches]
    left = list(c)
    k = sum(c)
    visited = total = 0
    # Depth-first walk; a frame is (value offset c, modulus M, next residue to try).
    frames: list[list[int]] = [[0, 1, 0]]
    while frames:
        frame = frames[-1]
        cval, M, r = frame
        if len(frames) - 1 == k:
            total += 1
            frames.pop()
            if frames:
                left[frames[-1][2] - 1] += 1
            continue
        g = math.gcd(M, d)
        while r < d and (not left[r] or (r - cval) % g):
            r += 1
        if r == d:
            frames.pop()
            if frames:
                left[frames[-1][2] - 1] += 1
            continue
        frame[2] = r + 1
        visited += 1
        if visited > limit:
            return None
        dg = d // g
        t0 = ((r - cval) // g * pow(M // g, -1, dg)) % dg if dg > 1 else 0
        c1 = cval + M * t0
        a, b = branches[r]
        left[r] -= 1
        frames.append([(a * c1 + b) // d, abs(a) * M // g, 0])
    return total


def necklace_realized(m: Map | str, word: Sequence[int]) -> bool:
    """Whether the rational cycle of ``word`` exists and the map follows ``word`` from it.

    ``D = d^k - A != 0``, the fixed point ``B / D`` and each element after it
    have denominators prime to ``d``, and each element has the residue the
    word names. Always true (for ``D != 0``) when every multiplier is prime
    to ``d``.

    Examples
    --------
    >>> necklace_realized("3x+1-undivided", (1, 0)), necklace_realized("3x+1-undivided", (1, 1))
    (True, False)
    """
    m = as_map(m)
    d = m.divisor
    word = tuple(word)
    A, B = 1, 0
    for i, r in enumerate(word):
        a, b = m.branches[r]
        A, B = A * a, a * B + b * d**i
    D = d ** len(word) - A
    if D == 0:
        return False
    x = Fraction(B, D)
    for r in word:
        if math.gcd(x.denominator, d) != 1:
            return False
        if (x.numerator * pow(x.denominator, -1, d)) % d != r:
            return False
        a, b = m.branches[r]
        x = (a * x + b) / d
    return True


@dataclass(frozen=True)
class RealizableCounts:
    """Realizable necklaces of one content (exact).

    Attributes
    ----------
    necklaces : int
        Necklaces whose rational cycle is realized (powers included: a power
        ``u^j`` is realized exactly when ``u`` is).
    primitive_necklaces : int
        Those of period ``k`` (realizable Lyndon words): the rational cycles
        of length exactly ``k``.
    all_necklaces, all_primitive_necklaces : int
        The closed-form counts of every necklace, for comparison.
    """

    necklaces: int
    primitive_necklaces: int
    all_necklaces: int
    all_primitive_necklaces: int


def realizable_necklace_counts(
    m: Map | str,
    content: Sequence[int] | Mapping[int, int],
    limit: int = DEFAULT_REALIZABLE_LIMIT,
) -> RealizableCounts | None:
    """Realizable necklaces and primitive necklaces with the content; None above ``limit`` necklaces.

    Multipliers prime to ``d``: every necklace with ``D != 0`` (the closed
    forms, no walk; the rational cycle is the fixed point of a ``d``-adic
    contraction onto the class that follows the word). Otherwise every
    necklace is walked with its carried numerator ``B`` and tested by
    :func:`necklace_realized` (exact).

    Parameters
    ----------
    m : Map or str
    content : sequence of int or mapping residue -> count
    limit : int
        Refuse (None) when the content has more necklaces.

    Returns
    -------
    RealizableCounts or None

    Examples
    --------
    >>> r = realizable_necklace_counts("3x+1-undivided", (6, 3))   # k = 9, x = 3, no 11 cyclically
    >>> r.necklaces, r.all_necklaces
    (4, 10)

    References
    ----------
    Böhm and Sontacchi 1978 (the rational cycle of a word); Matthews and
    Watts 1985 (module docstring).
    """
    m = as_map(m)
    c = _content_of(m, content)
    d = m.divisor
    k = sum(c)
    A = 1
    for a, cr in zip(m.multipliers, c):
        A *= a**cr
    neck, prim = necklace_count(c), lyndon_count(c)
    if d**k == A:
        return RealizableCounts(0, 0, neck, prim)
    if m.multipliers_prime_to_divisor():
        return RealizableCounts(neck, prim, neck, prim)
    if neck > limit:
        return None
    real = real_prim = 0
    roots: dict[tuple[int, ...], bool] = {}
    for arr, p, _B in _search(c, list(m.branches), d):
        root = tuple(arr[1 : p + 1])
        ok = roots.get(root)
        if ok is None:
            ok = roots[root] = necklace_realized(m, root)
        if ok:
            real += 1
            if p == k:
                real_prim += 1
    return RealizableCounts(real, real_prim, neck, prim)


def realizable_rho(m: Map | str) -> tuple[float | None, str | None, str]:
    """Growth rate per odd step of the realizable necklaces along the critical line.

    For maps ``n/2`` on even ``n`` and ``(a n + b)/2`` on odd ``n``:

    - ``a`` odd: every necklace with ``D != 0`` is realizable; the rate is
      ``ρ = t^t / (t-1)^(t-1)``, ``t = log_2 a``.
    - ``a = 2 a'`` with ``a'`` odd and ``b/2`` odd: after an odd step
      ``a' n + b/2`` is even, so the realizable necklaces of type ``(k, x)``
      are those where every 1 is followed by 0, and replacing each ``10`` by
      ``1`` maps them one to one onto the necklaces of type ``(k - x, x)`` of
      the map ``n/2, (a' n + b/2)/2`` (multiplier prime to 2); the critical
      line ``2^k ≈ a^x`` is its critical line ``2^(k-x) ≈ a'^x``, so the rate
      is the ``ρ`` of ``t = log_2 |a'|`` (None when ``|a'| < 3``).
    - ``a = 2 a'``, ``a'`` odd, ``b/2`` even: an odd step is followed by odd
      steps only, so no necklace of a type with ``0 < x < k`` is realizable
      (None: there is nothing to grow).
    - ``4 | a``: the next ``v_2(a)`` letters after a 1 are forced; not
      computed (None; ``ρ`` of every itinerary is then only an upper bound).

    Parameters
    ----------
    m : Map or str
        The map, or its name, alias or ``ax+b`` shorthand.

    Returns
    -------
    (float or None, str or None, str)
        The rate (a float, ``rounded``), its exact form (``exact``) and what
        it counts or why there is none.

    Examples
    --------
    >>> r, exact, note = realizable_rho("3x+1-undivided")
    >>> round(r, 6), exact
    (2.839514, 't^t / (t-1)^(t-1), t = log_2 3')
    >>> note
    'every 1 is followed by 0: as for the map n/2, (3n+1)/2'

    References
    ----------
    The Stirling estimate of binomial coefficients along the line (common
    practice); the one-to-one correspondence is proved above.
    """
    m = as_map(m)
    if m.divisor != 2 or tuple(m.branches[0]) != (1, 0):
        return None, None, "defined for maps n/2, (a n + b)/2 only"
    a, b = m.branches[1]
    if a % 2:
        if a <= 2:
            return None, None, "the multiplier is below 3: no critical line"
        return _rho(a), f"t^t / (t-1)^(t-1), t = log_2 {a}", "every itinerary is realizable"
    v = (a & -a).bit_length() - 1
    if v >= 2:
        return (
            None,
            None,
            f"not computed: 2^{v} divides {a}, so the {v} letters after each odd step are forced",
        )
    a1, b1 = a // 2, b // 2
    if b1 % 2 == 0:
        return (
            None,
            None,
            "an odd step is always followed by another odd step: no necklace with 0 < x < k "
            "is realizable",
        )
    if abs(a1) < 3:
        return None, None, "the reduced multiplier is below 3: no critical line"
    sign = "+" if b1 >= 0 else "-"
    return (
        _rho(abs(a1)),
        f"t^t / (t-1)^(t-1), t = log_2 {abs(a1)}",
        f"every 1 is followed by 0: as for the map n/2, ({a1}n{sign}{abs(b1)})/2",
    )


def _rho(a: int) -> float:
    t = math.log2(a)
    p = 1 / t
    H = -p * math.log2(p) - (1 - p) * math.log2(1 - p)
    return 2 ** (t * H)
