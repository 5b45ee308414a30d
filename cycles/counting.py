"""The counting framework: how many itineraries of a type could close into integer cycles.

Inside
------
- :func:`count` -- one type (``(k, x)`` for two-branch maps, a content in
  general) to :class:`TypeCount`: words, necklaces and primitive necklaces
  (closed formulas), the denominator ``D = d^k - A`` and the side it serves,
  the proved bound on a cycle minimum, candidates, integer cycles (by
  enumeration when the necklaces are few enough), the heuristic expectation
  ``necklaces / |D|``, ``Λ = k ln d - ln A`` and its linear-forms lower bound.
- :class:`IntegerCycle` -- one integer cycle found by the enumeration.
- :func:`sweep` -- types along the critical line ``d^k ≈ A`` for a range of
  ``x`` to :class:`Sweep`: one row per type, the fitted growth rate of the
  necklace counts against the theoretical ``ρ``, and the smallest ``x`` from
  which the proved candidate bound stays below the necklace count.
- :func:`critical_lengths` -- the lengths a sweep uses for one ``x``.
- :func:`rho` -- the theoretical growth rate ``ρ = 2^(t H(1/t))``, ``t = log2 a``.

Definitions (every module and the docs use these)
-------------------------------------------------
For a necklace ``w`` of the type, its cycle's elements are ``n_i = N_i / D``
with integer numerators ``N_i`` (the composite numerator ``B`` of the
rotation starting at ``n_i``); consecutive numerators satisfy
``N_{i+1} = (a_r N_i + b_r D) / d`` exactly. The **cycle-minimum numerator**
of ``w`` is ``min_i |N_i|``: the cycle's minimum (element of least absolute
value) is ``± min_i |N_i| / |D|``. An integer cycle has ``|D|`` dividing that
numerator, so it is a positive multiple of ``|D|`` unless the cycle is
``{0}``. **candidates** (enumerated, exact) = the number of positive multiples
of ``|D|`` not above the largest cycle-minimum numerator over the type,
``floor(max / |D|)``; without enumeration, the proved bound ``M`` on
``|minimum|`` gives ``candidates <= M`` (proved). For offsets of one sign
the integer cycles of the type are at most ``candidates`` (distinct cycles
have distinct minima).

Labels: counts, ``D``, enumerated figures ``exact``; the minimum bound,
candidates from it and the linear-forms bound ``proved``; ``Λ`` intervals
``certified`` (interval arithmetic); ``necklaces/|D|`` and fitted rates
``heuristic``.

References
----------
.. [1] C. Böhm and G. Sontacchi, Atti Accad. Naz. Lincei 64 (1978) 260-264.
.. [2] J. Sawada, "A fast algorithm to generate necklaces with fixed
   content", Theoretical Computer Science 301 (2003) 477-489.
.. [3] S. Eliahou, Discrete Mathematics 118 (1993) 45-56.
.. [4] J. C. Lagarias, "The 3x+1 problem and its generalizations", Amer.
   Math. Monthly 92 (1985) 3-23 (the heuristic count of cycles).
"""

from __future__ import annotations

import math
import os
import time
from collections.abc import Callable, Iterable, Mapping, Sequence
from dataclasses import dataclass, field
from fractions import Fraction

from maps import Map

from .bounds import (
    Interval,
    LinearFormBound,
    MinimumBound,
    _bound_of_content,
    _linear_form_bound,
    _log_form,
    candidates_from_linear_form,
)
from .errors import InputError
from .itinerary import format_itinerary
from .labels import CERTIFIED, EXACT, HEURISTIC, PROVED
from .necklaces import (
    _search,
    lyndon_count,
    necklace_count,
    normalize_content,
    type_content,
    word_count,
)

__all__ = [
    "IntegerCycle",
    "TypeCount",
    "count",
    "Sweep",
    "sweep",
    "critical_lengths",
    "rho",
    "DEFAULT_LIMIT",
    "DEFAULT_SWEEP_LIMIT",
]

DEFAULT_LIMIT = 10**6
"""Enumerate a type when it has at most this many necklaces (``count``)."""

DEFAULT_SWEEP_LIMIT = 10**4
"""The same for each row of a ``sweep`` (kept small so that sweeps stay interactive)."""

_BYTES_PER_LISTED = 240  # an IntegerCycle without its strings, CPython, measured roughly
_SECONDS_PER_LETTER = 2e-7  # enumeration cost per necklace letter on a 2020s CPU (rough)
_MAX_SECONDS = 86400.0  # enumerations estimated above a day are refused


# ------------------------------------------------------------------ results
@dataclass(frozen=True)
class IntegerCycle:
    """An integer cycle found by enumerating the necklaces of a type (exact).

    Attributes
    ----------
    necklace : str
        The itinerary's least rotation (as generated).
    itinerary : str
        The rotation that starts at the cycle's minimum.
    minimum : int
        The element of least absolute value.
    period : int
        Length of the primitive root of the itinerary (the cycle's length).
    primitive : bool
        True when the itinerary is not a power of a shorter word.
    """

    necklace: str
    itinerary: str
    minimum: int
    period: int
    primitive: bool

    def to_dict(self) -> dict:
        return {
            "necklace": self.necklace,
            "itinerary": self.itinerary,
            "minimum": self.minimum,
            "period": self.period,
            "primitive": self.primitive,
        }


@dataclass(frozen=True)
class TypeCount:
    """Counting figures for one type; see the module docstring for the definitions.

    Attributes
    ----------
    map : Map
    content : tuple of int
        ``(c_0, ..., c_{d-1})``.
    words, necklaces, primitive_necklaces : int
        Exact, from closed formulas.
    A, denominator : int
        ``A = prod a_r^{c_r}``, ``D = d^k - A`` (exact).
    side : str
        The side whose cycles this type can carry: ``"positive"``,
        ``"negative"``, ``"zero"`` (only the cycle 0) or ``"undetermined"``
        (offsets of mixed signs or a negative multiplier).
    min_bound : MinimumBound
        The proved bound on ``|minimum|`` for that side.
    enumerated : bool
        Whether the necklaces were enumerated (``necklaces <= limit``).
    smallest_min_numerator, largest_min_numerator : int or None
        Over the type's necklaces, the least and the greatest cycle-minimum
        numerator (exact, when enumerated).
    candidates : int or None
        Exact when enumerated; else the proved bound ``M`` (None when no bound applies).
    integer_cycles : tuple of IntegerCycle or None
        None when not enumerated.
    unrealized : int or None
        Integral fixed points whose itinerary the map does not follow
        (possible only when a multiplier shares a factor with ``d``).
    heuristic : Fraction
        ``necklaces / |D|`` (heuristic expectation of integer cycles).
    log_form : Interval
        ``Λ = k ln d - ln A``, certified.
    linear_form : LinearFormBound
        Proved lower bound for ``|Λ|``.
    candidates_linear_forms : int or None
        The bound on ``|minimum|`` obtained from the linear-forms bound alone (proved).
    labels : dict
        Field name to label.
    """

    map: Map
    content: tuple[int, ...]
    words: int
    necklaces: int
    primitive_necklaces: int
    A: int
    denominator: int
    side: str
    min_bound: MinimumBound
    enumerated: bool
    enumeration_note: str
    smallest_min_numerator: int | None
    largest_min_numerator: int | None
    candidates: int | None
    integer_cycles: tuple[IntegerCycle, ...] | None
    unrealized: int | None
    heuristic: Fraction
    log_form: Interval
    linear_form: LinearFormBound
    candidates_linear_forms: int | None
    labels: dict = field(default_factory=dict, compare=False)

    @property
    def length(self) -> int:
        """``k``."""
        return sum(self.content)

    @property
    def odd(self) -> int | None:
        """For two-branch maps, ``x`` (steps on residue 1); None otherwise."""
        return self.content[1] if len(self.content) == 2 else None

    @property
    def off_zero(self) -> int:
        """Steps not on residue 0 (``x`` for two-branch maps); the sweep's variable."""
        return self.length - self.content[0]

    @property
    def candidates_bound(self) -> int | None:
        """The proved bound ``M`` on ``|minimum|`` (0 when no cycle is possible; None if none applies)."""
        b = self.min_bound
        return b.integer if b.applies else None

    @property
    def heuristic_log10(self) -> float:
        """``log10(necklaces / |D|)`` as a float (for display and plots)."""
        return _log10(self.necklaces) - _log10(abs(self.denominator))

    def type_text(self) -> str:
        if len(self.content) == 2:
            return f"k={self.length}, x={self.content[1]}"
        return f"k={self.length}, content {list(self.content)}"

    def row(self) -> dict:
        """One flat dict (the sweep's row format; values exact where they are exact)."""
        b = self.min_bound
        return {
            "x": self.off_zero,
            "k": self.length,
            "content": " ".join(str(c) for c in self.content),
            "words": self.words,
            "necklaces": self.necklaces,
            "primitive_necklaces": self.primitive_necklaces,
            "denominator": self.denominator,
            "side": self.side,
            "min_bound": b.integer if b.applies else None,
            "min_bound_interval": b.interval.text() if b.interval is not None else None,
            "bound_possible": b.possible if b.applies else None,
            "candidates": self.candidates,
            "candidates_label": self.labels.get("candidates"),
            "candidates_linear_forms": self.candidates_linear_forms,
            "enumerated": self.enumerated,
            "smallest_min_numerator": self.smallest_min_numerator,
            "largest_min_numerator": self.largest_min_numerator,
            "integer_cycles": None if self.integer_cycles is None else len(self.integer_cycles),
            "integer_cycle_minima": None
            if self.integer_cycles is None
            else [c.minimum for c in self.integer_cycles],
            "heuristic": self.heuristic,
            "heuristic_log10": round(self.heuristic_log10, 6),
            "lambda": self.log_form.text(),
            "lambda_lower": self.linear_form.lower_text() if self.linear_form.applies else None,
            "linear_form_source": self.linear_form.source if self.linear_form.applies else None,
        }

    def to_dict(self) -> dict:
        """Everything, as plain data with labels (renderers turn Fractions into ``"p/q"``)."""
        return {
            "map": self.map.label,
            "map_key": self.map.key,
            "length": self.length,
            "odd": self.odd,
            "content": list(self.content),
            "words": self.words,
            "necklaces": self.necklaces,
            "primitive_necklaces": self.primitive_necklaces,
            "A": self.A,
            "denominator": self.denominator,
            "side": self.side,
            "min_bound": self.min_bound.to_dict(),
            "enumerated": self.enumerated,
            "enumeration_note": self.enumeration_note,
            "smallest_min_numerator": self.smallest_min_numerator,
            "largest_min_numerator": self.largest_min_numerator,
            "candidates": self.candidates,
            "candidates_bound": self.candidates_bound,
            "integer_cycles": None
            if self.integer_cycles is None
            else [c.to_dict() for c in self.integer_cycles],
            "unrealized": self.unrealized,
            "heuristic": self.heuristic,
            "heuristic_log10": self.heuristic_log10,
            "log_form": self.log_form.to_dict(),
            "linear_form": self.linear_form.to_dict(),
            "candidates_linear_forms": self.candidates_linear_forms,
            "labels": dict(self.labels),
        }

    def __repr__(self) -> str:
        b = self.min_bound
        if not b.applies:
            bound = "no bound (mixed offsets)"
        elif not b.possible:
            bound = "no cycle possible"
        else:
            bound = f"|min| <= {b.integer}"
        cand = "-" if self.candidates is None else str(self.candidates)
        ints = (
            "not enumerated"
            if self.integer_cycles is None
            else f"{len(self.integer_cycles)} integer cycles"
            + (
                f" (minima {', '.join(str(c.minimum) for c in self.integer_cycles[:6])}"
                + (", ..." if len(self.integer_cycles) > 6 else "")
                + ")"
                if self.integer_cycles
                else ""
            )
        )
        return (
            f"TypeCount({self.map.label}, {self.type_text()}: {_short(self.necklaces)} necklaces "
            f"({_short(self.primitive_necklaces)} primitive), D={_short(self.denominator)} [{self.side}], "
            f"{bound} (proved), {cand} candidates ({self.labels.get('candidates', '-')}), {ints}, "
            f"heuristic {_fmt_log10(self.heuristic_log10)})"
        )


def _short(n: int) -> str:
    s = str(n)
    if len(s.lstrip("-")) <= 24:
        return s
    return f"{s[:6]}…({len(s.lstrip('-'))} digits)"


def _fmt_log10(l10: float) -> str:
    if -4 < l10 < 6:
        return f"{10**l10:.4g}"
    return f"1e{l10:.2f}"


def _log10(n: int) -> float:
    return math.log10(n) if n > 0 else float("-inf")


# ------------------------------------------------------------------ count
def _resolve(m: Map, k, x, content) -> tuple[int, ...]:
    d = m.divisor
    if content is not None:
        c = normalize_content(content, d)
        if k is not None:
            if isinstance(k, bool) or not isinstance(k, int):
                raise InputError(f"the length k must be an integer, got {k!r}")
            if k < 1:
                raise InputError(f"the length k must be at least 1, got {k}")
            if sum(c) != k:
                raise InputError(
                    f"the content {list(c)} sums to {sum(c)}, not to the length k = {k}"
                )
        if x is not None and d != 2:
            raise InputError(
                f"x (odd steps) applies to two-branch maps; this map has divisor {d}: give the content only"
            )
        if x is not None and c[1] != x:
            raise InputError(f"the content has {c[1]} steps on residue 1, not x = {x}")
        return c
    if d != 2:
        raise InputError(
            f"a map with divisor {d} needs a content (counts of residues 0..{d - 1}); "
            "the type of a d-branch itinerary is its content"
        )
    if k is None or x is None:
        raise InputError("give the length k and the number of odd steps x (or a content)")
    return type_content(k, x)


def _side_of(m: Map, content: tuple[int, ...], D: int) -> str:
    signs = set()
    for (a, b), c in zip(m.branches, content):
        if not c:
            continue
        if a < 0:
            return "undetermined"
        if b:
            signs.add(b > 0)
    if not signs:
        return "zero"
    if len(signs) > 1:
        return "undetermined"
    positive_offsets = True in signs
    return "positive" if (D > 0) == positive_offsets else "negative"


def _memory_budget() -> int:
    try:
        total = os.sysconf("SC_PAGE_SIZE") * os.sysconf("SC_PHYS_PAGES")
    except (ValueError, OSError, AttributeError):  # pragma: no cover - non-POSIX
        total = 8 * 2**30
    return min(total // 2, 8 * 2**30)


def _fmt_count(n: int) -> str:
    return str(n) if n < 10**9 else f"{n:.3g}"


def _fmt_bytes(n: float) -> str:
    for unit in ("B", "KiB", "MiB", "GiB", "TiB", "PiB", "EiB"):
        if n < 1024:
            return f"{n:.3g} {unit}"
        n /= 1024
    return f"{n:.3g} ZiB"


def _fmt_seconds(s: float) -> str:
    if s < 120:
        return f"{s:.3g} s"
    if s < 7200:
        return f"{s / 60:.3g} min"
    if s < 2 * 86400:
        return f"{s / 3600:.3g} h"
    if s < 2 * 3.15e7:
        return f"{s / 86400:.3g} days"
    return f"{s / 3.15e7:.3g} years"


def enumeration_estimate(necklaces: int, k: int) -> tuple[int, float]:
    """Worst-case memory (bytes) and rough time (seconds) to enumerate ``necklaces`` of length ``k``.

    Memory: the search itself needs O(k); the worst case is that every
    necklace is an integer cycle and is listed, ``240 + 2k`` bytes each.
    Time: about ``2e-7 (1 + k/2000)`` seconds per letter (rough; numerators
    have about ``k`` bits).

    >>> mem, secs = enumeration_estimate(10**6, 30)
    >>> mem
    300000000
    """
    per = _BYTES_PER_LISTED + 2 * k
    # numerators have about k bits: big-integer steps slow down for long words
    return necklaces * per, necklaces * k * _SECONDS_PER_LETTER * (1 + k / 2000)


def _check_limit(limit) -> int:
    if isinstance(limit, bool) or not isinstance(limit, int):
        raise InputError(f"the limit must be an integer, got {limit!r}")
    if limit < 0:
        raise InputError(f"the limit must be at least 0, got {limit}")
    return limit


def count(
    m: Map,
    k: int | None = None,
    x: int | None = None,
    *,
    content: Sequence[int] | Mapping[int, int] | None = None,
    limit: int = DEFAULT_LIMIT,
    progress: Callable[[int, int], None] | None = None,
) -> TypeCount:
    """Counting figures for one type.

    Parameters
    ----------
    m : Map
    k : int
        The length (may be omitted when ``content`` is given).
    x : int
        For two-branch maps: the number of steps on residue 1 (odd steps).
    content : sequence of d counts or mapping residue -> count, optional
        The type in general (required for ``d > 2``).
    limit : int
        Enumerate the necklaces when there are at most this many
        (default ``10**6``). A limit that would let the enumeration list
        more integer cycles than half the memory holds, or run for more than
        a day, is refused (:class:`~cycles.errors.InputError`, with the estimate).
    progress : callable(done, total), optional
        Called during the enumeration every 65536 necklaces.

    Returns
    -------
    TypeCount

    Examples
    --------
    >>> import maps
    >>> c = count(maps.get("3x+1"), 13, 8)
    >>> c.necklaces, c.denominator, c.largest_min_numerator, c.candidates, len(c.integer_cycles)
    (99, 1631, 14501, 8, 0)
    >>> [cy.minimum for cy in count(maps.get("3x+5"), 5, 3).integer_cycles]
    [19, 23]
    >>> count(maps.get("3x+1"), 5, 6)
    Traceback (most recent call last):
    ...
    cycles.errors.InputError: the number of odd steps x = 6 exceeds the length k = 5

    References
    ----------
    Böhm and Sontacchi 1978 (fixed points); Sawada 2003 (the generator);
    Eliahou 1993 (the bound); Lagarias 1985 (the heuristic).
    """
    limit = _check_limit(limit)
    c = _resolve(m, k, x, content)
    return _count_content(m, c, limit, progress)


def _count_content(
    m: Map,
    c: tuple[int, ...],
    limit: int,
    progress: Callable[[int, int], None] | None = None,
    side_hint: str | None = None,
) -> TypeCount:
    d = m.divisor
    kk = sum(c)
    A = 1
    for (a, _b), cr in zip(m.branches, c):
        if cr:
            A *= a**cr
    D = d**kk - A
    if D == 0:
        raise InputError(
            f"the type {list(c)} has D = d^k - A = 0 ({d}^{kk} = {A}): the composite has no fixed point"
        )
    words = word_count(c)
    neck = necklace_count(c)
    prim = lyndon_count(c)
    side = _side_of(m, c, D)
    bound_side = side if side in ("positive", "negative") else (side_hint or "positive")
    mb = _bound_of_content(m, c, bound_side)
    lam = _log_form(d, tuple(m.branches), c, 64)
    lf = _linear_form_bound(d, tuple(m.branches), c)
    cand_lf = candidates_from_linear_form(m, _as_mapping(c), bound_side)[0]
    labels = {
        "words": EXACT.value,
        "necklaces": EXACT.value,
        "primitive_necklaces": EXACT.value,
        "A": EXACT.value,
        "denominator": EXACT.value,
        "min_bound": PROVED.value,
        "candidates_bound": PROVED.value,
        "candidates_linear_forms": PROVED.value,
        "linear_form": PROVED.value,
        "log_form": CERTIFIED.value,
        "heuristic": HEURISTIC.value,
    }
    enumerate_it = neck <= limit
    if enumerate_it:
        mem, secs = enumeration_estimate(neck, kk)
        budget = _memory_budget()
        if mem > budget:
            raise InputError(
                f"enumerating {neck:.3g} necklaces (allowed by the limit {_fmt_count(limit)}) could need up to "
                f"{_fmt_bytes(mem)} to list integer cycles (budget {_fmt_bytes(budget)}) and about "
                f"{_fmt_seconds(secs)}; lower the limit"
            )
        if secs > _MAX_SECONDS:
            raise InputError(
                f"enumerating {neck:.3g} necklaces of length {kk} (allowed by the limit "
                f"{_fmt_count(limit)}) would take about {_fmt_seconds(secs)}; lower the limit"
            )
        smallest, largest, cycles, unrealized = _enumerate(m, c, D, neck, progress)
        cand = largest // abs(D) if largest is not None else 0
        labels.update(
            {
                "candidates": EXACT.value,
                "smallest_min_numerator": EXACT.value,
                "largest_min_numerator": EXACT.value,
                "integer_cycles": EXACT.value,
                "unrealized": EXACT.value,
            }
        )
        note = f"all {neck} necklaces enumerated (limit {limit})"
    else:
        smallest = largest = None
        cycles = None
        unrealized = None
        cand = mb.integer if mb.applies else None
        labels["candidates"] = PROVED.value if cand is not None else "none"
        note = f"not enumerated: {neck} necklaces exceed the limit {limit}"
    return TypeCount(
        map=m,
        content=c,
        words=words,
        necklaces=neck,
        primitive_necklaces=prim,
        A=A,
        denominator=D,
        side=side,
        min_bound=mb,
        enumerated=enumerate_it,
        enumeration_note=note,
        smallest_min_numerator=smallest,
        largest_min_numerator=largest,
        candidates=cand,
        integer_cycles=cycles,
        unrealized=unrealized,
        heuristic=Fraction(neck, abs(D)),
        log_form=lam,
        linear_form=lf,
        candidates_linear_forms=cand_lf,
        labels=labels,
    )


def _as_mapping(c: tuple[int, ...]) -> dict[int, int]:
    return dict(enumerate(c))


def _enumerate(m: Map, c: tuple[int, ...], D: int, total: int, progress=None):
    """Walk every necklace: cycle-minimum numerators and integer cycles (exact)."""
    d = m.divisor
    k = sum(c)
    mult = [a for a, _b in m.branches]
    offD = [b * D for _a, b in m.branches]
    smallest = None
    largest = None
    found: list[IntegerCycle] = []
    unrealized = 0
    halving = d == 2 and tuple(m.branches[0]) == (1, 0)
    a1, b1D = mult[-1], offD[-1]
    done = 0
    for arr, p, B in _search(c, list(m.branches), d):
        # numerators of the cycle's elements: N_1 = B, N_{i+1} = (a N_i + b D) / d
        N = B
        best = N if N >= 0 else -N
        if halving:
            for i in range(1, p):
                if arr[i]:
                    N = (a1 * N + b1D) >> 1
                else:
                    N >>= 1
                v = N if N >= 0 else -N
                if v < best:
                    best = v
        else:
            for i in range(1, p):
                r = arr[i]
                N = (mult[r] * N + offD[r]) // d
                v = N if N >= 0 else -N
                if v < best:
                    best = v
        if smallest is None or best < smallest:
            smallest = best
        if largest is None or best > largest:
            largest = best
        if B % D == 0:
            cyc = _integer_cycle(m, arr, p, k, B // D)
            if cyc is None:
                unrealized += 1
            else:
                found.append(cyc)
        done += 1
        if progress is not None and not done & 0xFFFF:
            progress(done, total)
    if progress is not None:
        progress(done, total)
    return smallest, largest, tuple(found), unrealized


def _integer_cycle(m: Map, arr: list[int], p: int, k: int, n0: int) -> IntegerCycle | None:
    """Check by exact iteration that the integer n0 follows the word; build the record."""
    d = m.divisor
    word = tuple(arr[1 : k + 1])
    elements = []
    n = n0
    for i in range(p):
        if n % d != word[i]:
            return None
        elements.append(n)
        n = m.step(n)
    if n != n0:  # pragma: no cover - algebraically impossible
        return None
    j = min(range(p), key=lambda i: (abs(elements[i]), elements[i]))
    root = word[:p]
    from_min = (root[j:] + root[:j]) * (k // p)
    return IntegerCycle(
        necklace=format_itinerary(word, d),
        itinerary=format_itinerary(from_min, d),
        minimum=elements[j],
        period=p,
        primitive=p == k,
    )


# ------------------------------------------------------------------ sweep
def rho(m: Map) -> float | None:
    """The theoretical growth rate of necklaces along the critical line (a float).

    For a two-branch map with residue-0 branch ``n/2`` and multiplier ``a > 2``:
    the critical line is ``k ≈ t x`` with ``t = log2 a`` and
    ``C(k, x) ≈ ρ^x`` with ``ρ = 2^(t H(1/t))``, ``H`` the binary entropy in
    bits (Stirling). None for other maps.

    >>> import maps
    >>> round(rho(maps.get("3x+1")), 6)   # equals t^t / (t-1)^(t-1)
    2.839514
    """
    if m.divisor != 2 or tuple(m.branches[0]) != (1, 0):
        return None
    a = m.branches[1].multiplier
    if a <= 2:
        return None
    t = math.log2(a)
    p = 1 / t
    H = -p * math.log2(p) - (1 - p) * math.log2(1 - p)
    return 2 ** (t * H)


def _offset_sign(m: Map) -> int:
    signs = {b > 0 for b in m.offsets if b}
    if signs == {True}:
        return 1
    if signs == {False}:
        return -1
    return 0


def _boundary_length(d: int, a0: int, x: int, P: int) -> int:
    """Smallest k >= max(x, 1) with d^k > a0^(k-x) P (0 < a0 < d)."""
    k = max(x, 1)
    # float estimate of the crossing, then exact correction
    if P > 0:
        est = (math.log(P) - x * math.log(a0)) / (math.log(d) - math.log(a0))
        k = max(k, int(math.floor(est)) - 1)
    while d**k <= a0 ** (k - x) * P:
        k += 1
    while k - 1 >= max(x, 1) and d ** (k - 1) > a0 ** (k - 1 - x) * P:
        k -= 1
    return k


def critical_lengths(
    m: Map, content_rest: Sequence[int], extra_lengths: int = 0, side: str = "positive"
) -> list[int]:
    """The lengths a sweep uses for one content of the non-zero residues.

    ``content_rest`` = ``(c_1, ..., c_{d-1})`` (for two-branch maps ``(x,)``).
    On the side whose cycles need ``D > 0`` (positive side when the offsets
    the content uses are ``>= 0``, negative side when they are ``<= 0``): the
    smallest ``k`` with ``d^k > A`` and the next ``extra_lengths``; on the
    other side the largest ``k`` with ``d^k < A`` and the ``extra_lengths``
    below it (never below ``x``). Contents whose offsets have mixed signs
    (no bound applies) follow the map's overall offset sign, or ``D > 0`` on
    the positive side when that is mixed too.

    >>> import maps
    >>> critical_lengths(maps.get("3x+1"), (8,), 2)
    [13, 14, 15]
    >>> critical_lengths(maps.get("3x+1"), (7,), 1, side="negative")
    [11, 10]
    """
    d = m.divisor
    a0 = m.branches[0].multiplier
    if not 0 < a0 < d:
        raise InputError(
            f"a sweep follows the critical line d^k ≈ A, which needs 0 < a_0 < d; this map has a_0 = {a0}"
        )
    if any(a <= 0 for a in m.multipliers):
        raise InputError("a sweep needs positive multipliers (the critical line d^k ≈ A)")
    if side not in ("positive", "negative"):
        raise InputError(f"side must be 'positive' or 'negative', got {side!r}")
    x = sum(content_rest)
    P = 1
    for (a, _b), cr in zip(m.branches[1:], content_rest):
        P *= a**cr
    kb = _boundary_length(d, a0, x, P)
    # The sign of the offsets this content uses (residue 0 is used whenever k > x).
    used = [m.branches[0].offset] + [b for (_a, b), cr in zip(m.branches[1:], content_rest) if cr]
    signs = {b > 0 for b in used if b}
    sgn = (1 if signs == {True} else -1) if len(signs) == 1 else (_offset_sign(m) or 1)
    need_positive_D = (sgn > 0) == (side == "positive")
    if need_positive_D:
        return [kb + j for j in range(extra_lengths + 1)]
    out = []
    for j in range(extra_lengths + 1):
        kk = kb - 1 - j
        if kk < max(x, 1):
            break
        out.append(kk)
    return out


def _contents_rest(d: int, x: int):
    if d == 2:
        yield (x,)
        return

    def rec(total, parts):
        if parts == 1:
            yield (total,)
            return
        for first in range(total, -1, -1):
            for rest in rec(total - first, parts - 1):
                yield (first, *rest)

    yield from rec(x, d - 1)


@dataclass
class Sweep:
    """Counting figures along the critical line, one row (:class:`TypeCount`) per type.

    Attributes
    ----------
    map : Map
    side : str
    odd : tuple of (int, int)
        The range of ``x`` (steps off residue 0; odd steps for two-branch maps).
    extra_lengths : int
    rows : list of TypeCount
    rho : float or None
        Theoretical growth rate (float).
    fitted_rate : float or None
        ``exp(slope)`` of a least-squares fit of ``ln(necklaces)`` against
        ``x`` over the upper half of the range, on the first length of each
        ``x`` (heuristic; a float).
    fitted_rate_corrected : float or None
        The same fit of ``ln(necklaces) + (3/2) ln x``, removing the
        polynomial factor ``x^(-3/2)`` of ``C(k, x) / k`` (Stirling); it
        approaches ``rho`` much faster (heuristic; a float).
    fit_range : tuple or None
    crossover_x : int or None
        Smallest ``x`` from which, for every row of the sweep, the proved bound
        on ``|minimum|`` (hence on the candidates) is below the necklace count.
    crossover_x_linear_forms : int or None
        The same with the bound obtained from the linear-forms lower bound of
        ``|Λ|`` alone.
    elapsed : float
        Seconds.
    limit : int
    """

    map: Map
    side: str
    odd: tuple[int, int]
    extra_lengths: int
    rows: list[TypeCount]
    rho: float | None
    fitted_rate: float | None
    fitted_rate_corrected: float | None
    fit_range: tuple[int, int] | None
    crossover_x: int | None
    crossover_x_linear_forms: int | None
    elapsed: float
    limit: int

    LABELS = {
        "words": EXACT.value,
        "necklaces": EXACT.value,
        "primitive_necklaces": EXACT.value,
        "denominator": EXACT.value,
        "min_bound": PROVED.value,
        "min_bound_interval": PROVED.value,
        "candidates": "exact when enumerated, else proved",
        "candidates_linear_forms": PROVED.value,
        "smallest_min_numerator": EXACT.value,
        "largest_min_numerator": EXACT.value,
        "integer_cycles": EXACT.value,
        "heuristic": HEURISTIC.value,
        "heuristic_log10": HEURISTIC.value,
        "lambda": CERTIFIED.value,
        "lambda_lower": PROVED.value,
        "rho": "exact formula, float value",
        "fitted_rate": HEURISTIC.value,
        "fitted_rate_corrected": HEURISTIC.value,
        "crossover_x": PROVED.value,
        "crossover_x_linear_forms": PROVED.value,
    }

    def __len__(self) -> int:
        return len(self.rows)

    def __iter__(self):
        return iter(self.rows)

    @property
    def columns(self) -> list[str]:
        return list(self.rows[0].row()) if self.rows else []

    def to_dicts(self) -> list[dict]:
        """The rows as a list of flat dicts."""
        return [r.row() for r in self.rows]

    def to_pandas(self):
        """The rows as a pandas DataFrame (needs pandas, which is not a dependency)."""
        try:
            import pandas as pd
        except ImportError:
            raise ImportError(
                "to_pandas() needs pandas, which cyclewright does not install; use to_dicts()"
            ) from None
        return pd.DataFrame(self.to_dicts())

    def summary(self) -> dict:
        return {
            "map": self.map.label,
            "map_key": self.map.key,
            "side": self.side,
            "odd": list(self.odd),
            "extra_lengths": self.extra_lengths,
            "limit": self.limit,
            "rows": len(self.rows),
            "rho": self.rho,
            "fitted_rate": self.fitted_rate,
            "fitted_rate_corrected": self.fitted_rate_corrected,
            "fit_range": list(self.fit_range) if self.fit_range else None,
            "crossover_x": self.crossover_x,
            "crossover_x_linear_forms": self.crossover_x_linear_forms,
            "integer_cycles_found": sum(len(r.integer_cycles or ()) for r in self.rows),
            "elapsed_seconds": round(self.elapsed, 4),
        }

    def to_dict(self) -> dict:
        out = self.summary()
        out["labels"] = dict(self.LABELS)
        out["rows"] = self.to_dicts()
        return out

    def __repr__(self) -> str:
        lo, hi = self.odd
        r = f"{self.rho:.4f}" if self.rho else "-"
        f = f"{self.fitted_rate_corrected:.4f}" if self.fitted_rate_corrected else "-"
        return (
            f"Sweep({self.map.label}, {self.side} side, x={lo}..{hi}, {len(self.rows)} rows: "
            f"necklace growth {f} fitted (heuristic) vs rho {r}; candidate bound below the "
            f"necklaces from x={self.crossover_x} (proved), with linear forms only from "
            f"x={self.crossover_x_linear_forms}; {self.elapsed:.2f} s)"
        )


def sweep(
    m: Map,
    odd: Iterable[int] = range(1, 101),
    extra_lengths: int = 0,
    side: str = "positive",
    *,
    limit: int = DEFAULT_SWEEP_LIMIT,
    progress: Callable[[int, int], None] | None = None,
) -> Sweep:
    """Count every type along the critical line for a range of ``x``.

    For each ``x`` (odd steps; for ``d > 2``: steps off residue 0, with one row
    per content of the non-zero residues) the lengths come from
    :func:`critical_lengths`.

    Parameters
    ----------
    m : Map
    odd : iterable of int
        The values of ``x`` (each ``>= 0``).
    extra_lengths : int
        How many further lengths per ``x``.
    side : {"positive", "negative"}
    limit : int
        Enumerate a row's necklaces when there are at most this many
        (default ``10**4``, to keep sweeps interactive).
    progress : callable(done, total), optional
        Called after each row.

    Returns
    -------
    Sweep

    Examples
    --------
    >>> import maps
    >>> s = sweep(maps.get("3x+1"), range(1, 41))
    >>> s.rows[7].type_text(), s.rows[7].necklaces, s.rows[7].candidates
    ('k=13, x=8', 99, 8)
    >>> s.crossover_x
    6
    """
    xs = sorted(set(int(v) for v in odd))
    if not xs:
        raise InputError("the range of x is empty")
    if xs[0] < 0:
        raise InputError(f"x must be at least 0, got {xs[0]}")
    if isinstance(extra_lengths, bool) or not isinstance(extra_lengths, int) or extra_lengths < 0:
        raise InputError(f"extra lengths must be an integer >= 0, got {extra_lengths!r}")
    if side not in ("positive", "negative"):
        raise InputError(f"side must be 'positive' or 'negative', got {side!r}")
    limit = _check_limit(limit)
    d = m.divisor
    n_rest = sum(math.comb(x + d - 2, d - 2) for x in xs)
    if n_rest * (extra_lengths + 1) > 2_000_000:
        raise InputError(
            f"this sweep would have about {n_rest * (extra_lengths + 1)} rows; narrow the range of x"
        )
    t0 = time.perf_counter()
    plan: list[tuple[int, ...]] = []
    for x in xs:
        for rest in _contents_rest(d, x):
            for kk in critical_lengths(m, rest, extra_lengths, side):
                plan.append((kk - x, *rest))
    rows: list[TypeCount] = []
    for i, c in enumerate(plan):
        rows.append(_count_content(m, c, limit, None, side_hint=side))
        if progress is not None:
            progress(i + 1, len(plan))
    elapsed = time.perf_counter() - t0
    fitted, fit_range = _fit_rate(rows, xs, 0.0)
    corrected, _ = _fit_rate(rows, xs, 1.5)
    cross = _crossover(rows, lambda r: r.candidates_bound)
    cross_lf = _crossover(rows, lambda r: r.candidates_linear_forms)
    return Sweep(
        map=m,
        side=side,
        odd=(xs[0], xs[-1]),
        extra_lengths=extra_lengths,
        rows=rows,
        rho=rho(m),
        fitted_rate=fitted,
        fitted_rate_corrected=corrected,
        fit_range=fit_range,
        crossover_x=cross,
        crossover_x_linear_forms=cross_lf,
        elapsed=elapsed,
        limit=limit,
    )


def _fit_rate(rows: list[TypeCount], xs: list[int], power: float):
    """Least-squares slope of ln(total necklaces at the first length) + power ln x against x (upper half)."""
    per_x: dict[int, int] = {}
    first_k: dict[tuple, int] = {}
    for r in rows:
        key = (r.off_zero, r.content[1:])
        if key not in first_k:
            first_k[key] = r.length
            per_x[r.off_zero] = per_x.get(r.off_zero, 0) + r.necklaces
    pts = sorted(
        (x, math.log(n) + power * math.log(x)) for x, n in per_x.items() if n > 0 and x > 0
    )
    if len(pts) < 3:
        return None, None
    mid = (pts[0][0] + pts[-1][0]) / 2
    upper = [p for p in pts if p[0] >= mid]
    if len(upper) < 3:
        upper = pts
    n = len(upper)
    sx = sum(p[0] for p in upper)
    sy = sum(p[1] for p in upper)
    sxx = sum(p[0] ** 2 for p in upper)
    sxy = sum(p[0] * p[1] for p in upper)
    den = n * sxx - sx * sx
    if den == 0:
        return None, None
    slope = (n * sxy - sx * sy) / den
    return math.exp(slope), (upper[0][0], upper[-1][0])


def _crossover(rows: list[TypeCount], bound_of) -> int | None:
    """Smallest x such that every row with x' >= x has bound < necklaces (None if the last fails)."""
    bad: dict[int, bool] = {}
    for r in rows:
        b = bound_of(r)
        fails = b is None or b >= r.necklaces
        bad[r.off_zero] = bad.get(r.off_zero, False) or fails
    answer = None
    for x in sorted(bad, reverse=True):
        if bad[x]:
            break
        answer = x
    return answer
