"""One integer cycle of a map, verified exactly: the one record every analysis returns.

Inside
------
- :class:`IntegerCycle` -- one integer cycle: minimum, length, odd steps or
  content, itinerary, elements, and both notions of primitivity:
  ``primitive_itinerary`` (the itinerary is not a power of a shorter word)
  and ``lagarias_primitive`` (the elements share no factor with every
  offset, Lagarias 1990). The scan, the census, the necklace enumeration of
  :func:`~cyclewright.cycles.counting.count` and the functional graph all
  return this record; a rational cycle of an itinerary is a
  :class:`~cyclewright.cycles.solver.RationalCycle` (a different concept:
  its elements need not be integers, and its word may be a power).
- :func:`verified_cycle`, :func:`cycle_from_element` -- build one from a
  start known to lie on a cycle, checked in exact arithmetic and by
  :func:`cyclewright.cycles.solver.solve` on its itinerary.

References
----------
.. [1] J. C. Lagarias, "The set of rational cycles for the 3x+1 problem",
   Acta Arithmetica 56 (1990) 33-53 (primitive cycles).
"""

from __future__ import annotations

from dataclasses import dataclass

from cyclewright.maps import Map, as_map

from .itinerary import content as word_content
from .itinerary import format_itinerary, is_primitive
from .labels import EXACT
from .presentation import Table
from .sides import parse_side
from .solver import cycle_representative, lagarias_primitive, solve

__all__ = [
    "IntegerCycle",
    "cycles_table",
    "verified_cycle",
    "cycle_from_element",
]


# --------------------------------------------------------------------------- cycles
@dataclass(frozen=True)
class IntegerCycle:
    """An integer cycle of a map (every figure exact, verified when built).

    Attributes
    ----------
    side : str
        ``"positive"``, ``"negative"`` or ``"zero"``: the sign of the minimum.
    minimum : int
        The element of least absolute value (negative for negative cycles;
        the negative one on a tie).
    length : int
        Number of distinct elements.
    odd_steps : int or None
        For two-branch maps: steps through residue 1.
    content : tuple of int
        How many steps go through each residue.
    itinerary : str
        The residues visited from the minimum, one period (the parity vector
        for d = 2).
    elements : tuple of int
        The cycle from its minimum.
    primitive_itinerary : bool
        The itinerary is not a power of a shorter word (true of every cycle
        whose itinerary has a unique fixed point; recorded for the others).
    lagarias_primitive : bool
        The elements' gcd with the offsets is 1 (Lagarias 1990); a cycle that
        is not is a multiple of a cycle of a map with smaller offsets.
    denominator : int or None
        ``d^k - A`` of the itinerary (None when it is 0, so ``solve`` has no
        unique fixed point; the cycle is then proved by iteration alone).
    """

    side: str
    minimum: int
    length: int
    odd_steps: int | None
    content: tuple[int, ...]
    itinerary: str
    elements: tuple[int, ...]
    primitive_itinerary: bool
    lagarias_primitive: bool
    denominator: int | None
    label: str = EXACT.value

    def to_record(self) -> dict:
        """Plain JSON-ready data (the store keeps this)."""
        return {
            "side": self.side,
            "minimum": self.minimum,
            "length": self.length,
            "odd_steps": self.odd_steps,
            "content": list(self.content),
            "itinerary": self.itinerary,
            "elements": list(self.elements),
            "primitive_itinerary": self.primitive_itinerary,
            "lagarias_primitive": self.lagarias_primitive,
            "denominator": self.denominator,
            "label": self.label,
        }

    to_dict = to_record

    @classmethod
    def from_record(cls, rec: dict) -> IntegerCycle:
        return cls(
            rec["side"],
            int(rec["minimum"]),
            int(rec["length"]),
            rec["odd_steps"],
            tuple(rec["content"]),
            rec["itinerary"],
            tuple(int(e) for e in rec["elements"]),
            bool(rec["primitive_itinerary"]),
            bool(rec["lagarias_primitive"]),
            rec["denominator"],
            rec.get("label", EXACT.value),
        )

    def __repr__(self) -> str:
        shown = ", ".join(str(e) for e in self.elements[:6])
        more = ", ..." if self.length > 6 else ""
        kind = "" if self.lagarias_primitive else ", not primitive"
        steps = f", {self.odd_steps} odd" if self.odd_steps is not None else ""
        return f"IntegerCycle(min {self.minimum}, length {self.length}{steps}: {{{shown}{more}}}{kind})"


def cycles_table(
    cycles, divisor: int, *, title: str = "Integer cycles", minimum_label: str = EXACT.value
) -> Table:
    """The table of integer cycles every analysis shows (one row per cycle).

    Parameters
    ----------
    cycles : iterable of IntegerCycle
    divisor : int
        The map's divisor: two-branch maps show odd steps, others (in the
        same column) the content, steps through each residue.
    title : str
    minimum_label : str
        The label of the minima: ``exact`` for cycles found, ``certified``
        when the list is complete for a range (a finished scan, a census).

    Returns
    -------
    Table

    Examples
    --------
    >>> from cyclewright import maps
    >>> t = cycles_table([cycle_from_element(maps.get("3x+5"), 19, 5)], 2)
    >>> t.header()[:3], t.rows[0][:4]
    (['minimum [exact]', 'length [exact]', 'odd steps [exact]'], (19, 5, 3, '11100'))

    References
    ----------
    Lagarias 1990 (primitive cycles); see the module docstring.
    """
    steps = "odd steps"  # for divisors above 2: the content (steps through each residue)
    rows = tuple(
        (
            c.minimum,
            c.length,
            c.odd_steps if divisor == 2 else c.content,
            c.itinerary,
            c.primitive_itinerary,
            c.lagarias_primitive,
            c.elements[:8],
        )
        for c in cycles
    )
    return Table(
        title,
        (
            "minimum",
            "length",
            steps,
            "itinerary",
            "primitive word",
            "primitive (Lagarias)",
            "first elements",
        ),
        rows,
        {
            "minimum": minimum_label,
            "length": EXACT.value,
            steps: EXACT.value,
            "itinerary": EXACT.value,
            "primitive word": EXACT.value,
            "primitive (Lagarias)": EXACT.value,
        },
        "minimum = element of least absolute value; odd steps = the content for divisors "
        "above 2; each cycle re-proved by exact iteration "
        "and by solving its itinerary",
    )


def verified_cycle(m: Map | str, side: str, start: int, length: int) -> IntegerCycle:
    """Rebuild and prove the cycle of ``start`` (kernel coordinates) in exact arithmetic.

    The orbit of ``x0 = +-start`` under ``m`` is iterated ``length`` steps; it
    must return to ``x0`` exactly then, with ``x0`` its representative. When
    the itinerary's denominator is non-zero, :func:`~cyclewright.cycles.solver.solve`
    must give the same integral, realized cycle. Anything else is an internal
    error (never reported as a cycle).

    >>> from cyclewright import maps
    >>> verified_cycle(maps.get("3x+1"), "negative", 17, 11).elements[:4]
    (-17, -25, -37, -55)
    """
    m = as_map(m)
    d = m.divisor
    x0 = start if parse_side(side, allow_both=False) == "positive" else -start
    word = []
    elements = []
    x = x0
    for _ in range(length):
        elements.append(x)
        word.append(x % d)
        x = m.step(x)
    if x != x0 or len(set(elements)) != length or cycle_representative(elements) != x0:
        raise RuntimeError(f"internal error: {x0} is not the minimum of a cycle of length {length}")
    c = solve(m, word)
    if c.has_fixed_point:
        if not (c.realized and c.integral and c.fixed_point == x0 and c.primitive_itinerary):
            raise RuntimeError(f"internal error: solve disagrees with the cycle through {x0}")
        lag = bool(c.lagarias_primitive)
        prim = True
        denominator = int(c.denominator)
    else:
        lag = lagarias_primitive(m, elements)
        prim = is_primitive(word)
        denominator = None
    cont = word_content(word, d)
    return IntegerCycle(
        side="positive" if x0 > 0 else "negative",
        minimum=x0,
        length=length,
        odd_steps=cont[1] if d == 2 else None,
        content=cont,
        itinerary=format_itinerary(word, d),
        elements=tuple(elements),
        primitive_itinerary=prim,
        lagarias_primitive=lag,
        denominator=denominator,
    )


def cycle_from_element(m: Map | str, x0: int, length: int) -> IntegerCycle:
    """The verified cycle record of the cycle whose minimum is ``x0`` (any sign, 0 allowed).

    >>> from cyclewright import maps
    >>> c = cycle_from_element(maps.get("3x+5"), 19, 5)
    >>> c.itinerary, c.elements, c.primitive_itinerary, c.lagarias_primitive
    ('11100', (19, 31, 49, 76, 38), True, True)
    """
    m = as_map(m)
    if x0 == 0:
        x, elems, word = 0, [], []
        for _ in range(length):
            elems.append(x)
            word.append(x % m.divisor)
            x = m.step(x)
        if x != 0:
            raise RuntimeError(f"internal error: 0 does not return after {length} steps")
        cont = word_content(word, m.divisor)
        return IntegerCycle(
            "zero",
            0,
            length,
            cont[1] if m.divisor == 2 else None,
            cont,
            format_itinerary(word, m.divisor),
            tuple(elems),
            is_primitive(word),
            lagarias_primitive(m, elems),
            m.divisor**length - _A(m, word),
        )
    return verified_cycle(m, "positive" if x0 > 0 else "negative", abs(x0), length)


def _A(m: Map, word) -> int:
    A = 1
    for r in word:
        A *= m.branches[r].multiplier
    return A
