"""The largest proved bound on a cycle minimum over every type up to a length.

Inside
------
- :class:`LargestBound`, :func:`largest_bound_up_to`, :func:`bound_for_length`
  -- the largest minimum bound over every type of length ``<= K`` (the number
  a census must scan to).

Two methods:

- *continued fraction* (maps ``n/2``, ``(a n + b)/2`` with ``a > 0`` not a
  power of 2, ``b != 0``: 3x+1, 3x+k, 5x+1, 181x+1 ...). The bound of a type
  ``(k, x)`` depends only on the ratio ``k/x`` and is monotone in it, so the
  largest bound over lengths ``<= K`` sits at the fraction with numerator
  ``<= K`` nearest to ``log2 a`` from above (growing side) or from below
  (other side): an approximant (convergent or semiconvergent) of the
  continued fraction of ``log2 a``, found by a Stern-Brocot descent in
  ``O(log K)`` steps. The integer bound is decided by interval arithmetic
  (exact rationals when ``x = 1``). Time and memory do not depend on ``K``
  (``K = 10^12`` in milliseconds). The proof is in docs/census.md.
- *prefilter* (every other map: more than two branches, a residue-0 branch
  other than ``n/2``, ``a`` a power of 2; offsets of mixed signs are
  reported as not applying): every type of every length, with a float
  prefilter that is safe by an explicit error budget and an exact
  confirmation of the winner. Its work grows with ``K``.

References
----------
.. [1] S. Eliahou, "The 3x+1 problem: new lower bounds on nontrivial cycle
   lengths", Discrete Mathematics 118 (1993) 45-56 (the product argument).
.. [2] A. Ya. Khinchin, *Continued Fractions* (1935; Dover 1997): best
   one-sided approximations are convergents or intermediate fractions.
.. [3] R. L. Graham, D. E. Knuth, O. Patashnik, *Concrete Mathematics*,
   section 4.5 (the Stern-Brocot tree: a fraction between two Farey
   neighbours has numerator and denominator at least those of their mediant).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction

from cyclewright.maps import Map, as_map

from .continued_fractions import continued_fraction_log
from .errors import InputError
from .intervals import _MAX_PREC, Interval, _iv_to_interval, _ivprec, _mpf_to_fraction
from .labels import PROVED
from .minimum_bound import MinimumBound, _bound_of_content
from .sides import DEFAULT_SIDE, PerSide, Side, on_sides, parse_side

__all__ = [
    "LargestBound",
    "largest_bound_up_to",
    "bound_for_length",
    "farey_neighbours_log",
    "continued_fraction_applies",
    "EXACT_LENGTH_LIMIT",
    "PREFILTER_MAX_LENGTHS",
]

#: Largest length of a winning type whose full :class:`MinimumBound` (with the
#: exact denominator ``2^k - a^x``) is also computed and cross-checked.
EXACT_LENGTH_LIMIT = 400_000
#: Largest ``K`` the prefilter method accepts for two-branch maps (its memory
#: grows with ``K``).
PREFILTER_MAX_LENGTHS = 10**7


# ------------------------------------------------------- largest over lengths
@dataclass(frozen=True)
class LargestBound:
    """The largest proved minimum bound over every type with length in a range.

    Attributes
    ----------
    map_label, side : str
    lengths : tuple of (int, int)
        The lengths considered, as ``(first, last)``.
    applies : bool
        False when some type in range has offsets of mixed signs (``witness``
        says which): then no finite scan covers every cycle.
    integer : int or None
        ``max M`` over the types (0 when no type allows a cycle).
    content : tuple of int or None
        A type attaining it (the shortest when several do).
    bound : MinimumBound or None
        The full bound of that type.
    types_considered : int
        Types looked at by the float prefilter.
    exact_checks : int
        Types whose integer bound was computed exactly.
    method : str
    witness : tuple or None
        A content for which the bound does not apply.
    label : str
        ``"proved"``.
    interval : Interval or None
        A certified enclosure of the real bound ``M*`` of the winning type.
    formula : str
        The winning type's bound as a formula.
    approximant : str
        Continued-fraction method: which approximant of ``log_d a`` the
        winning ratio ``k/x`` is (empty otherwise).
    """

    map_label: str
    side: str
    lengths: tuple[int, int]
    applies: bool
    integer: int | None
    content: tuple[int, ...] | None
    bound: MinimumBound | None
    types_considered: int
    exact_checks: int
    method: str
    witness: tuple[int, ...] | None = None
    label: str = PROVED.value
    interval: Interval | None = None
    formula: str = ""
    approximant: str = ""

    @property
    def length(self) -> int | None:
        return sum(self.content) if self.content else None

    @property
    def odd(self) -> int | None:
        return self.content[1] if self.content and len(self.content) == 2 else None

    def to_dict(self) -> dict:
        return {
            "map": self.map_label,
            "side": self.side,
            "lengths": list(self.lengths),
            "applies": self.applies,
            "integer": self.integer,
            "content": list(self.content) if self.content else None,
            "length": self.length,
            "bound": self.bound.to_dict() if self.bound else None,
            "types_considered": self.types_considered,
            "exact_checks": self.exact_checks,
            "method": self.method,
            "witness": list(self.witness) if self.witness else None,
            "interval": self.interval.to_dict() if self.interval else None,
            "formula": self.formula,
            "approximant": self.approximant,
            "label": self.label,
        }

    def __repr__(self) -> str:
        lo, hi = self.lengths
        span = f"k={lo}" if lo == hi else f"k={lo}..{hi}"
        if not self.applies:
            return f"LargestBound({self.map_label}, {self.side}, {span}: does not apply (content {list(self.witness or ())}))"
        return (
            f"LargestBound({self.map_label}, {self.side}, {span}: |min| <= {self.integer} "
            f"at content {list(self.content) if self.content else None} (proved))"
        )


_PREFILTER_METHOD = (
    "float prefilter: for each type an upper bound M_hi = [max|β| if shrinking] + "
    "sum c_r|β_r| / (|Λ_float| - err) on the real bound M* (from ln(1+y) <= y, or "
    "ln(1+y) >= y/(1+y)), with err = (4d+16) 2^-53 (k ln d + sum c_r ln a_r) covering "
    "every rounding in Λ_float; types are confirmed exactly in decreasing M_hi order "
    "until M_hi < best + 1, so no type whose integer bound could exceed the "
    "winner's is skipped; types with |Λ_float| <= 2 err are checked exactly"
)


def largest_bound_up_to(
    m: Map | str, K: int, side: Side = DEFAULT_SIDE, *, method: str = "auto"
) -> LargestBound | PerSide[LargestBound]:
    """The largest proved bound on a cycle minimum over all types of length ``1..K``.

    Every integer cycle on ``side`` of length ``<= K`` whose elements share
    one sign has ``|minimum| <=`` the returned ``integer``: the range a
    census must scan.

    For maps ``n/2``, ``(a n + b)/2`` (``a > 0`` not a power of 2,
    ``b != 0``) the answer is read off the continued fraction of ``log2 a``
    (method ``"continued fraction"``): the bound of a type ``(k, x)`` is a
    monotone function of ``k/x`` alone, so the best type is the fraction
    with numerator ``<= K`` next to ``log2 a`` (from above on the growing
    side, from below on the other), which is a convergent or a
    semiconvergent. Time and memory do not grow with ``K``. Every other map
    keeps the per-type prefilter, whose work grows with ``K`` (refused above
    :data:`PREFILTER_MAX_LENGTHS` lengths for two-branch maps, 5 million
    contents otherwise).

    Parameters
    ----------
    m : Map
    K : int
        Largest length, ``>= 1``.
    side : {"positive", "negative", "both"}
        ``"both"`` gives one bound per side.
    method : {"auto", "continued-fraction", "prefilter"}
        ``auto``: the continued fraction where it applies, else the
        prefilter. ``prefilter`` forces the per-type method (for checks).

    Returns
    -------
    LargestBound or PerSide of LargestBound
        For ``side="both"`` a :class:`~cyclewright.cycles.sides.PerSide`.

    Examples
    --------
    >>> from cyclewright import maps
    >>> lb = largest_bound_up_to(maps.get("3x+1"), 100)
    >>> lb.integer, lb.length, lb.odd
    (1192, 65, 41)
    >>> lb = largest_bound_up_to(maps.get("3x+1"), 10**12)
    >>> lb.length, lb.odd, lb.integer > 10**22
    (217976794617, 137528045312, True)
    >>> largest_bound_up_to(maps.get("mod3-4x"), 3).applies
    False
    >>> [b.integer for b in largest_bound_up_to("3x+1", 20, side="both")]
    [31, 295]

    Notes
    -----
    The continued-fraction argument is proved in docs/census.md
    ("Largest bound"). The prefilter's safety: see ``_PREFILTER_METHOD`` in
    the source (also in ``LargestBound.method``): the float value of ``Λ``
    is computed with an explicit error budget, ``M_hi`` is a rigorous upper
    bound of ``M*`` whenever ``|Λ_float| > err``, and a type is discarded
    only when ``M_hi < best + 1`` for a ``best`` confirmed exactly.

    References
    ----------
    Eliahou 1993 (the bound of one type); Khinchin 1935 and Graham, Knuth,
    Patashnik 1994 section 4.5 (best one-sided approximations).
    """
    m = as_map(m)
    if isinstance(K, bool) or not isinstance(K, int) or K < 1:
        raise InputError(f"the largest length K must be an integer >= 1, got {K!r}")
    parse_side(side)
    if method not in ("auto", "continued-fraction", "prefilter"):
        raise InputError(f"method must be auto, continued-fraction or prefilter, got {method!r}")
    if method == "continued-fraction" and not continued_fraction_applies(m):
        raise InputError(
            f"{m.label}: the continued-fraction method needs the form n/2, (a n + b)/2 with "
            "a > 0 not a power of 2 and b != 0"
        )
    if method != "prefilter" and continued_fraction_applies(m):
        return on_sides(side, lambda s: _largest_by_continued_fraction(m, K, s))
    if _halving_two_branch(m) and K > PREFILTER_MAX_LENGTHS:
        raise InputError(
            f"{m.label}: the largest bound over {K} lengths needs the per-length prefilter "
            f"(the multiplier is a power of 2), limited to {PREFILTER_MAX_LENGTHS} lengths"
        )
    return on_sides(side, lambda s: _largest(m, 1, K, s))


def bound_for_length(
    m: Map | str, k: int, side: Side = DEFAULT_SIDE
) -> LargestBound | PerSide[LargestBound]:
    """The largest proved minimum bound over the types of one length ``k`` (per side for ``"both"``).

    Parameters
    ----------
    m : Map or str
        The map, or its name, alias or ``ax+b`` shorthand.
    k : int
        The length, ``>= 1``.
    side : {"positive", "negative", "both"}
        ``"both"`` gives one bound per side.

    Returns
    -------
    LargestBound or PerSide of LargestBound
        The type of length ``k`` with the largest proved bound on ``|minimum|``.

    Examples
    --------
    >>> from cyclewright import maps
    >>> b = bound_for_length(maps.get("3x+1"), 13)
    >>> b.integer, b.odd
    (11, 8)

    References
    ----------
    Eliahou 1993 (the bound of one type); see the module docstring.
    """
    m = as_map(m)
    if isinstance(k, bool) or not isinstance(k, int) or k < 1:
        raise InputError(f"the length k must be an integer >= 1, got {k!r}")
    return on_sides(side, lambda s: _largest(m, k, k, s))


def _halving_two_branch(m: Map) -> bool:
    return (
        m.divisor == 2
        and tuple(m.branches[0]) == (1, 0)
        and m.branches[1].multiplier > 0
        and m.branches[1].offset != 0
    )


def continued_fraction_applies(m: Map | str) -> bool:
    """Whether :func:`largest_bound_up_to` uses the continued fraction of ``log2 a`` for ``m``.

    True for maps ``n -> n/2`` (even), ``(a n + b)/2`` (odd) with ``a > 0``
    not a power of 2 and ``b != 0``.

    >>> from cyclewright import maps
    >>> continued_fraction_applies(maps.get("3x+1")), continued_fraction_applies(maps.get("mod3-4x"))
    (True, False)
    """
    m = as_map(m)
    if not _halving_two_branch(m):
        return False
    a = m.branches[1].multiplier
    return a >= 3 and a & (a - 1) != 0


def _largest(m: Map, k_lo: int, k_hi: int, side: str) -> LargestBound:
    if _halving_two_branch(m):
        cands, considered = _candidates_halving(m, k_lo, k_hi, side)
        witness = None
    else:
        cands, considered, witness = _candidates_general(m, k_lo, k_hi, side)
    label = m.label
    if witness is not None:
        return LargestBound(
            label,
            side,
            (k_lo, k_hi),
            False,
            None,
            None,
            None,
            considered,
            0,
            _PREFILTER_METHOD,
            witness,
        )
    # cands: list of (M_hi, k, content) sorted by decreasing M_hi
    best = 0
    best_bound = None
    best_content = None
    checks = 0
    for M_hi, _k, content in cands:
        if best_bound is not None and M_hi < best + 1:
            break
        b = _bound_of_content(m, content, side, with_interval=False)
        checks += 1
        if not (b.applies and b.possible):
            continue
        if (
            best_bound is None
            or b.integer > best
            or (b.integer == best and sum(content) < sum(best_content))
        ):
            best = b.integer
            best_bound = b
            best_content = content
    if best_bound is not None:
        best_bound = _bound_of_content(m, best_content, side)  # with its certified interval
    return LargestBound(
        label,
        side,
        (k_lo, k_hi),
        True,
        best,
        best_content,
        best_bound,
        considered,
        checks,
        _PREFILTER_METHOD,
    )


_EPS = 2.0**-53


def _candidates_halving(m: Map, k_lo: int, k_hi: int, side: str):
    """d = 2, branch 0 = n/2: one best x per k (M* monotone in x). Vectorised."""
    import numpy as np

    a, b = m.branches[1]
    eps = 1 if side == "positive" else -1
    beff = eps * b
    growth = beff > 0
    ks = np.arange(k_lo, k_hi + 1, dtype=np.float64)
    if a == 1:
        xs = ks.copy() if growth else np.full_like(ks, -1.0)
    elif a == 2:
        xs = ks - 1 if growth else np.full_like(ks, -1.0)
    else:
        t = math.log2(a)
        q = ks / t
        xs = np.ceil(q) - 1 if growth else np.floor(q) + 1
        # near-integer k/t: decide a^x vs 2^k exactly
        frac = q - np.floor(q)
        tol = 1e-9 + 1e-12 * ks  # |error of q| <= k * 2^-50 with room to spare
        near = np.nonzero((frac < tol) | (frac > 1 - tol))[0]
        for i in near:
            k = int(ks[i])
            from sympy import integer_log  # imported here: sympy loads slowly

            e, exact = integer_log(2**k, a)  # e = floor(log_a 2^k), exactly
            if growth:  # largest x with a^x < 2^k
                x = int(e) - 1 if exact else int(e)
            else:  # smallest x with a^x > 2^k
                x = int(e) + 1
            xs[i] = x
        xs = np.minimum(xs, ks)
    ok = (xs >= 1) & (xs <= ks)
    ks, xs = ks[ok], xs[ok]
    ln2, lna = math.log(2.0), math.log(a)
    lam = ks * ln2 - xs * lna
    err = 24 * _EPS * (ks * ln2 + xs * lna) + 1e-300
    absb = abs(b) / a
    beta_max = absb if not growth else 0.0
    safe = np.abs(lam) > 2 * err
    with np.errstate(divide="ignore"):
        m_hi = np.where(safe, beta_max + xs * absb / (np.abs(lam) - err), np.inf)
    m_hi = m_hi * (1 + 1e-12) + 1e-9
    order = np.argsort(-m_hi, kind="stable")
    cands = [(float(m_hi[i]), int(ks[i]), (int(ks[i] - xs[i]), int(xs[i]))) for i in order]
    return cands, len(ks)


def _compositions(k: int, parts: int):
    if parts == 1:
        yield (k,)
        return
    for first in range(k + 1):
        for rest in _compositions(k - first, parts - 1):
            yield (first, *rest)


def _candidates_general(m: Map, k_lo: int, k_hi: int, side: str):
    d = m.divisor
    total = sum(math.comb(k + d - 1, d - 1) for k in range(k_lo, k_hi + 1))
    if total > 5_000_000:
        raise InputError(
            f"{total} contents of lengths {k_lo}..{k_hi} for divisor {d}: too many to prefilter; "
            "use a smaller largest length"
        )
    eps = 1 if side == "positive" else -1
    branches = tuple(m.branches)
    logs = [math.log(abs(a)) for a, _b in branches]
    lnd = math.log(d)
    cands = []
    considered = 0
    for k in range(k_lo, k_hi + 1):
        for content in _compositions(k, d):
            considered += 1
            signs = set()
            neg = False
            S = []
            for (a, b), c in zip(branches, content):
                if not c:
                    continue
                if a < 0:
                    neg = True
                if b:
                    S.append((a, eps * b, c))
                    signs.add(eps * b > 0)
            if neg or len(signs) > 1:
                return [], considered, content
            if not S:
                continue
            growth = True in signs
            lam = k * lnd - sum(c * lg for lg, c in zip(logs, content))
            err = (4 * d + 16) * _EPS * (k * lnd + sum(c * lg for lg, c in zip(logs, content)))
            if abs(lam) <= 2 * err:
                cands.append((math.inf, k, content))
                continue
            if (lam > 0) != growth:
                continue
            tot = sum(abs(b) * c / a for a, b, c in S)
            bmax = 0.0 if growth else max(abs(b) / a for a, b, c in S)
            cands.append(((bmax + tot / (abs(lam) - err)) * (1 + 1e-12) + 1e-9, k, content))
    cands.sort(key=lambda t: -t[0])
    return cands, considered, None


# ------------------------------------------------- continued-fraction method
_CF_METHOD = (
    "continued fraction: for n/2, (an+b)/2 the bound of a type (k, x) is the largest m with "
    "2^(k/x) m <= a m + b (growing side; reversed on the other), a monotone function of k/x "
    "alone; the extreme ratio with k <= K is the Farey neighbour of log2 a with numerator "
    "<= K from above (growing side) or below, an approximant on the Stern-Brocot path of "
    "log2 a (partial quotients certified by interval arithmetic); its integer bound is "
    "decided by interval arithmetic at rising precision (exact rationals when x = 1); "
    "proof in docs/census.md"
)


@dataclass(frozen=True)
class _Neighbours:
    below: tuple[int, int]  # (p, q): largest p/q < theta with p <= K ((0, 1) if none)
    above: tuple[int, int]  # (p, q): smallest p/q > theta with p <= K ((1, 0) if none)
    below_text: str
    above_text: str
    steps: int  # partial quotients used


def _describe(n: int, j: int, t: int, p2: int, p1: int) -> str:
    if j == t:
        return f"convergent p_{n}/q_{n} of [a_0; a_1, ...], a_{n} = {t}"
    return f"semiconvergent (p_{n - 2} + {j} p_{n - 1})/(q_{n - 2} + {j} q_{n - 1}), j = {j} of a_{n} = {t}"


def farey_neighbours_log(a: int, K: int, base: int = 2) -> tuple[tuple[int, int], tuple[int, int]]:
    """The fractions ``p/q`` with ``p <= K`` nearest to ``log_base a`` from below and from above.

    Found by the Stern-Brocot descent towards ``log_base a`` with whole runs
    of equal turns taken at once (one per partial quotient), stopped when the
    next mediant's numerator exceeds ``K``; both are convergents or
    semiconvergents. ``O(log K)`` certified partial quotients.

    Parameters
    ----------
    a : int
        ``> 1``, ``log_base a`` irrational.
    K : int
        Largest numerator, ``>= 1``.
    base : int

    Returns
    -------
    tuple
        ``((p, q) below, (p, q) above)``; ``(1, 0)`` above when no fraction
        with ``p <= K`` lies above.

    Examples
    --------
    >>> farey_neighbours_log(3, 100000)     # log2 3: types (k, x) of 3x+1
    ((50508, 31867), (75235, 47468))
    >>> farey_neighbours_log(3, 16785920)[1]
    (301994, 190537)

    References
    ----------
    Graham, Knuth and Patashnik, *Concrete Mathematics*, section 4.5;
    Khinchin, *Continued Fractions*, theorems 15-16 (best one-sided approximations).
    """
    nb = _neighbours(a, K, base)
    return nb.below, nb.above


def _neighbours(a: int, K: int, base: int = 2) -> _Neighbours:
    if isinstance(K, bool) or not isinstance(K, int) or K < 1:
        raise InputError(f"K must be an integer >= 1, got {K!r}")
    terms_wanted = 16
    while True:
        terms = continued_fraction_log(a, base, terms_wanted)
        if len(terms) < terms_wanted:
            raise InputError(
                f"log_{base} {a} is rational: the continued-fraction method needs it irrational"
            )
        # Stern-Brocot: L = p_{n-2}/q_{n-2} side below, R above; start L = 0/1, R = 1/0.
        lp, lq, rp, rq = 0, 1, 1, 0
        ltext, rtext = "0/1 (none)", "1/0 (none)"
        for n, t in enumerate(terms):
            if n % 2 == 0:  # mediants below theta: L <- L + j R
                j = min(t, (K - lp) // rp)
                if j >= 1:
                    ltext = _describe(n, j, t, lp, rp)
                    lp, lq = lp + j * rp, lq + j * rq
            else:  # mediants above theta: R <- R + j L
                j = min(t, (K - rp) // lp) if lp else 0
                if j >= 1:
                    rtext = _describe(n, j, t, rp, lp)
                    rp, rq = rp + j * lp, rq + j * lq
            if j < t:  # the next mediant has numerator > K: L, R are the neighbours
                return _Neighbours((lp, lq), (rp, rq), ltext, rtext, n + 1)
        terms_wanted *= 2


def _certified_bound(a: int, b: int, k: int, x: int, growth: bool) -> tuple[int, Interval]:
    """Largest integer m >= 0 with 2^(k/x) m <= a m + b (growth) or m <= b / (a - 2^(k/x)), and M*.

    ``b = |b|``; ``M* = b / (2^(k/x) - a)`` (growth) or ``b / (a - 2^(k/x))``.
    For ``x = 1`` exact rationals; otherwise ``gcd(k, x) = 1`` and ``x >= 2``
    make ``2^(k/x)`` irrational, so ``M*`` is never an integer and an
    interval enclosure at rising precision decides ``floor(M*)``.
    """
    if x == 1:
        den = (2**k - a) if growth else (a - 2**k)
        if den <= 0:  # pragma: no cover - excluded by the choice of side
            raise AssertionError("internal error: the type is on the wrong side of log2 a")
        val = Fraction(b, den)
        return val.numerator // val.denominator, Interval(val, val)
    prec = 96 + 2 * k.bit_length() + b.bit_length() + a.bit_length()
    M = None
    while prec <= _MAX_PREC:
        with _ivprec(prec) as iv:
            t = iv.exp(iv.log(iv.mpf(2)) * iv.mpf(k) / iv.mpf(x))
            den = (t - a) if growth else (a - t)
            lo_den = _mpf_to_fraction(den._mpi_[0])
            if lo_den > 0:
                out = _iv_to_interval(iv.mpf(b) / den)
                if M is None:
                    f_lo = out.lo.numerator // out.lo.denominator
                    f_hi = out.hi.numerator // out.hi.denominator
                    if f_lo == f_hi:
                        M = f_lo
                if M is not None and out.width * 2**40 <= max(out.hi, 1):
                    lo = max(out.lo, Fraction(M))
                    hi = min(out.hi, Fraction(M + 1))
                    return M, Interval(lo, hi)
        prec *= 2
    raise ArithmeticError(  # pragma: no cover - M* is irrational, so this does not happen
        f"precision limit reached deciding the bound of type ({k}, {x})"
    )


def _largest_by_continued_fraction(m: Map, K: int, side: str) -> LargestBound:
    a, b = m.branches[1]
    beff = b if side == "positive" else -b
    growth = beff > 0
    nb = _neighbours(a, K)
    (k, x), text = (nb.above, nb.above_text) if growth else (nb.below, nb.below_text)
    label = m.label
    if x == 0 or k == 0:  # no type of length <= K on this side of log2 a: no cycle
        return LargestBound(
            label,
            side,
            (1, K),
            True,
            0,
            None,
            None,
            nb.steps,
            0,
            _CF_METHOD,
            approximant="none with length <= K",
        )
    M, interval = _certified_bound(a, abs(b), k, x, growth)
    content = (k - x, x)
    full = None
    if k <= EXACT_LENGTH_LIMIT:
        full = _bound_of_content(m, content, side)
        if full.integer != M:  # pragma: no cover - two independent evaluations must agree
            raise RuntimeError(
                f"internal error: bound of type ({k}, {x}) is {M} by interval arithmetic, "
                f"{full.integer} exactly"
            )
        interval = full.interval or interval
    if growth:
        formula = f"|min| <= {beff}/({a}((2^{k}/{a}^{x})^(1/{x}) - 1))"
    else:
        formula = f"|min| <= {abs(beff)}/({a}(1 - (2^{k}/{a}^{x})^(1/{x})))"
    return LargestBound(
        label,
        side,
        (1, K),
        True,
        M,
        content,
        full,
        nb.steps,
        1,
        _CF_METHOD,
        interval=interval,
        formula=formula,
        approximant=f"k/x = {k}/{x}: {text} of log2 {a}",
    )
