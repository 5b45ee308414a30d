"""The exact rational cycle of an itinerary.

Inside
------
- :func:`solve` -- itinerary to :class:`RationalCycle`: the fixed point
  ``n* = B / (d^k - A)`` of the composite map, the cycle's elements as exact
  rationals, integrality, primitivity (of the word and, for integral cycles,
  in Lagarias' sense), the cycle's minimum, and a check by exact iteration
  that the map really follows the itinerary from ``n*``.
- :class:`RationalCycle` -- the result; ``to_dict()`` gives plain data.

Every figure here is ``exact``.

References
----------
.. [1] C. Böhm and G. Sontacchi, Atti Accad. Naz. Lincei 64 (1978) 260-264:
   the fixed point of a parity vector of 3x+1.
.. [2] R. Terras, Acta Arithmetica 30 (1976) 241-252: every parity vector of
   length k is realized by exactly one residue class mod 2^k.
.. [3] J. C. Lagarias, "The set of rational cycles for the 3x+1 problem",
   Acta Arithmetica 56 (1990) 33-53: primitive cycles.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field
from fractions import Fraction

from cyclewright.maps import Map, as_map

from .itinerary import (
    composite,
    content,
    format_itinerary,
    parse_itinerary,
    primitive_root,
)
from .labels import EXACT
from .limits import short_int

__all__ = ["RationalCycle", "solve", "cycle_representative", "lagarias_primitive"]


def cycle_representative(elements: Sequence[Fraction | int]) -> Fraction | int:
    """The element of least absolute value (the negative one on a tie).

    This is the cycle's *minimum* in the sense every module uses: for
    positive cycles the least element; for negative ones the element
    nearest to 0.

    >>> cycle_representative([-10, -5, -7])
    -5
    """
    return min(elements, key=lambda q: (abs(q), q))


def lagarias_primitive(m: Map | str, elements: Sequence[int]) -> bool:
    """Whether an integer cycle is primitive: ``gcd(elements, offsets) = 1``.

    A cycle whose elements share a factor ``g`` with every offset is ``g``
    times a cycle of the map with offsets ``b_r / g`` (Lagarias 1990); such a
    cycle is not primitive. For ``3x+k`` this is ``gcd(elements, k) = 1``.

    >>> from cyclewright import maps
    >>> lagarias_primitive(maps.get("3x+7"), [7, 14])
    False
    >>> lagarias_primitive(maps.get("3x+7"), [5, 11, 20, 10])
    True
    """
    m = as_map(m)
    return math.gcd(*m.offsets, *(int(e) for e in elements)) == 1


@dataclass(frozen=True)
class RationalCycle:
    """The rational cycle of an itinerary (all figures exact).

    Attributes
    ----------
    map : Map
    itinerary : tuple of int
        The word as given (length ``k``).
    A, B : int
        The composite ``T_w(n) = (A n + B) / d^k``.
    denominator : int
        ``D = d^k - A`` (unreduced; the common denominator of the elements).
    fixed_point : Fraction or None
        ``B / D``; None when ``D = 0``.
    elements : tuple of Fraction
        The cycle, starting at the fixed point, one period of the primitive
        root (repetitions of a non-primitive word are not listed twice).
    realized : bool
        True when exact iteration of the map from the fixed point follows the
        itinerary (always so when every multiplier is prime to ``d``).
    note : str
        Why there is no cycle, or where the itinerary fails to be realized.
    """

    map: Map
    itinerary: tuple[int, ...]
    A: int
    B: int
    denominator: int
    fixed_point: Fraction | None
    elements: tuple[Fraction, ...]
    realized: bool
    note: str = ""
    labels: dict = field(default_factory=lambda: {"*": EXACT.value}, compare=False, repr=False)

    # ----------------------------------------------------------- derived facts
    @property
    def length(self) -> int:
        """``k``, the length of the itinerary as given."""
        return len(self.itinerary)

    @property
    def root(self) -> tuple[int, ...]:
        """The primitive root of the itinerary."""
        return primitive_root(self.itinerary)

    @property
    def primitive_itinerary(self) -> bool:
        """True when the itinerary is not a power of a shorter word."""
        return len(self.root) == self.length

    @property
    def repetitions(self) -> int:
        """``k / len(root)``: how many times the cycle is traversed."""
        return self.length // len(self.root)

    @property
    def content(self) -> tuple[int, ...]:
        """Occurrences of each residue in the itinerary."""
        return content(self.itinerary, self.map.divisor)

    @property
    def odd_steps(self) -> int | None:
        """For two-branch maps: the number of 1s (odd steps)."""
        return self.content[1] if self.map.divisor == 2 else None

    @property
    def has_fixed_point(self) -> bool:
        return self.fixed_point is not None

    @property
    def integral(self) -> bool:
        """True when the cycle consists of integers (and is realized)."""
        return (
            self.realized and bool(self.elements) and all(e.denominator == 1 for e in self.elements)
        )

    @property
    def minimum(self) -> Fraction | None:
        """The element of least absolute value (see :func:`cycle_representative`)."""
        return cycle_representative(self.elements) if self.elements else None

    @property
    def reduced_denominator(self) -> int | None:
        """The lcm of the elements' reduced denominators."""
        if not self.elements:
            return None
        q = 1
        for e in self.elements:
            q = q * e.denominator // math.gcd(q, e.denominator)
        return q

    @property
    def lagarias_primitive(self) -> bool | None:
        """For integral cycles: primitive in Lagarias' sense; None otherwise."""
        if not self.integral:
            return None
        return lagarias_primitive(self.map, [int(e) for e in self.elements])

    @property
    def sign(self) -> int:
        """+1 for a positive cycle, -1 for a negative one, 0 for the fixed point 0 or none."""
        if self.fixed_point is None or self.fixed_point == 0:
            return 0
        return 1 if self.fixed_point > 0 else -1

    def to_dict(self) -> dict:
        """Plain data (rationals stay :class:`~fractions.Fraction`; renderers turn them into ``"p/q"``)."""
        d = self.map.divisor
        return {
            "map": self.map.label,
            "map_key": self.map.key,
            "itinerary": format_itinerary(self.itinerary, d),
            "length": self.length,
            "content": list(self.content),
            "odd_steps": self.odd_steps,
            "A": self.A,
            "B": self.B,
            "denominator": self.denominator,
            "fixed_point": self.fixed_point,
            "has_fixed_point": self.has_fixed_point,
            "realized": self.realized,
            "integral": self.integral,
            "elements": list(self.elements),
            "minimum": self.minimum,
            "reduced_denominator": self.reduced_denominator,
            "primitive_itinerary": self.primitive_itinerary,
            "primitive_root": format_itinerary(self.root, d),
            "repetitions": self.repetitions,
            "lagarias_primitive": self.lagarias_primitive,
            "note": self.note,
            "label": EXACT.value,
        }

    def __repr__(self) -> str:
        w = format_itinerary(self.itinerary, self.map.divisor)
        if self.fixed_point is None:
            return f"RationalCycle({self.map.label}, {w}: {self.note})"
        shown = ", ".join(_short_value(e) for e in self.elements[:8]) + (
            ", ..." if len(self.elements) > 8 else ""
        )
        kind = "integral" if self.integral else "rational"
        extra = "" if self.realized else " (itinerary not realized)"
        return (
            f"RationalCycle({self.map.label}, {w}: {kind} {{{shown}}}, "
            f"D={short_int(self.denominator)}{extra})"
        )


def _short_value(v) -> str:
    # an element for the repr: integers and rationals of any size, never converted whole
    # (Python refuses integers of more than 4300 digits as text)
    if isinstance(v, Fraction) and v.denominator != 1:
        return f"{short_int(v.numerator)}/{short_int(v.denominator)}"
    return short_int(int(v))


def solve(m: Map, itinerary: str | Sequence[int]) -> RationalCycle:
    """The exact rational cycle whose itinerary is ``itinerary``.

    The composite of the branches read along ``w = r_1 ... r_k`` is
    ``T_w(n) = (A n + B) / d^k``; when ``d^k != A`` its unique fixed point is
    ``n* = B / (d^k - A)``. The map is then iterated exactly from ``n*`` to
    check that it really visits the residues of ``w`` (a rational is in the
    domain when its denominator is prime to ``d``; its residue is
    ``p q^(-1) mod d``). When every multiplier is prime to ``d`` this always
    holds; otherwise the result says where it fails.

    Parameters
    ----------
    m : Map
    itinerary : str or sequence of int
        See :func:`~cyclewright.cycles.itinerary.parse_itinerary`.

    Returns
    -------
    RationalCycle

    Examples
    --------
    >>> from cyclewright import maps
    >>> c = solve(maps.get("3x+5"), "11100")
    >>> c.integral, c.minimum, c.denominator
    (True, Fraction(19, 1), 5)
    >>> [int(e) for e in solve(maps.get("3x+1"), "10").elements]
    [1, 2]
    >>> solve(maps.get("3x+1"), "1").fixed_point   # (3n+1)/2 = n
    Fraction(-1, 1)
    >>> solve(maps.get("3x+1"), "1^3 0^2").elements[0]
    Fraction(19, 5)

    References
    ----------
    Böhm and Sontacchi 1978; Terras 1976; Lagarias 1990 (see module docstring).
    """
    m = as_map(m)
    d = m.divisor
    word = parse_itinerary(itinerary, d)
    k = len(word)
    A, B = composite(m.branches, d, word)
    D = d**k - A
    if D == 0:
        note = (
            f"d^k = A = {A}: the composite is n -> n + {Fraction(B, d**k)}, so there is no fixed point"
            if B
            else f"d^k = A = {A} and B = 0: the composite is the identity, every point with this itinerary is fixed"
        )
        return RationalCycle(m, word, A, B, D, None, (), False, note)
    fixed = Fraction(B, D)
    root = primitive_root(word)
    elements: list[Fraction] = []
    realized = True
    note = ""
    n = fixed
    for i, r in enumerate(word):
        if i < len(root):
            elements.append(n)
        if math.gcd(n.denominator, d) != 1:
            realized = False
            note = f"step {i}: {n} has a denominator sharing a factor with {d}; the map is not defined there"
            break
        actual = m.residue_of(n)
        if actual != r:
            realized = False
            note = f"step {i}: {n} has residue {actual}, not {r}; the itinerary is not realized"
            break
        a, b = m.branches[r]
        n = (a * n + b) / d
    if realized and n != fixed:  # pragma: no cover - algebraically impossible
        raise AssertionError("fixed point not fixed")
    if not realized:
        # Still report the fixed point's formal orbit under the word's branches.
        elements = []
        n = fixed
        for r in root:
            elements.append(n)
            a, b = m.branches[r]
            n = (a * n + b) / d
    return RationalCycle(m, word, A, B, D, fixed, tuple(elements), realized, note)
