"""Continued fractions of logarithms, their convergents, and the simplest fraction in an interval.

Inside
------
- :func:`continued_fraction_log` -- partial quotients of ``log_d a``, each one
  certified (interval arithmetic, precision raised until it is decided).
- :func:`convergents`, :func:`semiconvergents` -- the convergents ``p_n/q_n``
  and the intermediate fractions between them (:class:`Approximant`).
- :func:`simplest_fraction` -- the fraction with least denominator in an
  interval given by a position oracle (batched Stern-Brocot descent).

References
----------
.. [1] A. Ya. Khinchin, *Continued Fractions* (1935; Dover 1997): convergents,
   intermediate fractions and best one-sided approximations.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass
from fractions import Fraction

from .errors import InputError
from .intervals import _MAX_PREC, _coprime_base, _exponents, _Precision

__all__ = [
    "continued_fraction_log",
    "convergents",
    "Approximant",
    "semiconvergents",
    "simplest_fraction",
    "best_approximation_bound",
]


# A run of equal Stern-Brocot turns longer than this means an empty interval.
_MAX_RUN = 1 << 4096


# --------------------------------------------------------------------------
# continued fractions
# --------------------------------------------------------------------------
def _cf_of_fraction(q: Fraction) -> list[int]:
    """The continued fraction of a rational (sympy's, exact; last term > 1 unless it is the only one)."""
    from sympy import Rational, continued_fraction

    return [int(a) for a in continued_fraction(Rational(q.numerator, q.denominator))]


def _common_cf(lo: Fraction, hi: Fraction, limit: int) -> list[int]:
    """Partial quotients shared by every real in ``[lo, hi]`` (at most ``limit``)."""
    out: list[int] = []
    while len(out) < limit:
        a = lo.numerator // lo.denominator
        if hi.numerator // hi.denominator != a or lo == a:
            break
        out.append(a)
        lo, hi = 1 / (hi - a), 1 / (lo - a)
    return out


def _rational_log(a: Fraction, base: int) -> Fraction | None:
    """``log_base a`` when it is rational (``a^q = base^p``), else None (exact)."""
    nums = [a.numerator, a.denominator, base]
    cb = _coprime_base(nums)
    va = [u - v for u, v in zip(_exponents(a.numerator, cb), _exponents(a.denominator, cb))]
    vb = _exponents(base, cb)
    # va must be r * vb for one rational r
    r = None
    for x, y in zip(va, vb):
        if y == 0:
            if x != 0:
                return None
            continue
        ratio = Fraction(x, y)
        if r is None:
            r = ratio
        elif r != ratio:
            return None
    return r if r is not None else Fraction(0)


def continued_fraction_log(
    a: int | Fraction, base: int = 2, terms: int = 20, *, _tracker: _Precision | None = None
) -> tuple[int, ...]:
    """The first ``terms`` partial quotients of ``log_base(a)``, each one certain.

    ``ln a / ln base`` is enclosed in an mpmath interval; a partial quotient
    is kept only when every real of the interval has it, and the precision is
    doubled until ``terms`` of them are certain. When ``log_base a`` is
    rational (``a^q = base^p``, decided exactly) its finite expansion is
    returned, which may be shorter than ``terms``.

    Parameters
    ----------
    a : int or Fraction
        Positive.
    base : int
        At least 2.
    terms : int
        How many partial quotients.

    Returns
    -------
    tuple of int
        ``(a_0, a_1, ...)`` with ``log_base a = a_0 + 1/(a_1 + 1/(a_2 + ...))``.

    Examples
    --------
    >>> continued_fraction_log(3, terms=15)      # OEIS A028507
    (1, 1, 1, 2, 2, 3, 1, 5, 2, 23, 2, 2, 1, 1, 55)
    >>> continued_fraction_log(8, 4)              # log_4 8 = 3/2
    (1, 2)

    References
    ----------
    Khinchin, *Continued Fractions* (see module docstring).
    """
    a = Fraction(a)
    if a <= 0:
        raise InputError(f"the logarithm needs a positive argument, got {a}")
    if isinstance(base, bool) or not isinstance(base, int) or base < 2:
        raise InputError(f"the base of the logarithm must be an integer >= 2, got {base!r}")
    if terms < 1:
        raise InputError(f"terms must be at least 1, got {terms}")
    exact = _rational_log(a, base)
    if exact is not None:
        return tuple(_cf_of_fraction(exact)[:terms])
    from mpmath import iv, libmp

    prec = 64 + 8 * terms
    while True:
        if _tracker is not None:
            _tracker.max_bits = max(_tracker.max_bits, prec)
        old = iv.prec
        iv.prec = prec
        try:
            x = iv.log(iv.mpf(a.numerator) / iv.mpf(a.denominator)) / iv.log(iv.mpf(base))
            lo, hi = x._mpi_
        finally:
            iv.prec = old
        lo_q = Fraction(*map(int, libmp.to_rational(lo)))
        hi_q = Fraction(*map(int, libmp.to_rational(hi)))
        got = _common_cf(lo_q, hi_q, terms)
        if len(got) >= terms:
            return tuple(got)
        prec *= 2
        if prec > _MAX_PREC:  # pragma: no cover
            raise ArithmeticError("precision limit reached computing a continued fraction")


def convergents(terms: Sequence[int]) -> list[tuple[int, int]]:
    """The convergents ``p_n / q_n`` of ``[a_0; a_1, ...]`` as ``(p, q)`` pairs.

    Parameters
    ----------
    terms : sequence of int
        The partial quotients ``[a_0; a_1, ...]``.

    Returns
    -------
    list of (int, int)
        ``(p_n, q_n)`` for ``n = 0, 1, ...``, in lowest terms.

    Examples
    --------
    >>> convergents([1, 1, 1, 2, 2])
    [(1, 1), (2, 1), (3, 2), (8, 5), (19, 12)]

    References
    ----------
    Khinchin 1935, chapter I (the recurrences ``p_n = a_n p_{n-1} + p_{n-2}``).
    """
    out = []
    p0, q0, p1, q1 = 0, 1, 1, 0  # p_{-2}, q_{-2}, p_{-1}, q_{-1}
    for t in terms:
        p0, q0, p1, q1 = p1, q1, t * p1 + p0, t * q1 + q0
        out.append((p1, q1))
    return out


@dataclass(frozen=True)
class Approximant:
    """A convergent or an intermediate fraction (semiconvergent) of a continued fraction.

    ``p/q = (p_{n-2} + j p_{n-1}) / (q_{n-2} + j q_{n-1})`` with
    ``1 <= j <= a_n``; ``j = a_n`` is the convergent ``p_n/q_n``. These are
    exactly the fractions on the number's Stern-Brocot path. For ``n`` even
    they lie below the number, for ``n`` odd above it.
    """

    p: int
    q: int
    n: int
    j: int
    partial_quotient: int

    @property
    def is_convergent(self) -> bool:
        return self.j == self.partial_quotient

    @property
    def kind(self) -> str:
        return "convergent" if self.is_convergent else "semiconvergent"

    @property
    def side(self) -> str:
        """``"below"`` or ``"above"`` the number (for an irrational number)."""
        return "below" if self.n % 2 == 0 else "above"

    def describe(self) -> str:
        if self.is_convergent:
            return f"convergent p_{self.n}/q_{self.n}"
        return (
            f"semiconvergent (p_{self.n - 2} + {self.j} p_{self.n - 1})/"
            f"(q_{self.n - 2} + {self.j} q_{self.n - 1}), j = {self.j} of a_{self.n} = "
            f"{self.partial_quotient}"
        )

    def to_dict(self) -> dict:
        return {
            "p": self.p,
            "q": self.q,
            "kind": self.kind,
            "n": self.n,
            "j": self.j,
            "partial_quotient": self.partial_quotient,
            "side": self.side,
            "description": self.describe(),
        }


def semiconvergents(terms: Sequence[int]) -> list[Approximant]:
    """All convergents and intermediate fractions, by increasing denominator.

    Parameters
    ----------
    terms : sequence of int
        ``[a_0; a_1, ...]``.

    Returns
    -------
    list of Approximant

    Examples
    --------
    >>> [(s.p, s.q, s.kind) for s in semiconvergents([1, 1, 1, 2])]
    [(1, 1, 'convergent'), (2, 1, 'convergent'), (3, 2, 'convergent'), (5, 3, 'semiconvergent'), (8, 5, 'convergent')]

    References
    ----------
    Khinchin 1935, chapter II (intermediate fractions, best approximations).
    """
    out = []
    p0, q0, p1, q1 = 0, 1, 1, 0
    for n, t in enumerate(terms):
        for j in range(1, t + 1):
            out.append(Approximant(p0 + j * p1, q0 + j * q1, n, j, t))
        p0, q0, p1, q1 = p1, q1, t * p1 + p0, t * q1 + q0
    return out


# --------------------------------------------------------------------------
# simplest fraction in an interval
# --------------------------------------------------------------------------
def _largest(pred: Callable[[int], bool]) -> int:
    """The largest ``j >= 1`` with ``pred(j)``, given ``pred(1)`` and monotone (true, then false)."""
    lo, hi = 1, 2
    while pred(hi):
        lo, hi = hi, hi * 2
        if hi > _MAX_RUN:
            raise InputError(
                "simplest_fraction: the interval is empty (or the oracle is inconsistent)"
            )
    while hi - lo > 1:
        mid = (lo + hi) // 2
        if pred(mid):
            lo = mid
        else:
            hi = mid
    return lo


def _run_test(
    where: Callable[[int, int], int], start: tuple[int, int], step: tuple[int, int], side: int
) -> Callable[[int], bool]:
    """``j -> where(start + j * step) == side`` (is ``start + j step`` still outside on ``side``?)."""
    (cp, cq), (dp, dq) = start, step
    return lambda j: where(cp + j * dp, cq + j * dq) == side


def simplest_fraction(where: Callable[[int, int], int]) -> tuple[int, int]:
    """The fraction ``p/q >= 0`` with least ``q`` (and least ``p``) in an interval.

    The interval is given by an oracle: ``where(p, q)`` is ``-1`` when
    ``p/q`` lies below it, ``0`` inside, ``+1`` above. It must be a
    non-empty interval (convex) of non-negative reals, possibly unbounded
    above; the oracle is called with ``q = 0`` never and with ``p = 0`` once. The search is a
    Stern-Brocot descent in which each run of equal turns is done at once by
    exponential and binary search, so it costs ``O(sum log a_i)`` oracle
    calls over the partial quotients ``a_i`` met on the way.

    Parameters
    ----------
    where : callable (p, q) -> int
        ``-1`` when ``p/q`` lies below the interval, ``0`` inside, ``+1`` above.

    Returns
    -------
    tuple of int
        ``(p, q)``: the simplest fraction in the interval.

    Examples
    --------
    >>> simplest_fraction(lambda p, q: -1 if p <= 3 * q else (1 if 7 * p >= 22 * q else 0))
    (25, 8)
    >>> q = Fraction(355, 113)
    >>> simplest_fraction(lambda p, r: (Fraction(p, r) > q) - (Fraction(p, r) < q))
    (355, 113)

    References
    ----------
    The Stern-Brocot tree; Graham, Knuth and Patashnik, *Concrete
    Mathematics*, section 4.5.
    """
    w0 = where(0, 1)
    if w0 == 0:
        return 0, 1
    if w0 > 0:
        raise InputError("simplest_fraction: the interval lies below 0")
    lp, lq, rp, rq = 0, 1, 1, 0
    while True:
        p, q = lp + rp, lq + rq
        w = where(p, q)
        if w == 0:
            return p, q
        if w < 0:  # move the left end towards the right one
            j = _largest(_run_test(where, (lp, lq), (rp, rq), -1))
            lp, lq = lp + j * rp, lq + j * rq
        else:  # move the right end towards the left one
            j = _largest(_run_test(where, (rp, rq), (lp, lq), 1))
            rp, rq = rp + j * lp, rq + j * lq


# --------------------------------------------------------------------------
# best approximations: |k ln d - x ln a| over a finite range of x
# --------------------------------------------------------------------------
def best_approximation_bound(a: int, d: int, max_x: int) -> tuple[Fraction, int, int]:
    """A proved lower bound on ``|k ln d - x ln a|`` for all integers ``k`` and ``1 <= x <= max_x``.

    With ``θ = log_d a`` irrational, ``|k ln d - x ln a| = ln d |k - x θ|``,
    and over ``1 <= x <= X`` the least ``|x θ - k|`` is attained at the
    convergent ``p_n/q_n`` with the largest ``q_n <= X`` (the convergents are
    exactly the best approximations of the second kind: Lagrange, Legendre;
    Khinchin, Theorems 16 and 17). So the bound rests on the certified
    continued fraction alone, with no recalled constant; it is then evaluated
    in interval arithmetic and its lower end point returned.

    Parameters
    ----------
    a, d : int
        ``a >= 2``, ``d >= 2``, ``log_d a`` irrational.
    max_x : int
        ``X >= 1``.

    Returns
    -------
    (Fraction, int, int)
        ``(lower, k, x)``: ``|k ln d - x ln a| >= lower`` for every ``k`` and
        every ``1 <= x <= max_x``, and the pair attaining the minimum.

    Examples
    --------
    >>> lo, k, x = best_approximation_bound(3, 2, 10**6)
    >>> (k, x), round(float(lo) * 1e8, 3)       # 6.451e-8, no constant from memory
    ((301994, 190537), 6.451)
    >>> best_approximation_bound(3, 2, 5)[1:]   # 8/5 is a convergent of log_2 3
    (8, 5)
    >>> best_approximation_bound(3, 2, 1)[1:]   # |2 - log_2 3| < |1 - log_2 3|
    (2, 1)

    References
    ----------
    Khinchin, *Continued Fractions* (module docstring): best approximations of
    the second kind are the convergents.
    """
    from mpmath import iv, libmp

    if a < 2 or d < 2 or max_x < 1:
        raise InputError(
            f"need a >= 2, d >= 2 and max_x >= 1, got a = {a}, d = {d}, max_x = {max_x}"
        )
    if _rational_log(Fraction(a), d) is not None:
        raise InputError(f"log_{d} {a} is rational: |k ln d - x ln a| reaches 0")
    terms = 8
    while True:
        cf = continued_fraction_log(a, d, terms)
        conv = convergents(cf)
        if conv[-1][1] > max_x:
            break
        terms *= 2
    # The last convergent with q <= X: when a_1 = 1, q_0 = q_1 = 1 and the
    # second one (p_1/q_1) is the better approximation, so ties go to the later.
    k, x = [pq for pq in conv if pq[1] <= max_x][-1]
    prec = 64 + 2 * (k.bit_length() + x.bit_length())
    while True:
        old = iv.prec
        iv.prec = prec
        try:
            lam = k * iv.log(iv.mpf(d)) - x * iv.log(iv.mpf(a))
            lo, hi = lam._mpi_
        finally:
            iv.prec = old
        lo_q = Fraction(*map(int, libmp.to_rational(lo)))
        hi_q = Fraction(*map(int, libmp.to_rational(hi)))
        if lo_q > 0 or hi_q < 0:
            return min(abs(lo_q), abs(hi_q)), k, x
        prec *= 2
