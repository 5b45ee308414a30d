"""The counting framework: how many itineraries of a type could close into integer cycles.

Inside
------
- :func:`count` -- one type (``(k, x)`` for two-branch maps, a content in
  general) to :class:`TypeCount`: words, necklaces and primitive necklaces
  (closed formulas), the denominator ``D = d^k - A`` and the side it serves,
  the proved bound on a cycle minimum, candidates, integer cycles (by
  enumeration when the necklaces are few enough), the heuristic expectation
  ``necklaces / |D|``, ``Λ = k ln d - ln A`` and its linear-forms lower bound.
- integer cycles found by the enumeration are
  :class:`~cyclewright.cycles.integer_cycle.IntegerCycle` records.
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

Labels: counts, ``D``, enumerated figures ``exact``; the minimum bound and
candidates from it ``proved``; ``Λ`` intervals and the best-approximation
lower bound for ``|Λ|`` ``certified`` (interval arithmetic on the certified
continued fraction); ``necklaces/|D|`` and fitted rates ``heuristic``.

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
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from fractions import Fraction

from cyclewright.maps import Map, as_map

from .errors import InputError
from .integer_cycle import IntegerCycle, cycle_from_element
from .intervals import Interval, _log_form
from .itinerary import OfContent
from .labels import CERTIFIED, EXACT, HEURISTIC, PROVED
from .limits import (
    MAX_ENUMERATION_SECONDS,
    check_range,
    check_type_length,
    int_digits,
    limits_lifted,
    short_int,
)
from .linear_forms import (
    LinearFormBound,
    _best_approximation_form,
    _linear_form_bound,
    candidates_from_linear_form,
)
from .minimum_bound import MinimumBound, _bound_of_content
from .necklaces import (
    _search,
    lyndon_count,
    necklace_count,
    normalize_content,
    type_content,
    word_count,
)
from .presentation import Magnitude, Presentable, Table, duration_text
from .progress import ProgressCallback, report
from .solver import cycle_representative

__all__ = [
    "DEFAULT_LIMIT",
    "DEFAULT_SWEEP_LIMIT",
    "TypeCount",
    "count",
]


DEFAULT_LIMIT = 10**6
"""Enumerate a type when it has at most this many necklaces (``count``)."""

DEFAULT_SWEEP_LIMIT = 10**4
"""The same for each row of a ``sweep`` (kept small so that sweeps stay interactive)."""

_BYTES_PER_LISTED = 240  # an IntegerCycle without its strings and elements, CPython, roughly
# enumeration cost per necklace letter, growing with k (numerators of about k bits); measured
# on 3x+1 for k = 30 .. 1004 (1.1e-6 .. 2.0e-5 s a letter), rough on any other machine
_SECONDS_PER_LETTER = 1e-6


# ------------------------------------------------------------------ results
_TYPE_COLUMNS = (
    "necklaces",
    "primitive necklaces",
    "D",
    "side",
    "min bound",
    "candidates",
    "candidates label",
    "integer cycles",
    "of which primitive (period k)",
    "necklaces/|D|",
    "candidates from linear forms",
)
_TYPE_LABELS = {
    "necklaces": EXACT.value,
    "primitive necklaces": EXACT.value,
    "D": EXACT.value,
    "min bound": PROVED.value,
    "integer cycles": EXACT.value,
    "of which primitive (period k)": EXACT.value,
    "necklaces/|D|": HEURISTIC.value,
    "candidates from linear forms": PROVED.value,
}


def _down4(q: Fraction) -> str:
    """A positive rational rounded down to four significant digits, e.g. ``5.212e-2``.

    >>> _down4(Fraction(52125, 10**6))
    '5.212e-2'
    """
    e = (
        len(str(q.numerator // q.denominator)) - 1
        if q >= 1
        else -len(str(q.denominator // q.numerator))
    )
    while Fraction(10) ** e > q:
        e -= 1
    while Fraction(10) ** (e + 1) <= q:
        e += 1
    mant = math.floor(q / Fraction(10) ** (e - 3))
    return f"{mant // 1000}.{mant % 1000:03d}e{e}"


@dataclass(frozen=True)
class TypeCount(OfContent, Presentable):
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
        The integer cycles whose itinerary is a necklace of this type (a
        cycle of length ``p < k`` when the necklace is a power of a word of
        length ``p``); None when not enumerated.
    unrealized : int or None
        Integral fixed points whose itinerary the map does not follow
        (possible only when a multiplier shares a factor with ``d``).
    heuristic : Fraction
        ``necklaces / |D|`` (heuristic expectation of integer cycles).
    log_form : Interval
        ``Λ = k ln d - ln A``, certified.
    linear_form : LinearFormBound
        Lower bound for ``|Λ|``: ``certified`` from the continued fraction's
        best approximations (valid for every type with the same bases and at
        most as many factors of the second one; no recalled constant) wherever
        ``Λ`` has two independent bases, else the published bounds (``proved``,
        from memory).
    candidates_linear_forms : int or None
        The bound on ``|minimum|`` obtained from the linear-forms bound alone (proved).
    followed_words : int or None
        Words of the content followed by some integer (exact; equal to
        ``words`` when every multiplier is prime to ``d``; None when the walk
        would exceed the limit). :mod:`cyclewright.cycles.realizable`.
    realizable_necklaces, realizable_primitive_necklaces : int or None
        Necklaces (and Lyndon words) whose rational cycle is realized: the
        itineraries that could close (exact; None above the limit). When
        known, ``heuristic`` is ``realizable_necklaces / |D|``.
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
    followed_words: int | None = None
    realizable_necklaces: int | None = None
    realizable_primitive_necklaces: int | None = None
    labels: dict = field(default_factory=dict, compare=False)

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
    def heuristic_counts_every_itinerary(self) -> bool:
        """True when ``heuristic`` counts necklaces no integer or rational cycle can follow."""
        return not self.map.multipliers_prime_to_divisor() and self.realizable_necklaces is None

    @property
    def heuristic_log10(self) -> float:
        """``log10(heuristic)`` as a float (for display and plots)."""
        num = self.heuristic.numerator * abs(self.denominator) // self.heuristic.denominator
        return _log10(num) - _log10(abs(self.denominator))

    def type_text(self) -> str:
        if len(self.content) == 2:
            return f"k={self.length}, x={self.content[1]}"
        return f"k={self.length}, content {list(self.content)}"

    @property
    def primitive_integer_cycles(self) -> tuple[IntegerCycle, ...] | None:
        """The integer cycles whose period is the type's length (a primitive itinerary)."""
        if self.integer_cycles is None:
            return None
        return tuple(c for c in self.integer_cycles if c.length == self.length)

    @property
    def repeated_integer_cycles(self) -> tuple[IntegerCycle, ...] | None:
        """Shorter cycles whose itinerary, repeated ``k/p`` times, has this type (not new cycles)."""
        if self.integer_cycles is None:
            return None
        return tuple(c for c in self.integer_cycles if c.length != self.length)

    def figures_table(self) -> Table:
        """Every figure of the type with its label, one per row (the ``count`` command's view)."""
        b = self.min_bound
        lab = self.labels
        if not b.applies:
            bound = f"does not apply: {b.reason}"
        elif not b.possible:
            bound = f"no cycle possible: {b.reason}"
        else:
            bound = b.integer
        lf = self.linear_form
        rows: list[tuple] = [
            ("words", self.words, lab["words"]),
            ("necklaces", self.necklaces, lab["necklaces"]),
            ("primitive necklaces", self.primitive_necklaces, lab["primitive_necklaces"]),
        ]
        if not self.map.multipliers_prime_to_divisor():
            for name, value in (
                ("words followed by an integer", self.followed_words),
                ("realizable necklaces", self.realizable_necklaces),
                ("realizable primitive necklaces", self.realizable_primitive_necklaces),
            ):
                rows.append(
                    (name, "not counted (above the limit)", "-")
                    if value is None
                    else (name, value, EXACT.value)
                )
        rows += [
            ("denominator D", self.denominator, lab["denominator"]),
            ("min bound (|min| <=)", bound, lab["min_bound"]),
        ]
        if b.applies and b.possible:
            rows.append(("real bound in", str(b.interval), lab["min_bound"]))
        if b.applies:
            rows.append(("bound formula", b.formula, lab["min_bound"]))
        if self.enumerated:
            rows += [
                ("smallest cycle-min numerator", self.smallest_min_numerator, EXACT.value),
                ("largest cycle-min numerator", self.largest_min_numerator, EXACT.value),
                ("candidates (multiples of |D|)", self.candidates, EXACT.value),
                ("integer cycles", len(self.integer_cycles or ()), EXACT.value),
                (
                    "  of which primitive (period k)",
                    len(self.primitive_integer_cycles or ()),
                    EXACT.value,
                ),
                (
                    "  of which a shorter cycle repeated",
                    len(self.repeated_integer_cycles or ()),
                    EXACT.value,
                ),
            ]
            if self.unrealized:
                rows.append(("integral but not realized", self.unrealized, EXACT.value))
        else:
            rows += [
                ("candidates (from the bound)", self.candidates, lab["candidates"]),
                ("integer cycles", "not enumerated", "-"),
            ]
        l10 = self.heuristic_log10
        heur = f"{10**l10:.6g}" if -6 < l10 < 9 else f"10^{l10:.4f}"
        over = self.heuristic_counts_every_itinerary
        rows += [
            (
                "heuristic necklaces/|D|"
                if self.map.multipliers_prime_to_divisor()
                else "heuristic necklaces/|D| (every itinerary: over-counts)"
                if over
                else "heuristic realizable necklaces/|D|",
                heur,
                HEURISTIC.value,
            ),
            ("Λ = k ln d - ln |A|", str(self.log_form), CERTIFIED.value),
            (
                "|Λ| lower bound",
                f"{lf.lower_text()} ({lf.source}{', from memory' if lf.from_memory else ''})"
                if lf.applies
                else f"not available: {lf.reason}",
                lab["linear_form"] if lf.applies else "-",
            ),
            (
                "|min| bound from |Λ| bound",
                Magnitude(self.candidates_linear_forms)
                if self.candidates_linear_forms is not None
                else "-",
                PROVED.value if self.candidates_linear_forms is not None else "-",
            ),
        ]
        return Table(
            f"Type {self.type_text()}",
            ("figure", "value", "label"),
            tuple(rows),
            {},
            self.enumeration_note,
        )

    @staticmethod
    def table_columns() -> tuple[str, ...]:
        """The columns of :meth:`table`."""
        return _TYPE_COLUMNS

    def table(self) -> Table:
        """The type's figures in one row, each column labelled."""
        return Table(
            f"Type {self.type_text()}",
            _TYPE_COLUMNS,
            (
                (
                    self.necklaces,
                    self.primitive_necklaces,
                    self.denominator,
                    self.side,
                    self.min_bound.integer,
                    self.candidates,
                    "exact" if self.enumerated else "proved",
                    len(self.integer_cycles) if self.integer_cycles is not None else None,
                    len(self.primitive_integer_cycles)
                    if self.primitive_integer_cycles is not None
                    else None,
                    float(self.heuristic),
                    self.candidates_linear_forms,
                ),
            ),
            dict(_TYPE_LABELS),
            "candidates are exact when the type's necklaces were enumerated, else the proved "
            "bound; necklaces/|D| is a heuristic expectation (a float), never a proof.",
        )

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
            "followed_words": self.followed_words,
            "realizable_necklaces": self.realizable_necklaces,
            "realizable_primitive_necklaces": self.realizable_primitive_necklaces,
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
            "primitive_integer_cycles": None
            if self.primitive_integer_cycles is None
            else len(self.primitive_integer_cycles),
            "repeated_integer_cycles": None
            if self.repeated_integer_cycles is None
            else len(self.repeated_integer_cycles),
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
            "followed_words": self.followed_words,
            "realizable_necklaces": self.realizable_necklaces,
            "realizable_primitive_necklaces": self.realizable_primitive_necklaces,
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
    # never converts a huge integer whole (Python refuses more than 4300 digits as text)
    d = int_digits(n)
    if d <= 24:
        return str(n)
    return f"{short_int(n, 6).split('…')[0]}…({d} digits)"


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


def _sci(n: int | float) -> str:
    """``1.43e+42`` for a count, and ``10^5000`` (its order) past the range of floats."""
    if n < 1e300:
        return f"{n:.3g}"
    n = int(n)
    d = int((n.bit_length() - 1) * 0.30102999566398120)
    return f"about 10^{d + 1 if n >= 10 ** (d + 1) else d}"


def _fmt_count(n: int) -> str:
    return str(n) if n < 10**9 else _sci(n)


def _fmt_bytes(n: float) -> str:
    if n >= 1e300:
        return f"{_sci(n)} B"
    for unit in ("B", "KiB", "MiB", "GiB", "TiB", "PiB", "EiB"):
        if n < 1024:
            return f"{n:.3g} {unit}"
        n /= 1024
    return f"{n:.3g} ZiB"


def enumeration_estimate(necklaces: int, k: int) -> tuple[int, float]:
    """Worst-case memory (bytes) and rough time (seconds) to enumerate ``necklaces`` of length ``k``.

    Memory: the search itself needs O(k); the worst case is that every
    necklace is an integer cycle and is listed, ``240 + 2k`` bytes each plus
    its ``k`` elements (a pointer and an integer of about ``k`` bits each:
    ``k (36 + k // 8)`` bytes).
    Time: about ``1e-6 (1 + k/50)`` seconds per letter (rough; numerators
    have about ``k`` bits, and each necklace's rotations are compared).

    >>> mem, secs = enumeration_estimate(10**6, 30)
    >>> mem
    1470000000
    """
    per = _BYTES_PER_LISTED + 2 * k + k * (36 + k // 8)
    # numerators have about k bits: big-integer steps slow down for long words
    work = float(min(necklaces * k, 10**300))  # beyond floats the estimate is "forever" anyway
    secs = work * _SECONDS_PER_LETTER * (1 + k / 50)
    return necklaces * per, (secs if necklaces * k < 10**300 else float("inf"))


def _check_limit(limit) -> int:
    return check_range(limit, "limit", minimum=0)


def count(
    m: Map | str,
    k: int | None = None,
    x: int | None = None,
    *,
    content: Sequence[int] | Mapping[int, int] | None = None,
    limit: int = DEFAULT_LIMIT,
    progress: ProgressCallback | None = None,
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
        :data:`~cyclewright.cycles.limits.MAX_ENUMERATION_SECONDS` (liftable), is refused (:class:`~cyclewright.cycles.errors.InputError`, with the estimate).
    progress : ProgressCallback, optional
        Called with a :class:`~cyclewright.cycles.progress.ProgressEvent`
        (phase ``"enumerate"``, unit ``"necklaces"``) every 65536 necklaces
        of the enumeration and at its end.

    Returns
    -------
    TypeCount

    Examples
    --------
    >>> from cyclewright import maps
    >>> c = count(maps.get("3x+1"), 13, 8)
    >>> c.necklaces, c.denominator, c.largest_min_numerator, c.candidates, len(c.integer_cycles)
    (99, 1631, 14501, 8, 0)
    >>> [cy.minimum for cy in count(maps.get("3x+5"), 5, 3).integer_cycles]
    [19, 23]
    >>> count(maps.get("3x+1"), 5, 6)
    Traceback (most recent call last):
    ...
    cyclewright.cycles.errors.InputError: the number of odd steps x = 6 exceeds the length k = 5

    References
    ----------
    Böhm and Sontacchi 1978 (fixed points); Sawada 2003 (the generator);
    Eliahou 1993 (the bound); Lagarias 1985 (the heuristic).
    """
    m = as_map(m)
    limit = _check_limit(limit)
    c = _resolve(m, k, x, content)
    check_type_length(sum(c), "k")
    return _count_content(m, c, limit, progress)


def _count_content(
    m: Map,
    c: tuple[int, ...],
    limit: int,
    progress: ProgressCallback | None = None,
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
    # |Λ| from below: certified by best approximations wherever Λ has two independent
    # bases (no recalled constant); the published constants (from memory) only elsewhere
    lf = _best_approximation_form(d, tuple(m.branches), c) or _linear_form_bound(
        d, tuple(m.branches), c
    )
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
        "linear_form": lf.label,
        "log_form": CERTIFIED.value,
        "heuristic": HEURISTIC.value,
    }
    enumerate_it = neck <= limit
    if enumerate_it:
        mem, secs = enumeration_estimate(neck, kk)
        budget = _memory_budget()
        if mem > budget:
            raise InputError(
                f"enumerating {_sci(neck)} necklaces (allowed by the limit {_fmt_count(limit)}) could need up to "
                f"{_fmt_bytes(mem)} to list integer cycles (budget {_fmt_bytes(budget)}) and about "
                f"{duration_text(secs)}; lower the limit"
            )
        if secs > MAX_ENUMERATION_SECONDS and not limits_lifted():
            raise InputError(
                f"enumerating {_sci(neck)} necklaces of length {kk} (allowed by the limit "
                f"{_fmt_count(limit)}) would take about {duration_text(secs)}; lower the limit"
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
        note = f"all {short_int(neck)} necklaces enumerated (limit {short_int(limit)})"
    else:
        smallest = largest = None
        cycles = None
        unrealized = None
        cand = mb.integer if mb.applies else None
        labels["candidates"] = PROVED.value  # None when no bound applies (nothing claimed)
        note = f"not enumerated: {short_int(neck)} necklaces exceed the limit {short_int(limit)}"
    if m.multipliers_prime_to_divisor():
        followed, real_neck, real_prim = words, neck, prim
    else:
        from .realizable import followed_word_count, realizable_necklace_counts

        followed = followed_word_count(m, c, limit=max(limit, 1) * (kk + 1))
        rc = realizable_necklace_counts(m, c, limit=limit)
        real_neck = rc.necklaces if rc is not None else None
        real_prim = rc.primitive_necklaces if rc is not None else None
        if real_neck is None:
            note += (
                "; a multiplier shares a factor with d, so some itineraries are followed by no "
                "integer: words, necklaces and necklaces/|D| count every itinerary (they "
                "over-count) and the realizable ones were not counted (above the limit)"
            )
        else:
            note += (
                "; a multiplier shares a factor with d: words and necklaces count every "
                "itinerary, the realizable rows only those that can occur, and the heuristic "
                "uses the realizable necklaces"
            )
    labels.update(
        {
            "followed_words": EXACT.value,
            "realizable_necklaces": EXACT.value,
            "realizable_primitive_necklaces": EXACT.value,
        }
    )
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
        heuristic=Fraction(real_neck if real_neck is not None else neck, abs(D)),
        log_form=lam,
        linear_form=lf,
        candidates_linear_forms=cand_lf,
        followed_words=followed,
        realizable_necklaces=real_neck,
        realizable_primitive_necklaces=real_prim,
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
            report(progress, "enumerate", done, total, "necklaces")
    report(progress, "enumerate", done, total, "necklaces")
    return smallest, largest, tuple(found), unrealized


def _integer_cycle(m: Map, arr: list[int], p: int, k: int, n0: int) -> IntegerCycle | None:
    """Check by exact iteration that the integer n0 follows the word; build the record.

    The cycle's length is ``p``, the period of the necklace (``p < k`` when the
    type's word is a power: the cycle is then traversed ``k / p`` times).
    """
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
    return cycle_from_element(m, cycle_representative(elements), p)
