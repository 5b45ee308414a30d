"""Certified enclosures: rational intervals, logarithms and the sign of log-linear forms.

Inside
------
- :class:`Interval` -- a closed interval with rational end points.
- :func:`log_form` -- ``Λ = k ln d - ln A`` (``A = prod a_r^{c_r}``) as a
  certified interval (``mpmath.iv``, precision raised until it is narrow).
- :func:`resolve_content` -- a type ``(k, x)`` or a content to a content tuple.
- :func:`log_sign` -- the exact sign of ``sum_i e_i ln q_i`` for rationals
  ``q_i`` (interval arithmetic with rising precision; equality decided
  exactly over a coprime base).

Everything here is exact or an enclosure that is certain to contain the
true value; floats only choose working precisions.

References
----------
.. [1] F. Johansson et al., mpmath (interval arithmetic ``mpmath.iv``).
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from contextlib import contextmanager
from dataclasses import dataclass
from fractions import Fraction
from functools import lru_cache

import gmpy2

from cyclewright.maps import Map, as_map

from .errors import InputError
from .necklaces import normalize_content, type_content

__all__ = [
    "Interval",
    "resolve_content",
    "log_form",
]


# Below this many bits a sign is decided with plain integers.
_EXACT_BITS = 1 << 15
# Above this precision we give up (never reached in practice; see _log_sign).
_MAX_PREC = 1 << 20


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
    rest, e2 = gmpy2.remove(den, 2)
    rest, e5 = gmpy2.remove(rest, 5)
    if rest != 1:  # pragma: no cover - not a decimal fraction
        return str(float(q))
    j = max(int(e2), int(e5))  # den divides 10^j, and no smaller power of ten
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
def resolve_content(m: Map | str, content_or_type) -> tuple[int, ...]:
    """Turn a type or a content into a content tuple ``(c_0, ..., c_{d-1})``.

    For ``d = 2`` a pair ``(k, x)`` is the *type* (length, odd steps); a
    content for ``d = 2`` is given as a mapping ``{0: c_0, 1: c_1}``. For
    ``d > 2`` a sequence of ``d`` counts or a mapping is a content.

    >>> from cyclewright import maps
    >>> resolve_content(maps.get("3x+1"), (13, 8))
    (5, 8)
    >>> resolve_content(maps.get("3x+1"), {0: 5, 1: 8})
    (5, 8)
    """
    m = as_map(m)
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
def log_form(m: Map | str, content_or_type, *, rel_bits: int = 64) -> Interval:
    """``Λ = k ln d - sum_r c_r ln a_r`` (that is ``ln(d^k / A)``) as a certified interval.

    Uses ``mpmath.iv`` and raises the working precision until the interval's
    relative width is below ``2^-rel_bits`` (its sign is that of ``D = d^k - A``,
    which is checked). Requires every relevant multiplier to be positive.

    Parameters
    ----------
    m : Map or str
        The map, or its name, alias or ``ax+b`` shorthand.
    content_or_type : (k, x) for two-branch maps, or a content
        See :func:`resolve_content`.
    rel_bits : int
        Relative width wanted, ``2^-rel_bits``.

    Returns
    -------
    Interval
        Exact rational end points enclosing ``Λ`` (``certified``).

    Examples
    --------
    >>> from cyclewright import maps
    >>> print(log_form(maps.get("3x+1"), (13, 8)))
    [0.222015037934, 0.222015037935]

    References
    ----------
    mpmath interval arithmetic (``mpmath.iv``).
    """
    m = as_map(m)
    content = resolve_content(m, content_or_type)
    return _log_form(m.divisor, tuple(m.branches), content, rel_bits)


@lru_cache(maxsize=4096)
def _log_form(d: int, branches: tuple, content: tuple[int, ...], rel_bits: int) -> Interval:
    # Λ = k ln d - ln |A|: with a negative multiplier A may be negative, and |A| is
    # what the size arguments need (the sign of A only decides the sides)
    k = sum(content)
    A = 1
    for (a, _b), c in zip(branches, content):
        if c:
            if a == 0:
                raise InputError("ln |A| needs non-zero multipliers on the residues used")
            A *= abs(a) ** c
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
                if c and abs(a) != 1:
                    lam -= c * iv.log(iv.mpf(abs(a)))
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


# --------------------------------------------------------------------------
# exact arithmetic helpers: coprime base, sign of a log-linear form
# --------------------------------------------------------------------------
def _coprime_base(numbers: Sequence[int]) -> list[int]:
    """Pairwise coprime integers > 1 over which every number factors.

    Refinement by gcds (no factoring): replace two elements ``u, v`` with a
    common factor ``g`` by ``g, u/g, v/g`` until no two share a factor.
    Kept by hand on purpose: a library factorisation (sympy.factorint) would
    work too, but costs a factoring of numbers that may be large, while the
    sign of the log-linear form needs only a coprime base.

    >>> sorted(_coprime_base([12, 18]))
    [2, 3]
    """
    base: list[int] = []
    stack = [abs(n) for n in numbers if abs(n) > 1]
    while stack:
        u = stack.pop()
        if u == 1:
            continue
        for i, v in enumerate(base):
            g = math.gcd(u, v)
            if g > 1:
                base.pop(i)
                stack.extend(t for t in (g, v // g, u // g) if t > 1)
                break
        else:
            base.append(u)
    return base


def _valuation(n: int, b: int) -> int:
    """The exponent of ``b > 1`` in ``n != 0`` (gmpy2, exact)."""
    return int(gmpy2.remove(n, b)[1])


def _exponents(n: int, base: Sequence[int]) -> list[int]:
    """Exponents of ``n`` over a coprime base (``n`` must factor over it)."""
    out = []
    rest = n
    for b in base:
        v = _valuation(rest, b)
        rest //= b**v
        out.append(v)
    if rest != 1:  # pragma: no cover - the base is built from n
        raise AssertionError(f"{n} does not factor over the coprime base")
    return out


def _is_one(terms: Sequence[tuple[int, Fraction]]) -> bool:
    """Exactly whether ``prod g^n == 1`` (valuations over a coprime base)."""
    nums = []
    for _, g in terms:
        nums += [g.numerator, g.denominator]
    base = _coprime_base(nums)
    total = [0] * len(base)
    for n, g in terms:
        for i, (u, v) in enumerate(
            zip(_exponents(g.numerator, base), _exponents(g.denominator, base))
        ):
            total[i] += n * (u - v)
    return not any(total)


class _Precision:
    """Tracks the largest working precision used (for the report)."""

    def __init__(self) -> None:
        self.max_bits = 0


def _iv_log_sum(terms: Sequence[tuple[int, Fraction]], prec: int):
    """An interval enclosing ``sum n ln g`` at ``prec`` bits (mpmath ``iv``)."""
    from mpmath import iv

    old = iv.prec
    iv.prec = prec
    try:
        s = iv.mpf(0)
        for n, g in terms:
            s += iv.mpf(n) * iv.log(iv.mpf(g.numerator) / iv.mpf(g.denominator))
        return s._mpi_
    finally:
        iv.prec = old


def _log_sign(terms: Sequence[tuple[int, Fraction]], tracker: _Precision | None = None) -> int:
    """The exact sign of ``sum_i n_i ln g_i`` (``g_i`` positive rationals).

    Small cases: compare two integers. Otherwise an mpmath interval enclosure
    with precision doubled until it excludes 0; equality is decided exactly
    by :func:`_is_one` (it is the only case precision cannot decide).

    >>> _log_sign([(2, Fraction(2)), (-1, Fraction(4))])
    0
    >>> _log_sign([(10**12, Fraction(2)), (-630929753571, Fraction(3))])
    1
    """
    from mpmath import libmp

    terms = [(int(n), Fraction(g)) for n, g in terms if n and g != 1]
    if not terms:
        return 0
    bits = sum(abs(n) * (g.numerator.bit_length() + g.denominator.bit_length()) for n, g in terms)
    if bits <= _EXACT_BITS:
        top = bottom = 1
        for n, g in terms:
            p, q = g.numerator, g.denominator
            if n > 0:
                top *= p**n
                bottom *= q**n
            else:
                top *= q ** (-n)
                bottom *= p ** (-n)
        return (top > bottom) - (top < bottom)
    big = max(abs(n) for n, _ in terms).bit_length()
    prec = 64 + 2 * big
    checked_equality = False
    while prec <= _MAX_PREC:
        if tracker is not None:
            tracker.max_bits = max(tracker.max_bits, prec)
        lo, hi = _iv_log_sum(terms, prec)
        if libmp.mpf_sign(lo) > 0:
            return 1
        if libmp.mpf_sign(hi) < 0:
            return -1
        if not checked_equality:
            if _is_one(terms):
                return 0
            checked_equality = True
        prec *= 2
    raise ArithmeticError(  # pragma: no cover - would need |form| < 2^-1000000
        "could not decide the sign of a linear form in logarithms"
    )
