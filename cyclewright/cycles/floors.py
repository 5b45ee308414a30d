"""Floors: the least length an unknown cycle could have, given a verified range.

Inside
------
- :func:`floor` -- :class:`Floor`: if no cycle on one side of a two-branch
  map has its minimum at or below ``N`` (apart from the known ones), the least
  length ``k`` and odd-step count ``x`` any further cycle could have, which
  convergent or semiconvergent of ``log_2 a`` gives it, and the next types
  that remain possible.

The bound (proved, elementary)
------------------------------
Take a two-branch map (``d = 2``) with one *halving* branch ``(1, b_c)``
(``n -> (n + b_c)/2``) and one *multiplying* branch ``(a, b_e)``, ``a >= 2``
(``n -> (a n + b_e)/2``); every ``ax+b`` map is of this kind. Along a cycle of
positive integers ``n_1, ..., n_k`` the step ratios multiply to 1::

    2^k = prod_i g_{r_i}(n_i),   g_r(n) = a_r + b_r / n   (a_r = 1 or a).

If every element is at least ``M`` (here ``M = N + 1``), each factor lies
between its limit ``a_r`` (never attained when ``b_r != 0``) and
``a_r + b_r/M``. With ``lo_r <= hi_r`` those two values, a cycle with
``x`` multiplying steps among ``k`` satisfies::

    lo_c^(k-x) lo_e^x  <=  2^k  <=  hi_c^(k-x) hi_e^x,

strictly on the left when some offset is positive and strictly on the right
when some offset is negative. For ``3x+1`` (``b_c = 0``, ``b_e = 1``) this is
``3^x < 2^k <= (3 + 1/M)^x``: ``k/x`` lies in ``(log2 3, log2(3 + 1/M)]``.
Both conditions are monotone in ``k/x`` (as long as ``hi_c < 2``), so the
possible types are the lattice points of a thin cone around the line
``k = x log2 a``. The least ``k`` and the least ``x`` are attained together by
the simplest fraction of that interval, which lies on the Stern-Brocot path
of ``log2 a``: a convergent or a semiconvergent. That is Eliahou's method
(1993). The negative side is the positive side of the conjugate map
``n -> -T(-n)`` (same types). Offsets of mixed signs are fine here (the
interval then contains ``log2 a``); the bound needs ``N`` large enough that
``hi_c < 2`` and every ``lo_r > 0``, and the function says so otherwise.

Every decision ``2^k`` versus ``lo_c^(k-x) lo_e^x`` is exact: plain integers
when small, otherwise mpmath interval arithmetic with precision doubled until
the sign is certain, and an exact test (valuations over a coprime base) for
the case of equality, which no amount of precision could decide.

The result is labelled ``proved``: it is a theorem, conditional on the stated
verification (that no other cycle has its minimum at or below ``N``).

References
----------
.. [1] S. Eliahou, "The 3x+1 problem: new lower bounds on nontrivial cycle
   lengths", Discrete Mathematics 118 (1993) 45-56.
.. [2] J. C. Lagarias, "The 3x+1 problem and its generalizations", American
   Mathematical Monthly 92 (1985) 3-23.
.. [3] A. Ya. Khinchin, *Continued Fractions* (1935; Dover 1997): convergents,
   intermediate fractions and best one-sided approximations.
"""

from __future__ import annotations

import heapq
from dataclasses import dataclass
from fractions import Fraction

from cyclewright.maps import Map, as_map

from .continued_fractions import (
    Approximant,
    _rational_log,
    continued_fraction_log,
    convergents,
    semiconvergents,
    simplest_fraction,
)
from .errors import InputError
from .intervals import _log_sign, _Precision
from .labels import EXACT, PROVED, labels_field
from .limits import (
    MAX_NEXT_TYPES,
    MAX_START_DIGITS,
    check_range,
    int_digits,
)
from .presentation import Presentable, Table
from .sides import DEFAULT_SIDE, PerSide, Side, on_sides, parse_side

__all__ = [
    "Floor",
    "floor",
    "floor_table",
    "DEFAULT_NEXT_TYPES",
]

#: How many further possible types :func:`floor` lists by default (``--next``, study ``next``).
DEFAULT_NEXT_TYPES = 5


# --------------------------------------------------------------------------
# the floor
# --------------------------------------------------------------------------
class _Cone:
    """The conditions ``lo_c^(k-x) lo_e^x <(=) 2^k <(=) hi_c^(k-x) hi_e^x`` on a type.

    ``x`` counts the multiplying steps. Positions are relative to the
    interval of ``k/x`` (and ``k >= x``).
    """

    def __init__(self, a: int, b_c: int, b_e: int, M: int, tracker: _Precision) -> None:
        self.a, self.b_c, self.b_e, self.M = a, b_c, b_e, M
        gc = Fraction(M + b_c, M)
        ge = Fraction(a * M + b_e, M)
        self.lo_c, self.hi_c = min(Fraction(1), gc), max(Fraction(1), gc)
        self.lo_e, self.hi_e = min(Fraction(a), ge), max(Fraction(a), ge)
        self.tracker = tracker
        self._cache: dict[tuple[str, int, int], int] = {}

    def _sign(self, which: str, k: int, x: int) -> int:
        key = (which, k, x)
        s = self._cache.get(key)
        if s is None:
            gc, ge = (self.lo_c, self.lo_e) if which == "lo" else (self.hi_c, self.hi_e)
            s = _log_sign([(k, Fraction(2)), (-(k - x), gc), (-x, ge)], self.tracker)
            self._cache[key] = s
        return s

    def strict_lo(self, k: int, x: int) -> bool:
        return (self.b_c > 0 and k > x) or (self.b_e > 0 and x > 0)

    def strict_hi(self, k: int, x: int) -> bool:
        return (self.b_c < 0 and k > x) or (self.b_e < 0 and x > 0)

    def lo_ok(self, k: int, x: int) -> bool:
        s = self._sign("lo", k, x)
        return s > 0 or (s == 0 and not self.strict_lo(k, x))

    def hi_ok(self, k: int, x: int) -> bool:
        s = self._sign("hi", k, x)
        return s < 0 or (s == 0 and not self.strict_hi(k, x))

    def where(self, k: int, x: int) -> int:
        if x == 0:
            return 1
        if k < x or not self.lo_ok(k, x):
            return -1
        if not self.hi_ok(k, x):
            return 1
        return 0

    def touches_inf(self, k: int, x: int) -> bool:
        """True when ``k/x`` (inside) is the least point of the interval."""
        return k == x or self._sign("lo", k, x) == 0

    def touches_sup(self, k: int, x: int) -> bool:
        """True when ``k/x`` (inside) is the largest point of the interval."""
        return self._sign("hi", k, x) == 0

    def endpoint_text(self, which: str) -> str:
        gc, ge = (self.lo_c, self.lo_e) if which == "lo" else (self.hi_c, self.hi_e)
        if gc == 1:
            return f"log2({ge})"
        return f"log({ge / gc})/log({2 / gc})"

    def endpoint_value(self, which: str, digits: int = 25) -> str:
        """The endpoint ``ln(g_e/g_c) / ln(2/g_c)`` as a decimal string (display only)."""
        import mpmath

        gc, ge = (self.lo_c, self.lo_e) if which == "lo" else (self.hi_c, self.hi_e)
        u, v = ge / gc, 2 / gc
        with mpmath.workdps(digits + 10):
            val = mpmath.log(mpmath.mpf(u.numerator) / u.denominator) / mpmath.log(
                mpmath.mpf(v.numerator) / v.denominator
            )
            return mpmath.nstr(val, digits)


def _lattice_points(cone: _Cone, first: tuple[int, int], count: int) -> list[tuple[int, int]]:
    """The first ``count`` lattice points ``(k, x)`` of the cone, by increasing ``k`` (then ``x``).

    Every reduced fraction of the interval is the simplest fraction of exactly
    one cell of the recursive split of the interval at simplest fractions, and
    the simplest fraction of a cell has the least numerator in it; so a heap
    of cells keyed by their simplest fraction yields the reduced fractions in
    order of numerator. Non-reduced types ``(j k, j x)`` are merged in.
    """
    out: list[tuple[int, int]] = []
    # heap entries: (k, x, tag, payload); tag 0 = reduced fraction of a cell
    # with bounds (L, U) (None = the interval's own end), tag 1 = multiple.
    heap: list = [(first[0], first[1], 0, (None, None))]
    while heap and len(out) < count:
        k, x, tag, payload = heapq.heappop(heap)
        out.append((k, x))
        if tag == 1:
            j, (p, q) = payload
            heapq.heappush(heap, ((j + 1) * p, (j + 1) * q, 1, (j + 1, (p, q))))
            continue
        heapq.heappush(heap, (2 * k, 2 * x, 1, (2, (k, x))))
        L, U = payload
        s = (k, x)
        # left cell (L, s), right cell (s, U)
        for lower, upper in ((L, s), (s, U)):
            if lower is None and cone.touches_inf(*s):
                continue
            if upper is None and cone.touches_sup(*s):
                continue

            def where(p: int, q: int, lower=lower, upper=upper) -> int:
                if lower is not None and p * lower[1] <= lower[0] * q:
                    return -1
                if upper is not None and p * upper[1] >= upper[0] * q:
                    return 1
                return cone.where(p, q)

            cell = simplest_fraction(where)
            heapq.heappush(heap, (cell[0], cell[1], 0, (lower, upper)))
    return out


@dataclass(frozen=True)
class Floor(Presentable):
    """The least type ``(k, x)`` a further cycle could have (label ``proved``).

    Attributes
    ----------
    map : Map
        The map asked about.
    side : str
        ``"positive"`` or ``"negative"``.
    verified_to : int
        ``N``: the statement assumes no cycle on that side (other than the
        known ones) has its minimum (least ``|element|``) at or below ``N``.
    least_length : int or None
        ``k``: any further cycle has at least this many elements. None when
        the bound leaves no type at all (then no further cycle exists).
    odd_steps : int or None
        ``x``: the number of odd elements of a cycle of that least type; no
        further cycle has fewer odd elements (nor fewer even ones).
    multiplying_steps : int or None
        Steps through the multiplying branch (equal to ``odd_steps`` when
        that branch is residue 1, as for every ``ax+b``).
    multiplier : int
        ``a``; the central slope is ``log2 a``.
    multiplying_branch : int
        The residue of the multiplying branch.
    approximant : Approximant or None
        Which convergent or semiconvergent of ``log2 a`` is ``k / multiplying_steps``
        (None when ``log2 a`` is rational).
    continued_fraction : tuple of int
        The certified partial quotients of ``log2 a`` up to the answer.
    next_possible : tuple of (int, int)
        The next lattice points ``(k, odd_steps)`` allowed by the bound, by
        increasing ``k`` (non-reduced types such as ``(2k, 2x)`` included).
    interval : dict
        The interval left open for ``k / multiplying_steps``: exact endpoint
        expressions, closedness, and decimal values for display only.
    precision_bits : int
        The largest working precision used (bits).
    """

    map: Map
    side: str
    verified_to: int
    least_length: int | None
    odd_steps: int | None
    multiplying_steps: int | None
    multiplier: int
    multiplying_branch: int
    approximant: Approximant | None
    continued_fraction: tuple[int, ...]
    next_possible: tuple[tuple[int, int], ...]
    interval: dict
    precision_bits: int
    labels: dict = labels_field(
        repr=False,
        least_length=PROVED,
        odd_steps=PROVED,
        next_possible=PROVED,
        continued_fraction=EXACT,
    )

    @property
    def least_minimum(self) -> int:
        """``N + 1``: the least ``|minimum|`` a further cycle could have."""
        return self.verified_to + 1

    @property
    def possible(self) -> bool:
        """False when the bound rules out every further cycle on this side."""
        return self.least_length is not None

    @property
    def ratio(self) -> Fraction | None:
        """``k / multiplying_steps`` (reduced)."""
        if not self.possible:
            return None
        return Fraction(self.least_length, self.multiplying_steps)

    def allows(self, length: int, odd_steps: int) -> bool:
        """Whether the bound leaves the type ``(length, odd_steps)`` possible (exact).

        >>> from cyclewright import maps
        >>> f = floor(maps.get("3x+1"), 16, side="negative")
        >>> f.allows(11, 7), f.allows(12, 7)
        (True, False)
        """
        work = self.map if self.side == "positive" else self.map.conjugate()
        _, e, a, b_c, b_e = _shape(work)
        x = odd_steps if e == 1 else length - odd_steps
        if length < 1 or not 0 <= x <= length:
            return False
        return _Cone(a, b_c, b_e, self.verified_to + 1, _Precision()).where(length, x) == 0

    @property
    def condition(self) -> str:
        rng = (
            f"1..{self.verified_to}"
            if self.side == "positive"
            else f"-{self.verified_to}..-1 (least |element|)"
        )
        return (
            f"no cycle of {self.map.label} on the {self.side} side has its minimum in {rng} "
            f"other than the known ones"
        )

    @property
    def statement(self) -> str:
        head = f"{self.side} cycle of {self.map.label} whose minimum exceeds {self.verified_to} in absolute value"
        if not self.possible:
            return f"there is no {head}"
        return (
            f"every {head} has at least {self.least_length} elements, at least "
            f"{self.odd_steps} of them odd and {self.least_length - self.odd_steps} even"
        )

    def figures_table(self) -> Table:
        """The floor's quantities with their labels, one per row (the ``floor`` command's view)."""
        rows: list[tuple] = []
        if self.possible:
            terms = self.continued_fraction
            shown = ", ".join(str(t) for t in terms[1:25]) + (", ..." if len(terms) > 25 else "")
            cf = f"{terms[0]}; {shown}" if len(terms) > 1 else (str(terms[0]) if terms else "")
            iv = self.interval
            steps = "x" if self.multiplying_branch == 1 else "multiplying steps"
            rows = [
                ("least length k", self.least_length, PROVED.value),
                ("odd steps x", self.odd_steps, PROVED.value),
                (f"k / {steps}", str(self.ratio), EXACT.value),
                (
                    f"from log2({self.multiplier}) = [{cf}]",
                    self.approximant.describe() if self.approximant else "-",
                    EXACT.value,
                ),
                (
                    "interval for k/x",
                    f"{'[' if iv['lower_closed'] else '('}{iv['lower']}, "
                    f"{iv['upper']}{']' if iv['upper_closed'] else ')'}",
                    EXACT.value,
                ),
                ("max precision", f"{self.precision_bits} bits", "-"),
            ]
            rows += [
                ("next possible type (k, x)", f"({k}, {x})", PROVED.value)
                for k, x in self.next_possible
            ]
        return Table(
            f"{self.map.label}, {self.side} side, verified to N = {self.verified_to}",
            ("quantity", "value", "label"),
            tuple(rows),
            {},
            f"result (proved, given the condition): {self.statement}",
        )

    def to_dict(self) -> dict:
        return {
            "map": self.map.label,
            "map_key": self.map.key,
            "side": self.side,
            "verified_to": self.verified_to,
            "least_minimum": self.least_minimum,
            "possible": self.possible,
            "least_length": self.least_length,
            "odd_steps": self.odd_steps,
            "multiplying_steps": self.multiplying_steps,
            "multiplying_branch": self.multiplying_branch,
            "multiplier": self.multiplier,
            "ratio": self.ratio,
            "approximant": self.approximant.to_dict() if self.approximant else None,
            "continued_fraction": list(self.continued_fraction),
            "continued_fraction_of": f"log2({self.multiplier})",
            "next_possible": [{"length": k, "odd_steps": x} for k, x in self.next_possible],
            "interval": self.interval,
            "condition": self.condition,
            "statement": self.statement,
            "precision_bits": self.precision_bits,
            "method": "simplest fraction of the interval left by the bound on a cycle minimum "
            "(Eliahou 1993), exact/certified arithmetic",
            "labels": dict(self.labels),
        }

    def __repr__(self) -> str:
        head = f"Floor({self.map.label}, {self.side} side, verified to {self.verified_to}: "
        if not self.possible:
            return head + "no further cycle possible; proved)"
        how = (
            f", {self.approximant.describe()} of log2({self.multiplier})"
            if self.approximant
            else ""
        )
        return head + f"length >= {self.least_length}, odd steps {self.odd_steps}{how}; proved)"


def _shape(m: Map) -> tuple[int, int, int, int, int]:
    """``(c, e, a, b_c, b_e)``: halving residue, multiplying residue, multiplier, offsets."""
    if m.divisor != 2:
        raise InputError(
            f"the floor is for two-branch maps (divisor 2); {m.label} has divisor {m.divisor}"
        )
    (a0, b0), (a1, b1) = m.branches
    if a0 == 1 and a1 >= 2:
        return 0, 1, a1, b0, b1
    if a1 == 1 and a0 >= 2:
        return 1, 0, a0, b1, b0
    raise InputError(
        f"the floor needs one halving branch (multiplier 1) and one multiplying branch "
        f"(multiplier >= 2); {m.label} has multipliers {a0} and {a1}, so the bound does not apply"
    )


def floor_table(result: Floor | PerSide[Floor]) -> Table:
    """The least type of a further cycle, one row per side (and why the bound fails on a side).

    Parameters
    ----------
    result : Floor or PerSide of Floor
        What :func:`floor` returned (a :class:`PerSide` may carry problems).

    Returns
    -------
    Table

    Examples
    --------
    >>> t = floor_table(floor("3x+1", 2**40))
    >>> t.columns[:3], t.rows[0][:3]
    (('side', 'least length k', 'odd steps x'), ('positive', 17087915, 10781274))

    References
    ----------
    Eliahou 1993 (the method); see the module docstring.
    """
    floors = list(result) if isinstance(result, PerSide) else [result]
    problems = result.problems if isinstance(result, PerSide) else {}
    rows = []
    for f in floors:
        ap = f.approximant
        rows.append(
            (
                f.side,
                f.least_length,
                f.odd_steps,
                f"{ap.describe()}: {ap.p}/{ap.q}" if ap is not None else None,
                tuple(tuple(t) for t in f.next_possible),
                "" if f.possible else f.statement,
            )
        )
    rows += [(s, None, None, None, (), why) for s, why in problems.items()]
    N = floors[0].verified_to if floors else None
    return Table(
        "Least type of any further cycle",
        ("side", "least length k", "odd steps x", "from", "next possible (k, x)", "note"),
        tuple(rows),
        {
            "least length k": PROVED.value,
            "odd steps x": PROVED.value,
            "next possible (k, x)": PROVED.value,
        },
        "Conditional: assumes no cycle on that side has its minimum at or below the "
        f"verified bound{'' if N is None else f' N = {N}'} apart from the known ones.",
    )


def check_verified_to(n: int, what: str = "verified_to", *, minimum: int = 0) -> int:
    """``n`` if ``minimum`` .. 10^1000 - 1 (at most 1000 digits; liftable), else :class:`InputError`.

    The floor's work grows with the digits of N (continued fraction terms,
    precision). One wording for the API, the command line and study files.

    >>> check_verified_to(2**68)
    295147905179352825856
    >>> check_verified_to(10**5000)
    Traceback (most recent call last):
    ...
    cyclewright.cycles.errors.InputError: verified_to must be at most 10^1000-1, got 10^5000 (at most 1000 digits; verified ranges in practice are below 10^30)
    """
    check_range(n, what, minimum=minimum)
    if int_digits(n) > MAX_START_DIGITS:
        check_range(
            n,
            what,
            maximum=10**MAX_START_DIGITS - 1,
            why=f"at most {MAX_START_DIGITS} digits; verified ranges in practice are below 10^30",
            liftable=True,
        )
    return n


def floor(
    m: Map | str,
    verified_to: int,
    side: Side = DEFAULT_SIDE,
    *,
    next_types: int = DEFAULT_NEXT_TYPES,
) -> Floor | PerSide[Floor]:
    """The least length and odd-step count of any further cycle, given a verified range.

    If no cycle on ``side`` has its minimum (element of least absolute value)
    at or below ``verified_to`` in absolute value, apart from the known ones,
    every further cycle has all its elements of absolute value at least
    ``M = verified_to + 1``; the bound of the module docstring confines its
    type ``(k, x)`` to a thin cone around ``k = x log2 a``, and the simplest
    fraction of that cone gives the least ``k`` and the least ``x``.

    Parameters
    ----------
    m : Map
        A two-branch map with one halving branch (multiplier 1) and one
        multiplying branch (every ``ax+b`` map).
    verified_to : int
        ``N >= 0``.
    side : {"positive", "negative", "both"}
        The negative side is the positive side of ``m.conjugate()``; with
        ``"both"`` each side gets its own floor.
    next_types : int
        How many further possible types to list.

    Returns
    -------
    Floor or PerSide of Floor
        One :class:`Floor`; for ``side="both"`` a
        :class:`~cyclewright.cycles.sides.PerSide` with the floor of each side
        where the bound applies and, in ``problems``, why it does not elsewhere.

    Raises
    ------
    InputError
        Bad arguments, or a map/range for which the bound does not apply
        (the message says why and, where possible, which ``N`` would do).

    Examples
    --------
    >>> from cyclewright import maps
    >>> f = floor(maps.get("3x+1"), 2**40)                 # Eliahou 1993
    >>> f.least_length, f.odd_steps, f.approximant.kind
    (17087915, 10781274, 'convergent')
    >>> floor(maps.get("3x+1"), 0).least_length            # the cycle {1, 2}
    2
    >>> f = floor(maps.get("3x+1"), 16, side="negative")   # the cycle through -17
    >>> f.least_length, f.odd_steps
    (11, 7)
    >>> [(f.side, f.least_length) for f in floor("3x+1", 16, side="both")]
    [('positive', 8), ('negative', 11)]

    References
    ----------
    Eliahou 1993 (the method); see the module docstring.
    """
    m = as_map(m)
    parse_side(side)
    check_verified_to(verified_to)
    check_range(next_types, "next_types", minimum=0, maximum=MAX_NEXT_TYPES, liftable=True)
    return on_sides(side, lambda s: _floor(m, verified_to, s, next_types), tolerate=True)


def _floor(m: Map, verified_to: int, side: str, next_types: int) -> Floor:
    """The floor on one side (arguments checked by :func:`floor`)."""
    work = m if side == "positive" else m.conjugate()
    c, e, a, b_c, b_e = _shape(work)
    N = verified_to
    M = N + 1
    where_side = (
        "" if side == "positive" else f" (on the {side} side, the conjugate {work.formula()})"
    )
    if b_c == 0 and b_e == 0:
        raise InputError(
            f"{m.label}{where_side} has both offsets 0: its only cycle is {{0}}, there is nothing to bound"
        )
    if b_c > 0 and M <= b_c:
        raise InputError(
            f"the bound needs verified_to >= {b_c} for {m.label}{where_side}: below that the "
            f"halving branch's factor 1 + {b_c}/n can reach 2 and the cone is unbounded"
        )
    if b_c < 0 and M <= -b_c:
        raise InputError(
            f"the bound needs verified_to >= {-b_c} for {m.label}{where_side}: below that the "
            f"halving branch's factor 1 - {-b_c}/n is not positive"
        )
    if b_e < 0 and a * M + b_e <= 0:
        need = -b_e // a
        raise InputError(
            f"the bound needs verified_to >= {need} for {m.label}{where_side}: below that the "
            f"multiplying branch's factor {a} - {-b_e}/n is not positive"
        )
    tracker = _Precision()
    cone = _Cone(a, b_c, b_e, M, tracker)
    interval = {
        "of": "k / multiplying_steps",
        "lower": cone.endpoint_text("lo"),
        "lower_closed": not cone.strict_lo(2, 1),
        "upper": cone.endpoint_text("hi"),
        "upper_closed": not cone.strict_hi(2, 1),
        "also": "k >= multiplying_steps",
        "lower_value": cone.endpoint_value("lo"),
        "upper_value": cone.endpoint_value("hi"),
        "values_note": "decimal values for display only; every decision used exact arithmetic",
        "factor_bounds": {
            "halving": [cone.lo_c, cone.hi_c],
            "multiplying": [cone.lo_e, cone.hi_e],
        },
    }
    if cone.where(1, 1) > 0:
        # Every ratio k/x >= 1 lies above the interval: no type is left. This
        # happens only when log2 a <= 1 (a = 2) and the offsets push below it.
        return Floor(m, side, N, None, None, None, a, e, None, (), (), interval, tracker.max_bits)
    k, x = simplest_fraction(cone.where)
    points = _lattice_points(cone, (k, x), next_types + 1)

    # Which convergent or semiconvergent of log2 a is k/x?
    approx = None
    cf: tuple[int, ...] = ()
    rational = _rational_log(Fraction(a), 2)
    nterms = 16
    while True:
        cf = continued_fraction_log(a, 2, nterms, _tracker=tracker)
        found = [s for s in semiconvergents(cf) if (s.p, s.q) == (k, x)]
        if found:
            approx = found[0]
            cf = cf[: approx.n + 1]
            break
        last_q = convergents(cf)[-1][1]
        if rational is not None or last_q > x:
            break  # pragma: no cover - by theory k/x is on the path of log2 a
        nterms *= 2

    def odd(kk: int, xx: int) -> int:
        return xx if e == 1 else kk - xx

    return Floor(
        map=m,
        side=side,
        verified_to=N,
        least_length=k,
        odd_steps=odd(k, x),
        multiplying_steps=x,
        multiplier=a,
        multiplying_branch=e,
        approximant=approx,
        continued_fraction=tuple(cf),
        next_possible=tuple((kk, odd(kk, xx)) for kk, xx in points[1:]),
        interval=interval,
        precision_bits=tracker.max_bits,
    )
