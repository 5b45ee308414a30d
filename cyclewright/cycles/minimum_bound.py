"""Proved bound on the minimum of a cycle of a given type.

Inside
------
- :class:`MinimumBound`, :func:`minimum_bound` -- the proved bound on the
  minimum (element of least absolute value) of any cycle of a type on one side:
  the exact largest integer ``M`` that a cycle minimum can have, the real bound
  as a certified interval, whether the bound applies (relevant offsets of one
  sign) and whether the denominator's sign allows a cycle at all.

The bound (docs/design.md, section 4)
--------------------------------------
Let ``n_1, ..., n_k`` be a cycle with itinerary of content ``c`` and all
elements positive. Along it ``n_{i+1} / n_i = (a_i/d)(1 + β_i / n_i)`` with
``β_r = b_r / a_r``; the ratios multiply to 1, so
``prod_i (1 + β_i / n_i) = d^k / A``. When every relevant ``β_r`` (those with
``c_r > 0``) is ``>= 0`` and every relevant ``a_r > 0``, each factor is at most
``1 + β_i / m`` with ``m`` the minimum, hence ``d^k / A <= prod_r (1 + β_r/m)^{c_r}``:
a cycle needs ``D = d^k - A > 0`` and ``m <= M*``, the root of
``prod_r (1 + β_r/M)^{c_r} = d^k/A``. For ``ax+b`` this is
``m <= b / (a ((2^k / a^x)^(1/x) - 1))``. When every relevant ``β_r <= 0`` the
inequalities reverse: ``D < 0`` is needed and ``prod_r (1 + β_r/m)^{c_r} <= d^k/A``,
again ``m <= M*`` (or ``m <= max |β_r|``). The negative side is the positive
side of the conjugate ``n -> -T(-n)``: the same computation with every offset
negated. With offsets of mixed signs the product argument fails and the bound
does not apply (``applies = False``).

The integer bound is decided by an exact integer inequality:
``m <= M*`` iff ``d^k m^s <= prod_{r not in S} a_r^{c_r} prod_{r in S} (a_r m + b_r)^{c_r}``
(growth case; reversed otherwise), ``S`` the relevant residues with
``b_r != 0`` and ``s = sum_{r in S} c_r``; for ``3x+1`` this is
``2^k m^x <= (3m + 1)^x``. A float estimate only chooses where to look; two
exact evaluations (``m = M`` holds, ``m = M + 1`` fails) confirm it.

References
----------
.. [1] C. Böhm and G. Sontacchi, Atti Accad. Naz. Lincei 64 (1978) 260-264.
.. [2] S. Eliahou, "The 3x+1 problem: new lower bounds on nontrivial cycle
   lengths", Discrete Mathematics 118 (1993) 45-56 (the product argument).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction
from functools import lru_cache

from cyclewright.maps import Map, as_map

from .intervals import (
    Interval,
    _iv_to_interval,
    _ivprec,
    _log_ratio_float,
    resolve_content,
)
from .itinerary import OfContent
from .labels import PROVED
from .sides import DEFAULT_SIDE, PerSide, Side, on_sides, parse_side

__all__ = [
    "MinimumBound",
    "minimum_bound",
]


# ------------------------------------------------------------------ the bound
@dataclass(frozen=True)
class MinimumBound(OfContent):
    """The proved bound on the minimum of a cycle of one type on one side.

    Attributes
    ----------
    map_label : str
    content : tuple of int
        ``(c_0, ..., c_{d-1})``; ``length`` is their sum ``k``.
    side : {"positive", "negative"}
    denominator : int
        ``D = d^k - A`` (exact).
    applies : bool
        False when the relevant offsets (``c_r > 0``, ``b_r != 0``) have
        mixed signs, or a relevant multiplier is negative: then nothing is
        claimed (``integer`` and ``interval`` are None).
    possible : bool
        False when the sign of ``D`` (or an all-zero offset set) rules out
        every nonzero cycle of this type on this side: a proof that there is
        none. ``integer`` is then 0.
    integer : int or None
        The largest integer ``M`` such that every cycle of the type on the side
        has ``|minimum| <= M`` (exact; 0 means no cycle at all).
    interval : Interval or None
        A certified enclosure of the real bound ``M*`` (with ``M <= M* < M + 1``).
    formula : str
        The bound as a formula with the type's numbers.
    reason : str
        Why it applies or not / why no cycle is possible.
    label : str
        ``"proved"``.
    """

    map_label: str
    content: tuple[int, ...]
    side: str
    denominator: int
    applies: bool
    possible: bool
    integer: int | None
    interval: Interval | None
    formula: str
    reason: str
    label: str = PROVED.value

    def to_dict(self) -> dict:
        return {
            "map": self.map_label,
            "content": list(self.content),
            "length": self.length,
            "side": self.side,
            "denominator": self.denominator,
            "applies": self.applies,
            "possible": self.possible,
            "integer": self.integer,
            "interval": self.interval.to_dict() if self.interval else None,
            "formula": self.formula,
            "reason": self.reason,
            "label": self.label,
        }

    def __repr__(self) -> str:
        head = f"MinimumBound({self.map_label}, content={list(self.content)}, {self.side}"
        if not self.applies:
            return f"{head}: does not apply ({self.reason})"
        if not self.possible:
            return f"{head}: no cycle possible ({self.reason})"
        return f"{head}: |min| <= {self.integer}, M* in {self.interval} (proved)"


@dataclass(frozen=True)
class _Setup:
    """Everything the bound needs for one (content, side), as exact data."""

    d: int
    branches: tuple
    k: int
    A: int
    D: int
    applies: bool
    reason: str
    growth: bool  # True: relevant offsets >= 0 after the side's sign (D > 0 needed)
    S: tuple[tuple[int, int, int], ...]  # (a_r, b_r effective, c_r) with b_r != 0
    neutral: int  # prod over relevant residues with b_r = 0 of a_r^{c_r}
    s: int  # sum of c_r over S
    beta_max: Fraction  # max |b_r/a_r| over S


def _setup(m: Map, content: tuple[int, ...], side: str) -> _Setup:
    parse_side(side, allow_both=False)
    return _setup_cached(m.divisor, tuple(m.branches), content, side)


@lru_cache(maxsize=8192)
def _setup_cached(d: int, branches: tuple, content: tuple[int, ...], side: str) -> _Setup:
    eps = 1 if side == "positive" else -1
    k = sum(content)
    A = 1
    S = []
    neutral = 1
    applies = True
    reason = ""
    signs = set()
    for r, ((a, b), c) in enumerate(zip(branches, content)):
        if not c:
            continue
        A *= a**c
        if a < 0:
            applies = False
            reason = f"residue {r} has a negative multiplier {a}: orbits change sign, the product argument does not apply"
        if b:
            S.append((a, eps * b, c))
            signs.add(1 if eps * b > 0 else -1)
        else:
            neutral *= a**c
    D = d**k - A
    if applies and len(signs) > 1:
        applies = False
        reason = (
            "the offsets of the residues used have mixed signs: the product argument "
            "gives no bound (it needs every relevant b_r/a_r of one sign)"
        )
    growth = signs != {-1}
    s = sum(c for _a, _b, c in S)
    beta_max = max((Fraction(abs(b), a) for a, b, _c in S), default=Fraction(0))
    return _Setup(d, branches, k, A, D, applies, reason, growth, tuple(S), neutral, s, beta_max)


def _allowed(st: _Setup, m: int) -> bool:
    """Exact test of the necessary condition for a cycle minimum ``m >= 1`` (monotone in m)."""
    import gmpy2

    if not st.growth and m <= st.beta_max:
        return True
    F = gmpy2.mpz(st.neutral)
    for a, b, c in st.S:
        F *= gmpy2.mpz(a * m + b) ** c
    G = gmpy2.mpz(st.d) ** st.k * gmpy2.mpz(m) ** st.s
    return G <= F if st.growth else F <= G


def _estimate(st: _Setup, lam: float) -> float:
    """Float estimate of the real bound M* (root of sum c ln(1 + β/M) = Λ); a starting point only."""
    if len(st.S) == 1:
        a, b, c = st.S[0]
        beta = b / a
        try:
            den = math.expm1(lam / c)
        except OverflowError:  # Λ/c above ~709: the real bound is below 10^-300, i.e. about 0
            return 0.0
        if den == 0:
            return math.inf
        return beta / den
    # Newton / bisection on g(M) = sum c ln(1 + β/M) - Λ (monotone).
    betas = [(b / a, c) for a, b, c in st.S]
    tot = sum(abs(bb) * c for bb, c in betas)
    hi = tot / abs(lam) + float(st.beta_max) + 1.0
    lo = float(st.beta_max) * (1 + 1e-9) + 1e-12 if not st.growth else 1e-12

    def g(M: float) -> float:
        return sum(c * math.log1p(bb / M) for bb, c in betas) - lam

    for _ in range(200):
        mid = (lo + hi) / 2
        val = g(mid)
        if (val > 0) == st.growth:
            lo = mid
        else:
            hi = mid
        if hi - lo <= 1e-9 * hi:
            break
    return (lo + hi) / 2


def _integer_bound(st: _Setup, lam: float) -> int:
    """The exact largest integer m >= 0 passing :func:`_allowed` (0 if even m = 1 fails)."""
    est = _estimate(st, lam)
    if not math.isfinite(est) or est > 2.0**900:
        guess = 1
    else:
        guess = max(int(math.floor(est)), 1)
    if not _allowed(st, 1):
        return 0
    if _allowed(st, guess):
        lo = guess
        step = 1
        hi = guess + step
        while _allowed(st, hi):
            lo = hi
            step *= 2
            hi = lo + step
    else:
        hi = guess
        step = 1
        lo = max(hi - step, 1)
        while not _allowed(st, lo):
            hi = lo
            step *= 2
            lo = max(hi - step, 1)
    # invariant: allowed(lo), not allowed(hi)
    while hi - lo > 1:
        mid = (lo + hi) // 2
        if _allowed(st, mid):
            lo = mid
        else:
            hi = mid
    return lo


def _lam_at(iv, st: _Setup, content: tuple[int, ...]):
    """Λ = k ln d - sum c_r ln a_r as an mpmath interval at the current precision."""
    lam = st.k * iv.log(iv.mpf(st.d))
    for (a, _b), c in zip(st.branches, content):
        if c and a != 1:
            lam -= c * iv.log(iv.mpf(a))
    return lam


def _start_prec(st: _Setup) -> int:
    """Bits needed to see Λ through the cancellation of k ln d against ln A, plus margin."""
    lam = abs(_log_ratio_float(st.d**st.k, st.A)) or 2.0**-60
    size = max(st.k * math.log2(st.d), 1.0)
    return int(96 + max(0.0, math.log2(size) - math.log2(lam)))


def _real_interval(st: _Setup, content: tuple[int, ...], M: int) -> Interval:
    """Certified enclosure of M* inside [M, M+1] by interval arithmetic."""
    prec = _start_prec(st)
    if len(st.S) == 1:
        a, b, c = st.S[0]
        while True:
            with _ivprec(prec) as iv:
                lam = _lam_at(iv, st, content)
                val = (iv.mpf(b) / a) / (iv.exp(lam / c) - 1)
                out = _iv_to_interval(val)
            if out.width * 2**40 <= max(out.hi, 1) or prec > 16384:
                break
            prec *= 2
        lo = max(out.lo, Fraction(M))
        hi = min(out.hi, Fraction(M + 1))
        if lo > hi:  # pragma: no cover - would contradict the exact integer test
            raise AssertionError("certified interval disagrees with the exact integer bound")
        return Interval(lo, hi)
    # General content: a high-precision root of g, then two certified signs around it;
    # bisection with certified signs if that fails.
    lo, hi = Fraction(M), Fraction(M + 1)
    root = _root_estimate(st, content, M, prec)
    if root is not None and root > 0:
        eps = max(root, Fraction(1)) / 2**44
        a_, b_ = max(lo, root - eps), min(hi, root + eps)
        sa = _certified_sign_g(st, content, a_, prec)
        sb = _certified_sign_g(st, content, b_, prec)
        if sa is not None and sb is not None and sa != sb and (sa > 0) == st.growth:
            return Interval(a_, b_)
    for _ in range(48):
        mid = (lo + hi) / 2
        sign = _certified_sign_g(st, content, mid, prec)
        if sign is None:
            break
        if (sign > 0) == st.growth:
            lo = mid
        else:
            hi = mid
    return Interval(lo, hi)


def _root_estimate(st: _Setup, content, M: int, prec: int) -> Fraction | None:
    """The root of g(M) = sum c ln(1 + β/M) - Λ in [M, M+1], to about prec bits (not certified)."""
    import mpmath

    old = mpmath.mp.prec
    try:
        mpmath.mp.prec = prec
        lam = st.k * mpmath.log(st.d)
        for (a, _b), c in zip(st.branches, content):
            if c and a != 1:
                lam -= c * mpmath.log(a)
        terms = [(mpmath.mpf(b) / a, c) for a, b, c in st.S]

        def g(x):
            return mpmath.fsum(c * mpmath.log1p(bb / x) for bb, c in terms) - lam

        lo = mpmath.mpf(M)
        if not st.growth:
            bm = mpmath.mpf(st.beta_max.numerator) / st.beta_max.denominator
            lo = max(lo, bm * (1 + mpmath.mpf(2) ** -40))
        lo = max(lo, mpmath.mpf(2) ** -60)
        hi = mpmath.mpf(M + 1)

        def dg(x):
            return -mpmath.fsum(c * bb / (x * (x + bb)) for bb, c in terms)

        # Newton from the middle, kept inside [lo, hi] (g is monotone there); bisection
        # steps whenever Newton would leave the bracket.
        x = (lo + hi) / 2
        tol = mpmath.mpf(2) ** (-prec + 8)
        for _ in range(200):
            gx = g(x)
            if (gx > 0) == st.growth:
                lo = x
            else:
                hi = x
            step = gx / dg(x)
            nx = x - step
            if not (lo < nx < hi):
                nx = (lo + hi) / 2
            if abs(nx - x) <= tol * nx or hi - lo <= tol * hi:
                x = nx
                break
            x = nx
        lo = hi = x
        man, exp = ((lo + hi) / 2).man_exp
        man, exp = int(man), int(exp)
        return Fraction(man << exp) if exp >= 0 else Fraction(man, 1 << -exp)
    except (ValueError, ZeroDivisionError, ArithmeticError):
        return None
    finally:
        mpmath.mp.prec = old


def _certified_sign_g(st: _Setup, content, M: Fraction, prec: int) -> int | None:
    """Sign of g(M) = sum c ln(1 + β/M) - Λ, certified, or None if undecided at 8 x prec bits."""
    top = 8 * prec
    while prec <= top:
        with _ivprec(prec) as iv:
            Mi = iv.mpf(M.numerator) / M.denominator
            tot = iv.mpf(0)
            for a, b, c in st.S:
                tot += c * iv.log(1 + iv.mpf(b) / (a * Mi))
            g = _iv_to_interval(tot - _lam_at(iv, st, content))
        if g.lo > 0:
            return 1
        if g.hi < 0:
            return -1
        prec *= 2
    return None


def minimum_bound(
    m: Map | str, content_or_type, side: Side = DEFAULT_SIDE
) -> MinimumBound | PerSide[MinimumBound]:
    """The proved bound on the minimum of any cycle of a type on one side.

    Parameters
    ----------
    m : Map
    content_or_type : (k, x) for two-branch maps, or a content
        See :func:`resolve_content`.
    side : {"positive", "negative", "both"}
        Cycles of positive or of negative integers (the negative side is the
        positive side of the conjugate map ``n -> -T(-n)``); ``"both"``
        gives one bound per side.

    Returns
    -------
    MinimumBound or PerSide of MinimumBound
        For ``side="both"`` a :class:`~cyclewright.cycles.sides.PerSide`.

    Examples
    --------
    >>> from cyclewright import maps
    >>> b = minimum_bound(maps.get("3x+1"), (13, 8))
    >>> b.integer, b.interval.text(6)
    (11, '[11.8453, 11.8454]')
    >>> minimum_bound(maps.get("3x+1"), (13, 8), "negative").possible   # D = 1631 > 0
    False
    >>> minimum_bound(maps.get("3x+1"), (11, 7), "negative").integer    # the cycle of -17
    35
    >>> minimum_bound(maps.get("mod3-4x"), (1, 1, 1)).applies
    False
    >>> [b.possible for b in minimum_bound("3x+1", (13, 8), side="both")]
    [True, False]

    References
    ----------
    Böhm and Sontacchi 1978; Eliahou 1993 (module docstring).
    """
    m = as_map(m)
    content = resolve_content(m, content_or_type)
    return on_sides(side, lambda s: _bound_of_content(m, content, s))


def _bound_of_content(
    m: Map, content: tuple[int, ...], side: str, with_interval: bool = True
) -> MinimumBound:
    st = _setup(m, content, side)
    label = m.label
    formula = _formula(m, content, st)
    if not st.applies:
        return MinimumBound(label, content, side, st.D, False, True, None, None, formula, st.reason)

    def impossible(why: str) -> MinimumBound:  # the bound applies: no cycle of the type
        zero = Interval(Fraction(0), Fraction(0))
        return MinimumBound(label, content, side, st.D, True, False, 0, zero, formula, why)

    if not st.S:
        return impossible(
            "every residue used has offset 0: the composite is n -> A n / d^k, whose only cycle is 0"
        )
    if st.D == 0 or (st.D > 0) != st.growth:
        need = ">" if st.growth else "<"
        why = (
            f"D = d^k - A = {_short_int(st.D)}: a {side} cycle of this type needs D {need} 0 "
            f"(the product of (1 + b_r/(a_r n)) along it is {'above' if st.growth else 'below'} 1)"
        )
        return impossible(why)
    lam = _log_ratio_float(st.d**st.k, st.A)
    M = _integer_bound(st, lam)
    interval = _real_interval(st, content, M) if with_interval else None
    reason = (
        "relevant offsets (times the side's sign) are >= 0: the product of (1 + b_r/(a_r n_i)) "
        "over the cycle equals d^k/A and is at most prod (1 + b_r/(a_r m))^{c_r}"
        if st.growth
        else "relevant offsets (times the side's sign) are <= 0: the product of (1 + b_r/(a_r n_i)) "
        "over the cycle equals d^k/A and is at least prod (1 + b_r/(a_r m))^{c_r}"
    )
    return MinimumBound(label, content, side, st.D, True, True, M, interval, formula, reason)


def _formula(m: Map, content: tuple[int, ...], st: _Setup) -> str:
    ab = m.ax_b
    k = st.k
    if ab is not None and st.S:
        a, b = ab
        x = content[1]
        bb = st.S[0][1]
        if st.growth:
            return f"|min| <= {bb}/({a}((2^{k}/{a}^{x})^(1/{x}) - 1))"
        return f"|min| <= {abs(bb)}/({a}(1 - (2^{k}/{a}^{x})^(1/{x})))"
    terms = " ".join(f"(1 + {b}/({a} m))^{c}" for a, b, c in st.S) or "1"
    rel = ">=" if st.growth else "<="
    return f"|min| <= largest m with {terms} {rel} {st.d}^{k}/{_short_int(st.A)}"


def _short_int(n: int) -> str:
    """``n`` in decimal, or its sign and bit length when it is too long to print."""
    if abs(n).bit_length() <= 4000:
        return str(n)
    return f"{'-' if n < 0 else ''}(a {abs(n).bit_length()}-bit integer)"
