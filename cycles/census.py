"""Certified census: every integer cycle of a map up to a length, with how it was certified.

Inside
------
- :func:`census` -- all integer cycles of length at most ``K`` on the sides
  asked, certified by one of two independent methods (or both):

  *Method 1, bound and scan* (``"bound-scan"``). Every cycle of type ``c``
  whose elements share one sign has its minimum (least ``|n|``) at most the
  proved bound ``M(c)`` (:func:`cycles.bounds.minimum_bound`). The largest
  ``M`` over all types of length ``<= K`` (:func:`cycles.bounds.largest_bound_up_to`)
  is the range to scan; the compiled scan (:func:`cycles.scan.scan` with
  ``max_cycle_length=K``) decides for every start ``s`` in it whether ``s``
  is the minimum of a cycle of length ``<= K``; a start that has neither
  dropped below ``|s|`` nor returned within ``K`` steps is certified not to be
  one, so nothing is left unresolved. A cycle with elements of both signs
  must cross zero, and with positive multipliers it can only cross from an
  element ``n`` with ``|n| <= max_r |b_r| / a_r``: that range is scanned too.
  Complete by construction.

  *Method 2, itineraries* (``"itineraries"``). Every word of length ``<= K``
  is examined through a meet-in-the-middle join on the denominator
  (:func:`cycles.wordsearch.integral_cycles_by_itinerary`) and each hit is
  verified by exact iteration. It needs no bound, so it serves maps whose
  offsets have mixed signs, small ``K``, and the cross-check of method 1.

- :class:`Census` -- the result: cycles (:class:`cycles.scan.FoundCycle`), per
  side the method, the bound and the type attaining it, the scanned range.
- :func:`census_family` -- the census of every member of ``ax+k`` over a range of ``k``.
- :func:`parse_family` -- ``"3x+k"`` / ``"3x-k"`` templates.

Every cycle list here is ``certified`` (with its method and range); the
bounds are ``proved``; each cycle's elements are ``exact``.

References
----------
.. [1] S. Eliahou, "The 3x+1 problem: new lower bounds on nontrivial cycle
   lengths", Discrete Mathematics 118 (1993) 45-56 (the bound on a cycle's minimum).
.. [2] J. C. Lagarias, "The set of rational cycles for the 3x+1 problem",
   Acta Arithmetica 56 (1990) 33-53 (primitive cycles).
.. [3] R. P. Steiner, "A theorem on the Syracuse problem", Proc. 7th
   Manitoba Conference on Numerical Mathematics (1977) 553-559 (circuits).
"""

from __future__ import annotations

import math
import re
import time
from collections.abc import Callable, Iterable
from dataclasses import dataclass, field
from fractions import Fraction

from maps import Map, parse_shorthand

from .bounds import largest_bound_up_to
from .errors import InputError
from .labels import CERTIFIED, EXACT, PROVED
from .scan import FoundCycle, cycle_from_element, scan
from .wordsearch import DegenerateMap, integral_cycles_by_itinerary

__all__ = [
    "census",
    "Census",
    "SidePlan",
    "census_family",
    "FamilyCensus",
    "parse_family",
    "NOMINAL_RATE",
    "MAX_SCAN",
    "itinerary_work",
]

#: Starts per second assumed for time estimates before a scan is refused (a
#: conservative figure for one core of this class of machine; see
#: benchmarks/bench_scan.py for measured rates). Used only to phrase refusals.
NOMINAL_RATE = 2e7
#: Largest scan range a census accepts by default (``max_scan`` overrides).
MAX_SCAN = 10**12
#: Largest estimated work (half-words joined) of the itinerary method accepted by default.
MAX_ITINERARY_WORK = 3 * 10**8

METHODS = ("auto", "bound-scan", "itineraries", "both")


@dataclass(frozen=True)
class SidePlan:
    """How one side was certified.

    Attributes
    ----------
    side : str
    method : str
        ``"bound-scan"`` or ``"itineraries"``.
    bound : int or None
        The largest proved bound on a cycle minimum over all types of length
        ``<= K`` (method 1).
    bound_content : tuple or None
        The type (content) attaining it.
    bound_formula : str
    crossing : int
        The largest ``|n|`` from which a cycle could cross zero (0 if none).
    scan_to : int or None
        The scanned range ``1 .. scan_to`` of absolute values (method 1).
    reason : str
        Why this method (e.g. the bound does not apply).
    """

    side: str
    method: str
    bound: int | None
    bound_content: tuple[int, ...] | None
    bound_formula: str
    crossing: int
    scan_to: int | None
    reason: str = ""

    def to_dict(self) -> dict:
        return {
            "side": self.side,
            "method": self.method,
            "bound": self.bound,
            "bound_content": list(self.bound_content) if self.bound_content else None,
            "bound_formula": self.bound_formula,
            "crossing": self.crossing,
            "scan_to": self.scan_to,
            "reason": self.reason,
            "labels": {"bound": PROVED.value, "scan_to": EXACT.value},
        }


@dataclass(frozen=True)
class Census:
    """All integer cycles of length ``<= max_length`` on the sides asked (certified).

    ``cycles`` are ordered zero first, then positive by minimum, then
    negative by ``|minimum|``.
    """

    map: Map
    max_length: int
    sides: tuple[str, ...]
    cycles: tuple[FoundCycle, ...]
    plans: dict[str, SidePlan]
    zero_cycle: bool
    cross_checked: bool
    seconds: float = field(compare=False, default=0.0)
    store_path: str | None = field(compare=False, default=None)

    @property
    def minima(self) -> tuple[int, ...]:
        return tuple(c.minimum for c in self.cycles)

    def minima_on(self, side: str) -> tuple[int, ...]:
        if side == "positive":
            return tuple(c.minimum for c in self.cycles if c.minimum > 0)
        if side == "negative":
            return tuple(c.minimum for c in self.cycles if c.minimum < 0)
        return tuple(c.minimum for c in self.cycles if c.minimum == 0)

    @property
    def primitive(self) -> tuple[FoundCycle, ...]:
        """The cycles that are primitive in Lagarias' sense."""
        return tuple(c for c in self.cycles if c.lagarias_primitive)

    @property
    def method(self) -> str:
        methods = sorted({p.method for p in self.plans.values()})
        text = " + ".join(methods)
        return text + (" (cross-checked by both methods)" if self.cross_checked else "")

    def statement(self) -> str:
        """One sentence a user can cite."""
        where = " and ".join(self.sides)
        n = len(self.cycles)
        return (
            f"{self.map.label} has exactly {n} integer cycle{'s' if n != 1 else ''} of length at most "
            f"{self.max_length} on the {where} side{'s' if len(self.sides) > 1 else ''}"
            + (" (with the fixed point 0)" if self.zero_cycle else "")
            + f"; certified by {self.method}."
        )

    def to_dict(self) -> dict:
        return {
            "map": self.map.label,
            "map_key": self.map.key,
            "definition": self.map.canonical(),
            "max_length": self.max_length,
            "sides": list(self.sides),
            "method": self.method,
            "cross_checked": self.cross_checked,
            "zero_cycle": self.zero_cycle,
            "plans": {s: p.to_dict() for s, p in self.plans.items()},
            "count": len(self.cycles),
            "primitive_count": len(self.primitive),
            "cycles": [c.to_record() for c in self.cycles],
            "statement": self.statement(),
            "labels": {"cycles": CERTIFIED.value, "count": CERTIFIED.value, "bound": PROVED.value},
            "seconds": round(self.seconds, 3),
        }

    def __repr__(self) -> str:
        shown = ", ".join(str(v) for v in self.minima[:12]) + (
            ", ..." if len(self.cycles) > 12 else ""
        )
        return f"Census({self.map.label}, length <= {self.max_length}, {'/'.join(self.sides)}: minima {shown}; {self.method})"


def _crossing(m: Map) -> int | None:
    """Largest ``|n|`` from which an orbit can change sign; None with a negative multiplier."""
    if any(a < 0 for a in m.multipliers):
        return None
    best = Fraction(0)
    for a, b in m.branches:
        best = max(best, Fraction(abs(b), a))
    return math.floor(best)


def itinerary_work(m: Map, max_length: int) -> int:
    """Half-words the itinerary method joins up to ``max_length`` (for feasibility checks).

    For each length ``k`` the join pairs every product class of the prefixes
    (length ``floor(k/2)``) with every class of the suffixes, so the work is
    ``sum_k (classes_j * d^i + classes_i * d^j)``.

    >>> import maps
    >>> itinerary_work(maps.get("3x+1"), 4)
    50
    """
    d = m.divisor
    half = (max_length + 1) // 2
    classes = [1]
    products = {1}
    for _ in range(half):
        products = {p * a for p in products for a in m.multipliers}
        classes.append(len(products))
    total = 0
    for k in range(1, max_length + 1):
        i, j = k // 2, k - k // 2
        total += classes[j] * d**i + classes[i] * d**j
    return total


def _zero_cycle(m: Map, K: int) -> FoundCycle | None:
    x = 0
    for i in range(1, K + 1):
        x = m.step(x)
        if x == 0:
            return cycle_from_element(m, 0, i)
    return None


def census(
    m: Map,
    max_length: int,
    *,
    side: str = "both",
    method: str = "auto",
    store=None,
    workers: int | None = None,
    max_scan: int = MAX_SCAN,
    progress: Callable | None = None,
) -> Census:
    """Every integer cycle of ``m`` with length at most ``max_length``, certified.

    Parameters
    ----------
    m : Map
    max_length : int
        ``K >= 1``.
    side : {"positive", "negative", "both"}
        Cycles whose minimum (least ``|n|``) is positive, negative, or both;
        the cycle through 0, if any, is always reported.
    method : {"auto", "bound-scan", "itineraries", "both"}
        ``auto``: method 1 where the bound applies, else method 2; for
        ``K <= 16`` method 2 also runs as a cross-check. ``both`` always
        cross-checks.
    store : path, None or False
        The scan's results store (see :func:`cycles.scan.scan`).
    workers : int, optional
        Scan worker processes.
    max_scan : int
        Refuse when a side would need a scan beyond this many starts.
    progress : callable, optional
        Passed to the scan.

    Returns
    -------
    Census

    Raises
    ------
    InputError
        ``K < 1``; a scan beyond ``max_scan`` (with the range it needs and a
        time estimate); no applicable method.

    Examples
    --------
    >>> import maps
    >>> census(maps.get("3x+5"), 30, side="positive", store=False, workers=1).minima_on("positive")
    (1, 5, 19, 23, 187, 347)
    >>> census(maps.get("3x+1"), 200, store=False, workers=1).minima
    (0, 1, -1, -5, -17)
    >>> census(maps.get("mod3-4x"), 12, store=False).plans["positive"].method
    'itineraries'

    References
    ----------
    Eliahou 1993 (the bound); Böhm and Sontacchi 1978 (the fixed point of a
    word); see the module docstring.
    """
    t0 = time.perf_counter()
    if isinstance(max_length, bool) or not isinstance(max_length, int) or max_length < 1:
        raise InputError(f"the maximal length must be an integer >= 1, got {max_length!r}")
    if side not in ("positive", "negative", "both"):
        raise InputError(f"side must be positive, negative or both, got {side!r}")
    if method not in METHODS:
        raise InputError(f"method must be one of {', '.join(METHODS)}, got {method!r}")
    K = max_length
    sides = ("positive", "negative") if side == "both" else (side,)
    crossing = _crossing(m)

    plans: dict[str, SidePlan] = {}
    for s in sides:
        lb = largest_bound_up_to(m, K, s)
        applies = bool(lb.applies) and crossing is not None
        formula = lb.bound.formula if lb.bound is not None else ""
        if method in ("bound-scan", "both") or (method == "auto" and applies):
            if not applies:
                why = (
                    "the offsets have mixed signs"
                    if crossing is not None
                    else "a multiplier is negative"
                )
                if method in ("bound-scan", "both"):
                    raise InputError(
                        f"{m.label}: method 1 (bound and scan) does not apply on the {s} side: {why}; "
                        "use the itinerary method"
                    )
            bound = int(lb.integer or 0)
            scan_to = max(bound, crossing)
            if scan_to > max_scan:
                est = scan_to / NOMINAL_RATE
                raise InputError(
                    f"{m.label}: a census up to length {K} needs a scan of 1..{scan_to} on the {s} side "
                    f"(about {_human_seconds(est)} at {NOMINAL_RATE:.0e} starts/s); this is beyond the "
                    f"limit of {max_scan} starts (raise max_scan / --max-scan to go ahead)"
                )
            plans[s] = SidePlan(
                s,
                "bound-scan",
                bound,
                tuple(lb.content) if lb.content else None,
                formula,
                crossing,
                scan_to or None,
            )
        else:
            why = "the bound on cycle minima does not apply" + (
                " (offsets of mixed sign)" if crossing is not None else " (a negative multiplier)"
            )
            plans[s] = SidePlan(s, "itineraries", None, None, "", crossing or 0, None, why)

    words_sides = [s for s, p in plans.items() if p.method == "itineraries"]
    need_words = bool(words_sides) or method == "both" or (method == "auto" and K <= 16)
    if need_words:
        work = itinerary_work(m, K)
        if work > MAX_ITINERARY_WORK:
            if words_sides:
                raise InputError(
                    f"{m.label}: no applicable method for length {K} on the {'/'.join(words_sides)} side: "
                    f"{plans[words_sides[0]].reason}, and the itinerary method would join about "
                    f"{work:.1e} half-words (limit {MAX_ITINERARY_WORK:.0e}); lower the length"
                )
            if method == "both":
                raise InputError(
                    f"{m.label}: the itinerary cross-check for length {K} would join about {work:.1e} "
                    "half-words; use method bound-scan"
                )
            need_words = False  # the automatic cross-check is skipped when too costly

    found: dict[int, FoundCycle] = {}
    store_path = None
    for s, p in plans.items():
        if p.method != "bound-scan" or not p.scan_to:
            continue
        r = scan(
            m,
            p.scan_to,
            side=s,
            max_cycle_length=K,
            store=store,
            workers=workers,
            progress=progress,
        )
        store_path = r.store_path
        for c in r.cycles:
            if c.length <= K:
                found[c.minimum] = c

    cross_checked = False
    if need_words:
        try:
            words = integral_cycles_by_itinerary(m, K)
        except DegenerateMap as exc:
            raise InputError(str(exc)) from None
        by_words: dict[int, FoundCycle] = {}
        for c in words.cycles:
            mn = int(c.minimum)
            if mn == 0 or (mn > 0 and "positive" in plans) or (mn < 0 and "negative" in plans):
                by_words[mn] = cycle_from_element(m, mn, len(c.elements))
        for s, p in plans.items():
            sign = 1 if s == "positive" else -1
            mine = {v for v in by_words if v * sign > 0}
            if p.method == "itineraries":
                for v in mine:
                    found[v] = by_words[v]
            else:
                scanned = {v for v in found if v * sign > 0}
                if scanned != mine:
                    raise RuntimeError(
                        f"internal error: the two census methods disagree on the {s} side of {m.label}: "
                        f"bound-scan {sorted(scanned, key=abs)}, itineraries {sorted(mine, key=abs)}"
                    )
                cross_checked = True
        if cross_checked and any(p.method == "itineraries" for p in plans.values()):
            cross_checked = False  # a side certified by words alone is not cross-checked

    zero = _zero_cycle(m, K)
    if zero is not None:
        found[0] = zero
    cycles = tuple(
        sorted(found.values(), key=lambda c: (c.minimum < 0, c.minimum != 0, abs(c.minimum)))
    )
    return Census(
        m,
        K,
        sides,
        cycles,
        plans,
        zero is not None,
        cross_checked,
        time.perf_counter() - t0,
        store_path,
    )


def _human_seconds(s: float) -> str:
    if s < 120:
        return f"{s:.0f} s"
    if s < 7200:
        return f"{s / 60:.0f} min"
    if s < 2 * 86400:
        return f"{s / 3600:.1f} h"
    if s < 2 * 365 * 86400:
        return f"{s / 86400:.0f} days"
    return f"{s / (365 * 86400):.0f} years"


# --------------------------------------------------------------------- families
_FAMILY = re.compile(r"^\s*(\d*)\s*[xn]\s*([+-])\s*k\s*$")


def parse_family(template: str) -> tuple[int, int]:
    """``"3x+k"`` -> ``(3, +1)``; ``"5x-k"`` -> ``(5, -1)``.

    >>> parse_family("3x + k")
    (3, 1)
    """
    mt = _FAMILY.match(template)
    if not mt:
        raise InputError(f"{template!r} is not a family template like 3x+k or 3x-k")
    a = int(mt.group(1) or 1)
    if a == 0:
        raise InputError(f"{template!r}: the multiplier must not be 0")
    return a, (1 if mt.group(2) == "+" else -1)


def default_family_members(a: int, ks: Iterable[int]) -> list[int]:
    """The ``k`` of the range prime to ``2a`` (for ``3x+k``: prime to 6), the usual normalisation."""
    return [k for k in ks if k > 0 and math.gcd(k, 2 * a) == 1]


@dataclass(frozen=True)
class FamilyCensus:
    """One census per member ``ax±k`` of a family (certified per row)."""

    template: str
    max_length: int
    side: str
    rows: tuple[Census, ...]

    def table(self) -> list[dict]:
        out = []
        for c in self.rows:
            prim = [x.minimum for x in c.primitive if x.minimum != 0]
            out.append(
                {
                    "map": c.map.label,
                    "k": abs(c.map.ax_b[1]) if c.map.ax_b else None,
                    "primitive_minima": prim,
                    "primitive_count": len(prim),
                    "all_minima": [x.minimum for x in c.cycles if x.minimum != 0],
                    "cycle_count": len([x for x in c.cycles if x.minimum != 0]),
                    "method": c.method,
                    "scan_to": max((p.scan_to or 0) for p in c.plans.values()),
                }
            )
        return out

    def to_dict(self) -> dict:
        return {
            "family": self.template,
            "max_length": self.max_length,
            "side": self.side,
            "rows": self.table(),
            "labels": {"primitive_minima": CERTIFIED.value, "primitive_count": CERTIFIED.value},
        }


def census_family(
    template: str,
    ks: Iterable[int],
    max_length: int,
    *,
    side: str = "positive",
    all_k: bool = False,
    progress: Callable[[int, int], None] | None = None,
    **kw,
) -> FamilyCensus:
    """The census of every member ``ax+k`` (or ``ax-k``) of a family.

    Parameters
    ----------
    template : str
        ``"3x+k"``, ``"5x-k"`` ...
    ks : iterable of int
        The values of ``k``.
    max_length : int
    side : str
    all_k : bool
        Keep every ``k`` that gives a valid map; by default only ``k`` prime
        to ``2a`` (for 3x+k: prime to 6).
    progress : callable, optional
        Called with ``(done, total)`` after each member.
    **kw
        Passed to :func:`census` (``store``, ``workers``, ``max_scan``...).

    Examples
    --------
    >>> fam = census_family("3x+k", range(1, 8), 20, store=False, workers=1)
    >>> [(r["k"], r["primitive_minima"]) for r in fam.table()]
    [(1, [1]), (5, [1, 19, 23]), (7, [5])]
    """
    a, sign = parse_family(template)
    ks = list(ks)
    members = (
        [k for k in ks if (a + k) % 2 == 0 and k > 0] if all_k else default_family_members(a, ks)
    )
    if not members:
        raise InputError(
            f"{template}: no member in the range gives a valid map (k must make a + k even)"
        )
    rows = []
    for i, k in enumerate(members, start=1):
        m = parse_shorthand(f"{a}x{'+' if sign > 0 else '-'}{k}")
        rows.append(census(m, max_length, side=side, **kw))
        if progress:
            progress(i, len(members))
    return FamilyCensus(template, max_length, side, tuple(rows))
