"""Proved bounds for cycles of a given type: the cycle minimum, and linear forms in logarithms.

Inside
------
- :class:`Interval` -- a closed interval with rational end points (a certified enclosure).
- :func:`log_form` -- ``Λ = k ln d - ln A`` (``A = prod a_r^{c_r}``) as a certified
  interval (``mpmath.iv`` interval arithmetic, precision raised until the
  interval is narrow).
- :class:`MinimumBound`, :func:`minimum_bound` -- the proved bound on the
  minimum (element of least absolute value) of any cycle of a type on one side:
  the exact largest integer ``M`` that a cycle minimum can have, the real bound
  as a certified interval, whether the bound applies (relevant offsets of one
  sign) and whether the denominator's sign allows a cycle at all.
- :class:`LinearFormBound`, :func:`linear_form_bound` -- explicit lower bounds
  for ``|Λ|`` from the theory of linear forms in two logarithms (Rhin 1987 for
  ``ln 2`` and ``ln 3``; Laurent 2008 in general), and what they give for the
  minimum without knowing ``Λ`` (:func:`candidates_from_linear_form`).
- :class:`LargestBound`, :func:`largest_bound_up_to`, :func:`bound_for_length`
  -- the largest minimum bound over every type of length ``<= K`` (the number
  a census must scan to), with a float prefilter that is safe by an explicit
  error budget and an exact confirmation of the winner.

The bound (DESIGN.md section 1)
-------------------------------
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
.. [3] G. Rhin, "Approximants de Padé et mesures effectives
   d'irrationalité", in Séminaire de Théorie des Nombres, Paris 1985-86,
   Progress in Mathematics 71, Birkhäuser (1987) 155-164.
.. [4] M. Laurent, "Linear forms in two logarithms and interpolation
   determinants II", Acta Arithmetica 133 (2008) 325-348.
.. [5] F. Johansson et al., mpmath (interval arithmetic ``mpmath.iv``).
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from contextlib import contextmanager
from dataclasses import dataclass
from fractions import Fraction
from functools import lru_cache

from maps import Map

from .errors import InputError
from .labels import PROVED
from .necklaces import normalize_content, type_content

__all__ = [
    "Interval",
    "log_form",
    "MinimumBound",
    "minimum_bound",
    "LinearFormBound",
    "linear_form_bound",
    "candidates_from_linear_form",
    "LargestBound",
    "largest_bound_up_to",
    "bound_for_length",
    "resolve_content",
    "SIDES",
]

SIDES = ("positive", "negative")


# ------------------------------------------------------------------ intervals
@dataclass(frozen=True)
class Interval:
    """A closed interval ``[lo, hi]`` with rational end points (a certified enclosure).

    Examples
    --------
    >>> iv = Interval(Fraction(1, 3), Fraction(1, 2))
    >>> Fraction(2, 5) in iv, iv.width
    (True, Fraction(1, 6))
    """

    lo: Fraction
    hi: Fraction

    @property
    def width(self) -> Fraction:
        return self.hi - self.lo

    @property
    def mid(self) -> float:
        """The midpoint as a float (for display and plots only)."""
        return float((self.lo + self.hi) / 2)

    def __contains__(self, value) -> bool:
        return self.lo <= value <= self.hi

    def text(self, digits: int = 12) -> str:
        """``[lo, hi]`` in decimal, rounded outward to ``digits`` significant digits."""
        lo, hi = _outward_decimal(self.lo, self.hi, digits)
        return f"[{_dec_text(lo)}, {_dec_text(hi)}]"

    def to_dict(self, digits: int = 24) -> dict:
        """End points rounded outward to ``digits`` significant decimal digits (still an enclosure)."""
        lo, hi = _outward_decimal(self.lo, self.hi, digits)
        return {"lo": lo, "hi": hi, "text": self.text()}

    def __str__(self) -> str:
        return self.text()


def _dec_text(q: Fraction) -> str:
    """A decimal fraction p / 10^j as text (exact)."""
    if q.denominator == 1:
        return str(q.numerator)
    den = q.denominator
    j = 0
    while den % 10 == 0 or den % 2 == 0 or den % 5 == 0:
        # scale to a power of ten
        j += 1
        if (10**j) % den == 0:
            break
        if j > 400:  # pragma: no cover - not a decimal fraction
            return str(float(q))
    scaled = q.numerator * (10**j // den)
    sign = "-" if scaled < 0 else ""
    s = str(abs(scaled)).rjust(j + 1, "0")
    return f"{sign}{s[:-j]}.{s[-j:]}"


def _outward_decimal(lo: Fraction, hi: Fraction, digits: int) -> tuple[Fraction, Fraction]:
    """Round ``lo`` down and ``hi`` up to decimal fractions with about ``digits`` significant digits."""
    ref = max(abs(lo), abs(hi))
    if ref == 0:
        return lo, hi
    e = math.floor(math.log10(float(ref))) if float(ref) > 0 else 0
    j = digits - 1 - e
    scale = Fraction(10) ** j
    lo_r = Fraction(math.floor(lo * scale)) / scale
    hi_r = Fraction(math.ceil(hi * scale)) / scale
    return lo_r, hi_r


def _mpf_to_fraction(raw) -> Fraction:
    """Exact value of a raw mpmath float tuple (sign, man, exp, bc)."""
    sign, man, exp, _bc = raw
    if not man:
        if exp in (0,):
            return Fraction(0)
        raise ArithmeticError("interval end point is not finite")
    man = int(man)
    v = Fraction(man << exp) if exp >= 0 else Fraction(man, 1 << -exp)
    return -v if sign else v


def _iv_to_interval(x) -> Interval:
    lo, hi = x._mpi_
    return Interval(_mpf_to_fraction(lo), _mpf_to_fraction(hi))


@contextmanager
def _ivprec(bits: int):
    from mpmath import iv

    old = iv.prec
    iv.prec = bits
    try:
        yield iv
    finally:
        iv.prec = old


# ------------------------------------------------------------------ contents
def resolve_content(m: Map, content_or_type) -> tuple[int, ...]:
    """Turn a type or a content into a content tuple ``(c_0, ..., c_{d-1})``.

    For ``d = 2`` a pair ``(k, x)`` is the *type* (length, odd steps); a
    content for ``d = 2`` is given as a mapping ``{0: c_0, 1: c_1}``. For
    ``d > 2`` a sequence of ``d`` counts or a mapping is a content.

    >>> import maps
    >>> resolve_content(maps.get("3x+1"), (13, 8))
    (5, 8)
    >>> resolve_content(maps.get("3x+1"), {0: 5, 1: 8})
    (5, 8)
    """
    d = m.divisor
    if isinstance(content_or_type, Mapping):
        return normalize_content(content_or_type, d)
    seq = tuple(content_or_type)
    if d == 2:
        if len(seq) != 2:
            raise InputError(
                "for a two-branch map give the type as (k, x) or a content {0: c0, 1: c1}"
            )
        return type_content(seq[0], seq[1])
    return normalize_content(seq, d)


# ------------------------------------------------------------------ log form
def log_form(m: Map, content_or_type, *, rel_bits: int = 64) -> Interval:
    """``Λ = k ln d - sum_r c_r ln a_r`` (that is ``ln(d^k / A)``) as a certified interval.

    Uses ``mpmath.iv`` and raises the working precision until the interval's
    relative width is below ``2^-rel_bits`` (its sign is that of ``D = d^k - A``,
    which is checked). Requires every relevant multiplier to be positive.

    Examples
    --------
    >>> import maps
    >>> print(log_form(maps.get("3x+1"), (13, 8)))
    [0.222015037934, 0.222015037935]

    References
    ----------
    mpmath interval arithmetic (``mpmath.iv``).
    """
    content = resolve_content(m, content_or_type)
    return _log_form(m.divisor, tuple(m.branches), content, rel_bits)


@lru_cache(maxsize=4096)
def _log_form(d: int, branches: tuple, content: tuple[int, ...], rel_bits: int) -> Interval:
    k = sum(content)
    A = 1
    for (a, _b), c in zip(branches, content):
        if c:
            if a <= 0:
                raise InputError("ln A needs positive multipliers on the residues used")
            A *= a**c
    D = d**k - A
    if D == 0:
        return Interval(Fraction(0), Fraction(0))
    # Enough bits to see |Λ| through the cancellation of k ln d against ln A.
    size = max(k * math.log2(d), 1.0)
    lam_f = _log_ratio_float(d**k, A)
    lost = max(0.0, math.log2(size) - math.log2(abs(lam_f)) if lam_f else 0.0)
    prec = int(rel_bits + lost + 32)
    while True:
        with _ivprec(prec) as iv:
            lam = k * iv.log(iv.mpf(d))
            for (a, _b), c in zip(branches, content):
                if c and a != 1:
                    lam -= c * iv.log(iv.mpf(a))
            out = _iv_to_interval(lam)
        if (out.lo > 0 or out.hi < 0) and (
            out.width == 0 or out.width * 2**rel_bits <= min(abs(out.lo), abs(out.hi))
        ):
            if (out.lo > 0) != (D > 0):  # pragma: no cover - would be a bug
                raise AssertionError("sign of Λ disagrees with the sign of D")
            return out
        prec *= 2


def _log_ratio_float(num: int, den: int) -> float:
    """``ln(num/den)`` for positive integers, accurate to a few ulps relative (not certified)."""
    diff = num - den
    try:
        q = diff / den
    except OverflowError:
        return math.log(num) - math.log(den)
    if q > 1e300 or q < -1 + 1e-12:
        return math.log(num) - math.log(den)
    return math.log1p(q)


# ------------------------------------------------------------------ the bound
@dataclass(frozen=True)
class MinimumBound:
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

    @property
    def length(self) -> int:
        return sum(self.content)

    @property
    def odd(self) -> int | None:
        """For two-branch maps, the number of steps on residue 1."""
        return self.content[1] if len(self.content) == 2 else None

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
    if side not in SIDES:
        raise InputError(f"side must be 'positive' or 'negative', got {side!r}")
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
        den = math.expm1(lam / c)
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


def minimum_bound(m: Map, content_or_type, side: str = "positive") -> MinimumBound:
    """The proved bound on the minimum of any cycle of a type on one side.

    Parameters
    ----------
    m : Map
    content_or_type : (k, x) for two-branch maps, or a content
        See :func:`resolve_content`.
    side : {"positive", "negative"}
        Cycles of positive or of negative integers (the negative side is the
        positive side of the conjugate map ``n -> -T(-n)``).

    Returns
    -------
    MinimumBound

    Examples
    --------
    >>> import maps
    >>> b = minimum_bound(maps.get("3x+1"), (13, 8))
    >>> b.integer, b.interval.text(6)
    (11, '[11.8453, 11.8454]')
    >>> minimum_bound(maps.get("3x+1"), (13, 8), "negative").possible   # D = 1631 > 0
    False
    >>> minimum_bound(maps.get("3x+1"), (11, 7), "negative").integer    # the cycle of -17
    35
    >>> minimum_bound(maps.get("mod3-4x"), (1, 1, 1)).applies
    False

    References
    ----------
    Böhm and Sontacchi 1978; Eliahou 1993 (module docstring).
    """
    content = resolve_content(m, content_or_type)
    return _bound_of_content(m, content, side)


def _bound_of_content(
    m: Map, content: tuple[int, ...], side: str, with_interval: bool = True
) -> MinimumBound:
    st = _setup(m, content, side)
    label = m.label
    formula = _formula(m, content, st)
    if not st.applies:
        return MinimumBound(label, content, side, st.D, False, True, None, None, formula, st.reason)
    if not st.S:
        return MinimumBound(
            label,
            content,
            side,
            st.D,
            True,
            False,
            0,
            Interval(Fraction(0), Fraction(0)),
            formula,
            "every residue used has offset 0: the composite is n -> A n / d^k, whose only cycle is 0",
        )
    if st.D == 0 or (st.D > 0) != st.growth:
        need = ">" if st.growth else "<"
        why = (
            f"D = d^k - A = {st.D}: a {side} cycle of this type needs D {need} 0 "
            f"(the product of (1 + b_r/(a_r n)) along it is {'above' if st.growth else 'below'} 1)"
        )
        return MinimumBound(
            label,
            content,
            side,
            st.D,
            True,
            False,
            0,
            Interval(Fraction(0), Fraction(0)),
            formula,
            why,
        )
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
    return f"|min| <= largest m with {terms} {rel} {st.d}^{k}/{st.A}"


# ------------------------------------------------------------- linear forms
# Constants, with where they come from. All three are recalled from the
# papers, not copied from them: marked "from memory".
RHIN_EXPONENT = Fraction(133, 10)
"""Rhin 1987: ``|b1 ln 2 - b2 ln 3| >= H^(-13.3)`` for integers with ``H = max(|b1|, |b2|) >= 2`` (from memory)."""

LAURENT_C2 = (Fraction(252, 10), Fraction(38, 100), 10)
"""Laurent 2008, Corollary 2: ``ln|Λ| >= -25.2 D^4 max(ln b' + 0.38, 10/D, 1)^2 ln A1 ln A2`` (from memory)."""


@dataclass(frozen=True)
class LinearFormBound:
    """An explicit lower bound for ``|Λ| = |k ln d - ln A|`` (a theorem evaluated: proved).

    Attributes
    ----------
    form : str
        ``Λ`` written over multiplicatively independent bases, e.g. ``13 ln 2 - 8 ln 3``.
    applies : bool
        False when ``Λ`` needs three or more independent logarithms (a
        Matveev-type bound would be needed; not implemented) or ``Λ = 0``.
    log_lower : Fraction or None
        A rational number with ``ln |Λ| >= log_lower`` (rounded down).
    source : str
        ``"Rhin 1987"``, ``"Laurent 2008, Corollary 2"`` or ``"elementary"``.
    constants : str
        The inequality used, with its constants.
    from_memory : bool
        True when the constants are recalled rather than checked against the paper.
    reason : str
    label : str
        ``"proved"``.
    """

    form: str
    applies: bool
    log_lower: Fraction | None
    source: str
    constants: str
    from_memory: bool
    reason: str = ""
    label: str = PROVED.value

    @property
    def log10_lower(self) -> float | None:
        """``log10`` of the lower bound (a float, for display)."""
        if self.log_lower is None:
            return None
        return float(self.log_lower) / math.log(10)

    def lower_text(self) -> str:
        """The lower bound for ``|Λ|`` in scientific notation (rounded down)."""
        if self.log_lower is None:
            return "-"
        l10 = float(self.log_lower) / math.log(10)
        e = math.floor(l10)
        mant = 10 ** (l10 - e)
        mant = math.floor(mant * 100) / 100  # round down
        return f"{mant:.2f}e{e}"

    def to_dict(self) -> dict:
        return {
            "form": self.form,
            "applies": self.applies,
            "log_lower": self.log_lower,
            "lower": self.lower_text(),
            "source": self.source,
            "constants": self.constants,
            "from_memory": self.from_memory,
            "reason": self.reason,
            "label": self.label,
        }

    def __repr__(self) -> str:
        if not self.applies:
            return f"LinearFormBound({self.form}: not available; {self.reason})"
        mem = ", from memory" if self.from_memory else ""
        return f"LinearFormBound(|{self.form}| >= {self.lower_text()} ({self.source}{mem}))"


@lru_cache(maxsize=1024)
def _factor(n: int) -> tuple[tuple[int, int], ...]:
    from sympy import factorint

    return tuple(sorted((int(p), int(e)) for p, e in factorint(n).items()))


def _prime_exponents(d: int, branches: tuple, content: tuple[int, ...]) -> dict[int, int]:
    """``Λ = sum_p e_p ln p``: e_p = k v_p(d) - sum_r c_r v_p(a_r)."""
    k = sum(content)
    e: dict[int, int] = {}
    for p, v in _factor(d):
        e[p] = e.get(p, 0) + k * v
    for (a, _b), c in zip(branches, content):
        if c and abs(a) != 1:
            for p, v in _factor(abs(a)):
                e[p] = e.get(p, 0) - c * v
    return {p: v for p, v in e.items() if v}


def _laurent_log_lower(p1: int, b1: int, p2: int, b2: int) -> Fraction:
    """Laurent 2008, Corollary 2 with D = 1 for Λ = b2 ln p2 - b1 ln p1 (p1, p2 > 1 integers)."""
    C, c038, ten = LAURENT_C2
    with _ivprec(128) as iv:
        lA1 = iv.log(iv.mpf(p1))
        lA2 = iv.log(iv.mpf(p2))
        one = iv.mpf(1)
        # log A_i >= max(h(α_i), |ln α_i| / D, 1 / D) = max(ln α_i, 1) for integers α_i >= 2
        lA1 = iv.mpf([max(lA1.a, one.a), max(lA1.b, one.b)])
        lA2 = iv.mpf([max(lA2.a, one.a), max(lA2.b, one.b)])
        bprime = b1 / lA2 + b2 / lA1
        inner = iv.log(bprime) + iv.mpf(c038.numerator) / c038.denominator
        m_hi = max(inner.b, iv.mpf(ten).b, one.b)
        val = -(iv.mpf(C.numerator) / C.denominator) * iv.mpf(m_hi) ** 2 * lA1 * lA2
        return _iv_to_interval(val).lo


def _rhin_log_lower(H: int) -> Fraction:
    with _ivprec(128) as iv:
        val = -(iv.mpf(RHIN_EXPONENT.numerator) / RHIN_EXPONENT.denominator) * iv.log(iv.mpf(H))
        return _iv_to_interval(val).lo


def linear_form_bound(m: Map, content_or_type) -> LinearFormBound:
    """A proved lower bound for ``|Λ| = |k ln d - ln A|`` from linear forms in logarithms.

    ``Λ`` is rewritten over primes: ``Λ = sum_p e_p ln p``. With one prime,
    or all ``e_p`` of one sign, ``|Λ| = sum |e_p| ln p`` (elementary). With
    two primes of opposite signs: for ``{2, 3}`` Rhin's bound
    ``|b1 ln 2 - b2 ln 3| >= H^(-13.3)``, ``H = max(|b1|, |b2|) >= 2``
    (Rhin 1987, from memory), and in general Laurent's Corollary 2 for two
    logarithms of rationals (``D = 1``):
    ``ln|Λ| >= -25.2 max(ln b' + 0.38, 10, 1)^2 ln A1 ln A2`` with
    ``ln A_i = max(ln α_i, 1)``, ``b' = b1/ln A2 + b2/ln A1`` (Laurent 2008,
    from memory); the stronger of the two is reported. Three or more primes:
    when ``d`` and every multiplier used are powers of two bases the same
    corollary applies to those two bases; otherwise nothing is claimed.

    Examples
    --------
    >>> import maps
    >>> lf = linear_form_bound(maps.get("3x+1"), (13, 8))
    >>> lf.source, lf.lower_text()
    ('Rhin 1987', '1.52e-15')
    >>> linear_form_bound(maps.get("5x+1"), (7, 3)).source
    'Laurent 2008, Corollary 2'

    References
    ----------
    Rhin 1987; Laurent 2008 (module docstring). Both constants are recalled
    from the papers (from memory).
    """
    content = resolve_content(m, content_or_type)
    return _linear_form_bound(m.divisor, tuple(m.branches), content)


@lru_cache(maxsize=4096)
def _linear_form_bound(d: int, branches: tuple, content: tuple[int, ...]) -> LinearFormBound:
    for (a, _b), c in zip(branches, content):
        if c and a < 0:
            return LinearFormBound(
                "k ln d - ln A", False, None, "-", "-", False, "a multiplier used is negative"
            )
    e = _prime_exponents(d, branches, content)
    form = " ".join(
        f"{'+' if v > 0 else '-'} {abs(v)} ln {p}" for p, v in sorted(e.items())
    ).lstrip("+ ")
    if form.startswith("- "):
        form = "-" + form[2:]
    if not e:
        return LinearFormBound("0", False, None, "-", "-", False, "Λ = 0 (D = 0)")
    signs = {v > 0 for v in e.values()}
    if len(e) == 1 or len(signs) == 1:
        with _ivprec(128) as iv:
            tot = iv.mpf(0)
            for p, v in e.items():
                tot += abs(v) * iv.log(iv.mpf(p))
            lo = _iv_to_interval(iv.log(tot)).lo
        return LinearFormBound(
            form,
            True,
            lo,
            "elementary",
            "|Λ| = sum |e_p| ln p (no cancellation)",
            False,
        )
    if len(e) == 2:
        (p1, v1), (p2, v2) = sorted(e.items())
        b1, b2 = abs(v1), abs(v2)
        laurent_consts = (
            "ln|Λ| >= -25.2 D^4 max(ln b' + 0.38, 10/D, 1)^2 ln A1 ln A2, D = 1, "
            "ln A_i = max(ln α_i, 1), b' = b1/ln A2 + b2/ln A1"
        )
        H = max(b1, b2)
        if {p1, p2} == {2, 3} and H >= 2:
            rh_consts = f"|b1 ln 2 - b2 ln 3| >= H^(-13.3), H = max(|b1|, |b2|) = {H} >= 2"
            # Laurent's bound is never above -25.2 * 100 * ln 3 < -2768; Rhin's is
            # -13.3 ln H, so Rhin is the stronger one unless H > e^208 (checked in floats
            # with a wide margin; the certified value is computed for the winner).
            if 13.3 * math.log(H) < 2700:
                return LinearFormBound(form, True, _rhin_log_lower(H), "Rhin 1987", rh_consts, True)
            rh = _rhin_log_lower(H)
            la = _laurent_log_lower(p1, b1, p2, b2)
            if rh >= la:
                return LinearFormBound(form, True, rh, "Rhin 1987", rh_consts, True)
            return LinearFormBound(
                form, True, la, "Laurent 2008, Corollary 2", laurent_consts, True
            )
        best = _laurent_log_lower(p1, b1, p2, b2)
        return LinearFormBound(form, True, best, "Laurent 2008, Corollary 2", laurent_consts, True)
    # Three or more primes: two bases d and a when every multiplier used is a power of a.
    used = sorted({abs(a) for (a, _b), c in zip(branches, content) if c and abs(a) != 1})
    base = _common_base(used)
    if base is not None and _common_base([base, d]) is None:
        k = sum(content)
        ea = 0
        for (a, _b), c in zip(branches, content):
            if c and abs(a) != 1:
                ea += c * _log_base_exact(abs(a), base)
        if ea and d**k != base**ea:
            best = _laurent_log_lower(d, k, base, ea)
            return LinearFormBound(
                f"{k} ln {d} - {ea} ln {base}",
                True,
                best,
                "Laurent 2008, Corollary 2",
                "ln|Λ| >= -25.2 D^4 max(ln b' + 0.38, 10/D, 1)^2 ln A1 ln A2, D = 1, "
                "ln A_i = max(ln α_i, 1), b' = b1/ln A2 + b2/ln A1",
                True,
            )
    return LinearFormBound(
        form,
        False,
        None,
        "-",
        "-",
        False,
        "three or more independent logarithms: a bound of Matveev's type would be needed (not implemented)",
    )


def _common_base(nums: Sequence[int]) -> int | None:
    """The least integer g > 1 of which every number in ``nums`` (all > 1) is a power, or None.

    Positive integers are multiplicatively dependent exactly when they are
    powers of one integer; this finds it from the prime exponent vectors.
    """
    if not nums:
        return None
    vecs = [dict(_factor(n)) for n in nums]
    primes = sorted(vecs[0])
    if any(sorted(v) != primes for v in vecs):
        return None
    first = [vecs[0][p] for p in primes]
    g = 0
    for e in first:
        g = math.gcd(g, e)
    w = [e // g for e in first]  # primitive direction
    for v in vecs:
        ev = [v[p] for p in primes]
        t = ev[0] // w[0]
        if any(e != t * wi for e, wi in zip(ev, w)):
            return None
    base = 1
    for p, wi in zip(primes, w):
        base *= p**wi
    return base


def _log_base_exact(n: int, base: int) -> int:
    e = 0
    while n > 1:
        n, r = divmod(n, base)
        if r:
            raise ValueError("not a power")
        e += 1
    return e


def candidates_from_linear_form(
    m: Map, content_or_type, side: str = "positive"
) -> tuple[int | None, LinearFormBound]:
    """An integer ``M_LF`` with ``|minimum| <= M_LF`` for every cycle of the type, from ``|Λ| >= λ``.

    From ``ln(1 + y) <= y``: ``|Λ| <= sum c_r |β_r| / M*`` (growth case), so
    ``M* <= sum c_r |β_r| / λ``; in the other case ``M* <= max |β_r| + sum
    c_r |β_r| / λ``. This uses only the linear-forms lower bound ``λ``, not
    ``Λ`` itself, which is what makes the counting argument uniform in ``k``.
    Returns ``(None, lf)`` when the minimum bound or the linear form does not
    apply, ``(0, lf)`` when no cycle of the type is possible on the side.

    Examples
    --------
    >>> import maps
    >>> M, lf = candidates_from_linear_form(maps.get("3x+1"), (13, 8))
    >>> len(str(M))
    16
    """
    content = resolve_content(m, content_or_type)
    st = _setup(m, content, side)
    lf = _linear_form_bound(m.divisor, tuple(m.branches), content)
    if not st.applies or not lf.applies:
        return None, lf
    if not st.S or st.D == 0 or (st.D > 0) != st.growth:
        return 0, lf
    tot = sum(Fraction(abs(b) * c, a) for a, b, c in st.S)
    with _ivprec(128) as iv:
        lam_inv = iv.exp(-(iv.mpf(lf.log_lower.numerator) / lf.log_lower.denominator))
        val = (iv.mpf(tot.numerator) / tot.denominator) * lam_inv
        if not st.growth:
            val += iv.mpf(st.beta_max.numerator) / st.beta_max.denominator
        hi = _iv_to_interval(val).hi
    return math.floor(hi), lf


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


def largest_bound_up_to(m: Map, K: int, side: str = "positive") -> LargestBound:
    """The largest proved bound on a cycle minimum over all types of length ``1..K``.

    Every integer cycle on ``side`` of length ``<= K`` has ``|minimum| <=``
    the returned ``integer``: the range a census must scan.

    For maps whose residue-0 branch is ``n/d`` with ``d = 2`` (``ax+b`` and
    undivided forms) the best type of each length is known in closed form
    (the largest ``x`` with ``a^x < 2^k`` on the growing side, the smallest
    ``x`` with ``a^x > 2^k`` on the other: ``M*`` is monotone in ``x``), so
    the work is one float evaluation per length (vectorised) plus a few exact
    confirmations; ``K = 100000`` takes well under a second. Otherwise every
    content of every length is prefiltered (refused above 5 million contents).

    Parameters
    ----------
    m : Map
    K : int
        Largest length, ``>= 1``.
    side : {"positive", "negative"}

    Returns
    -------
    LargestBound

    Examples
    --------
    >>> import maps
    >>> lb = largest_bound_up_to(maps.get("3x+1"), 100)
    >>> lb.integer, lb.length, lb.odd
    (1192, 65, 41)
    >>> largest_bound_up_to(maps.get("mod3-4x"), 3).applies
    False

    Notes
    -----
    Why the prefilter is safe: see ``_PREFILTER_METHOD`` in the source (also
    in ``LargestBound.method``). The float value of ``Λ`` is computed with an
    explicit error budget, ``M_hi`` is a rigorous upper bound of ``M*``
    whenever ``|Λ_float| > err``, and a type is discarded only when
    ``M_hi < best + 1`` for a ``best`` that has been confirmed exactly.
    """
    if isinstance(K, bool) or not isinstance(K, int) or K < 1:
        raise InputError(f"the largest length K must be an integer >= 1, got {K!r}")
    return _largest(m, 1, K, side)


def bound_for_length(m: Map, k: int, side: str = "positive") -> LargestBound:
    """The largest proved minimum bound over the types of one length ``k``.

    >>> import maps
    >>> b = bound_for_length(maps.get("3x+1"), 13)
    >>> b.integer, b.odd
    (11, 8)
    """
    if isinstance(k, bool) or not isinstance(k, int) or k < 1:
        raise InputError(f"the length k must be an integer >= 1, got {k!r}")
    return _largest(m, k, k, side)


def _halving_two_branch(m: Map) -> bool:
    return (
        m.divisor == 2
        and tuple(m.branches[0]) == (1, 0)
        and m.branches[1].multiplier > 0
        and m.branches[1].offset != 0
    )


def _largest(m: Map, k_lo: int, k_hi: int, side: str) -> LargestBound:
    if side not in SIDES:
        raise InputError(f"side must be 'positive' or 'negative', got {side!r}")
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
            if growth:  # largest x with a^x < 2^k
                x = int(math.floor(q[i])) + 1
                while x >= 0 and a**x >= 2**k:
                    x -= 1
            else:  # smallest x with a^x > 2^k
                x = max(int(math.floor(q[i])) - 1, 0)
                while a**x <= 2**k:
                    x += 1
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
