"""Orbits of single integers, with stopping time and cycle detection.

Inside
------
- :func:`brent` -- Brent's cycle detection for any function, with a step cap.
- :func:`orbit` -- follow ``n`` under a map: values, itinerary, stopping time,
  tail length and the cycle entered, peak; for ``ax+b`` maps also the classic
  (undivided) step count and peak.
- :class:`Orbit` -- the result.

Conventions
-----------
*Stopping time* of ``n != 0``: the least ``i >= 1`` with ``|T^i(n)| < |n|``
(for positive ``n`` this is Terras' stopping time; for negative ``n`` it
mirrors it on the absolute value). ``None`` for ``n = 0`` or when the orbit
does not get below ``|n|`` within the cap.

*Cycle minimum*: the cycle element of least absolute value (the negative one
on a tie), so ``-5`` for the cycle ``{-5, -7, -10}``.

*Value cap*: an orbit may not grow without bound. Unless a ``ceiling`` is
given, it stops with status ``"escaped"`` once a value's absolute value
exceeds ``max(|n|, 1) * 10^DEFAULT_GROWTH_DIGITS`` (:func:`default_ceiling`),
exactly as the step cap stops it with status ``"capped"``; neither is a
statement that the orbit diverges. Memory is then at most about
``max_steps`` values of the ceiling's size (:func:`orbit_memory_estimate`).

*Total steps*: steps until the orbit first reaches its cycle's minimum (for
3x+1, the steps to reach 1). For a divided ``ax+b`` map the classic count of
the undivided map is ``total_steps + odd steps among them`` (OEIS A006577 for 3x+1).

References
----------
.. [1] R. P. Brent, "An improved Monte Carlo factorization algorithm",
   BIT 20 (1980) 176-184 (the cycle-finding method).
.. [2] R. Terras, Acta Arithmetica 30 (1976) 241-252 (stopping time).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, replace
from typing import TypeVar

from cyclewright.maps import Map, as_map

from .errors import InputError
from .itinerary import format_itinerary
from .labels import EXACT
from .limits import (
    DEFAULT_MAX_STEPS,
    VALUE_CAP_DIGITS,
    check_memory,
    check_range,
    check_start,
    check_step_cap,
    short_int,
    value_cap,
)
from .presentation import Presentable, Table

__all__ = [
    "brent",
    "check_orbit",
    "orbit",
    "Orbit",
    "DEFAULT_GROWTH_DIGITS",
    "default_ceiling",
    "orbit_memory_estimate",
]

T = TypeVar("T")

#: Without an explicit ceiling an orbit stops ("escaped") once it has grown
#: by this many decimal digits over its start (the shared
#: :data:`~cyclewright.cycles.limits.VALUE_CAP_DIGITS`).
DEFAULT_GROWTH_DIGITS = VALUE_CAP_DIGITS


def default_ceiling(n: int) -> int:
    """The value cap used when no ceiling is given: ``max(|n|, 1) * 10^1000``.

    The cap the functional graph uses too (:func:`~cyclewright.cycles.limits.value_cap`).

    >>> default_ceiling(7) == 7 * 10**1000
    True
    """
    return value_cap(n)


def orbit_memory_estimate(max_steps: int, ceiling: int) -> int:
    """Bytes an :func:`orbit` may hold at most: ``max_steps + 1`` values below ``ceiling``.

    A CPython integer takes about 28 bytes plus 4 bytes per 30 bits, and the
    list of values 8 bytes per entry.

    >>> orbit_memory_estimate(100_000, 10**1000) // 10**6
    48
    """
    per_value = 36 + 4 * (ceiling.bit_length() // 30 + 1)
    return (max_steps + 1) * per_value


def brent(f: Callable[[T], T], x0: T, max_steps: int) -> tuple[int, int] | None:
    """Brent's cycle detection: ``(mu, lam)`` = (tail length, cycle length).

    Uses at most about ``3 * max_steps`` evaluations of ``f`` and O(1) memory;
    returns None when no cycle closes within ``max_steps`` steps of ``x0``.

    Parameters
    ----------
    f : callable
    x0 : start
    max_steps : int
        Give up when ``mu + lam`` would exceed this many steps.

    Examples
    --------
    >>> brent(lambda n: n // 2 if n % 2 == 0 else 3 * n + 1, 7, 1000)
    (14, 3)
    """
    power = lam = 1
    tortoise = x0
    hare = f(x0)
    steps = 1
    while tortoise != hare:
        if power == lam:
            tortoise = hare
            power *= 2
            lam = 0
        hare = f(hare)
        lam += 1
        steps += 1
        if steps > 2 * max_steps + 2:
            return None
    tortoise = hare = x0
    for _ in range(lam):
        hare = f(hare)
    mu = 0
    while tortoise != hare:
        tortoise = f(tortoise)
        hare = f(hare)
        mu += 1
        if mu > max_steps:
            return None
    if mu + lam > max_steps:
        return None
    return mu, lam


@dataclass(frozen=True)
class Orbit(Presentable):
    """The orbit of one integer (all figures exact).

    In a notebook it shows as two HTML tables (:meth:`figures_table` and
    the first :data:`SHOWN_VALUES` rows of :meth:`table`); ``to_pandas()``
    gives every step as a DataFrame.

    Attributes
    ----------
    start : int
    values : tuple of int
        ``n, T(n), ...`` up to and including the first return to the cycle's
        entry point (``mu + lam + 1`` values), or up to the cap/ceiling.
    itinerary : tuple of int
        Residues of ``values[:-1]``.
    stopping_time : int or None
        See the module docstring.
    tail : int or None
        Steps before the orbit enters its cycle (``mu``).
    cycle : tuple of int
        The cycle entered, rotated to start at its minimum; empty if none found.
    total_steps : int or None
        Steps until the orbit first reaches the cycle's minimum.
    peak : int
        The value of largest absolute value seen.
    status : str
        ``"cycle"``, ``"capped"`` (no cycle within ``max_steps``) or
        ``"escaped"`` (passed the ceiling, by default the value cap
        :func:`default_ceiling`).
    """

    map: Map
    start: int
    values: tuple[int, ...]
    itinerary: tuple[int, ...]
    stopping_time: int | None
    tail: int | None
    cycle: tuple[int, ...]
    total_steps: int | None
    peak: int
    status: str
    max_steps: int
    ceiling: int | None

    @property
    def steps(self) -> int:
        """Steps taken (``len(values) - 1``)."""
        return len(self.values) - 1

    @property
    def cycle_minimum(self) -> int | None:
        return self.cycle[0] if self.cycle else None

    @property
    def undivided_total_steps(self) -> int | None:
        """For divided ``ax+b`` maps: ``total_steps`` plus the odd steps among them."""
        if self.map.ax_b is None or self.total_steps is None:
            return None
        return self.total_steps + sum(self.itinerary[: self.total_steps])

    @property
    def undivided_peak(self) -> int | None:
        """For divided ``ax+b`` maps: the peak of the undivided trajectory (``a n + b`` before halving).

        Taken over the values listed (through the cycle, or up to the cap).
        """
        ab = self.map.ax_b
        if ab is None:
            return None
        a, b = ab
        best = self.peak
        for v, r in zip(self.values, self.itinerary):
            if r == 1 and abs(a * v + b) > abs(best):
                best = a * v + b
        return best

    #: Steps listed by the notebook display (``table()`` holds them all).
    SHOWN_VALUES = 20

    def figures_table(self) -> Table:
        """The orbit's figures, one a row (all exact), as ``orbit`` prints them."""
        rows: list[tuple] = [
            ("status", self.status),
            ("steps taken", self.steps),
            ("stopping time", self.stopping_time),
            ("steps before the cycle", self.tail),
            ("cycle length", len(self.cycle) if self.cycle else None),
            ("cycle minimum", self.cycle_minimum),
            ("steps to the cycle minimum", self.total_steps),
            ("largest value (peak)", self.peak),
        ]
        if self.map.ax_b is not None:
            rows += [
                ("steps to the cycle minimum, undivided count", self.undivided_total_steps),
                ("largest value, undivided path", self.undivided_peak),
            ]
        note = {
            "capped": "the step cap stopped the orbit before it closed a cycle",
            "escaped": "the orbit passed its value cap: not a proof of divergence",
        }.get(self.status, "")
        return Table(
            f"Orbit of {self.start} under {self.map.label}",
            ("figure", "value"),
            tuple(rows),
            {"value": EXACT.value},
            note,
        )

    def table(self) -> Table:
        """One row per step: the step, the value and its residue mod d (all exact)."""
        d = self.map.divisor
        return Table(
            f"Orbit of {self.start} under {self.map.label}, step by step",
            ("step", "value", "residue"),
            tuple((i, v, v % d) for i, v in enumerate(self.values)),
            {"value": EXACT.value, "residue": EXACT.value},
        )

    def _display_tables(self) -> list[Table]:
        steps = self.table()
        shown = steps.head(self.SHOWN_VALUES)
        if len(steps.rows) > len(shown.rows):
            more = len(steps.rows) - len(shown.rows)
            shown = replace(shown, note=f"{more} more steps in .table() and .to_pandas()")
        return [self.figures_table(), shown]

    def to_pandas(self):
        """Every step (:meth:`table`) as a pandas DataFrame (pandas is optional)."""
        return self.table().to_pandas()

    def to_dict(self, max_values: int | None = 1000) -> dict:
        vals = list(self.values if max_values is None else self.values[:max_values])
        d = self.map.divisor
        return {
            "map": self.map.label,
            "map_key": self.map.key,
            "start": self.start,
            "status": self.status,
            "steps": self.steps,
            "stopping_time": self.stopping_time,
            "tail": self.tail,
            "cycle": list(self.cycle),
            "cycle_minimum": self.cycle_minimum,
            "cycle_length": len(self.cycle),
            "total_steps": self.total_steps,
            "peak": self.peak,
            "undivided_total_steps": self.undivided_total_steps,
            "undivided_peak": self.undivided_peak,
            "values": vals,
            "values_truncated": len(vals) < len(self.values),
            "itinerary": format_itinerary(self.itinerary[: len(vals)], d),
            "max_steps": self.max_steps,
            "ceiling": self.ceiling,
            "label": EXACT.value,
        }

    def __repr__(self) -> str:
        cyc = (
            "{"
            + ", ".join(map(str, self.cycle[:8]))
            + (", ..." if len(self.cycle) > 8 else "")
            + "}"
        )
        return (
            f"Orbit({self.map.label}, {self.start}: {self.status}, steps={self.steps}, "
            f"stopping_time={self.stopping_time}, cycle={cyc if self.cycle else None}, peak={self.peak})"
        )


def check_orbit(n: int, max_steps: int, ceiling: int | None = None) -> None:
    """Refuse an :func:`orbit` that cannot finish within the limits (:class:`InputError`, one line).

    ``|n|`` has at most :data:`~cyclewright.cycles.limits.MAX_START_DIGITS`
    digits; ``max_steps`` is 1 ..
    :data:`~cyclewright.cycles.limits.MAX_STEP_CAP`; ``ceiling`` is at
    least ``|n|``; the values the orbit may hold
    (:func:`orbit_memory_estimate`) fit the memory budget. The limits on
    size are lifted inside :func:`~cyclewright.cycles.limits.lift_limits`.

    >>> check_orbit(27, 1000)
    >>> check_orbit(7, 10**8, None)
    Traceback (most recent call last):
    ...
    cyclewright.cycles.errors.InputError: an orbit of 100000000 steps with values up to |N| * 10^1000 could need about 48.0 GB of memory, more than the 2.1 GB allowed; lower max_steps or the ceiling
    """
    check_start(n, "n")
    check_step_cap(max_steps, liftable=True)
    if ceiling is not None:
        check_range(ceiling, "ceiling", minimum=0)
        if ceiling < abs(n):
            raise InputError(
                f"ceiling {short_int(ceiling)} is below the start's |value| "
                f"{short_int(abs(n))}: give a larger one, or no ceiling",
                param="ceiling",
            )
    check_memory(
        orbit_memory_estimate(max_steps, ceiling if ceiling is not None else default_ceiling(n)),
        f"an orbit of {max_steps} steps with values up to "
        + (short_int(ceiling) if ceiling is not None else f"|N| * 10^{DEFAULT_GROWTH_DIGITS}"),
        hint="lower max_steps or the ceiling",
        param="max_steps",
    )


def orbit(
    m: Map | str, n: int, max_steps: int = DEFAULT_MAX_STEPS, ceiling: int | None = None
) -> Orbit:
    """Follow ``n`` under ``m`` until it closes a cycle, passes ``ceiling`` or ``max_steps``.

    Parameters
    ----------
    m : Map
    n : int
    max_steps : int
        Cap on the number of steps (the orbit never loops forever); default
        :data:`~cyclewright.cycles.limits.DEFAULT_MAX_STEPS`.
    ceiling : int, optional
        Stop with status ``"escaped"`` once ``|value|`` exceeds this; by
        default the value cap :func:`default_ceiling` (``|n| * 10^1000``),
        so no orbit grows without bound.

    Returns
    -------
    Orbit

    Examples
    --------
    >>> from cyclewright import maps
    >>> o = orbit(maps.get("3x+1"), 27)
    >>> o.undivided_total_steps, o.undivided_peak      # OEIS A006577: 111; peak 9232
    (111, 9232)
    >>> orbit(maps.get("3x+1"), -17).cycle[:3]
    (-17, -25, -37)
    >>> orbit(maps.get("5x+1"), 7, max_steps=200).status
    'capped'
    >>> orbit(maps.get("5x+1"), 7, max_steps=10**5).status   # passes the value cap 7 * 10^1000
    'escaped'

    References
    ----------
    Brent 1980 (cycle detection); Terras 1976 (stopping time); see the module
    docstring.
    """
    m = as_map(m)
    if isinstance(n, bool) or not isinstance(n, int):
        raise TypeError(f"orbit start must be an integer, got {n!r}")
    check_orbit(n, max_steps, ceiling)
    if ceiling is None:
        ceiling = default_ceiling(n)
    d = m.divisor
    step = m.step

    # First pass: plain iteration, recording values, until a repeat is certain
    # (Brent) or the cap/ceiling is hit. Brent runs alongside on the same values
    # so memory for detection is O(1); the stored values are the output.
    values = [n]
    status = "capped"
    power = lam = 1
    tortoise_idx = 0
    found_lam = None
    while len(values) - 1 < max_steps:
        v = step(values[-1])
        values.append(v)
        if abs(v) > ceiling:
            status = "escaped"
            break
        if values[tortoise_idx] == v:
            found_lam = lam
            break
        if power == lam:
            tortoise_idx = len(values) - 1
            power *= 2
            lam = 0
        lam += 1

    tail = None
    cycle: tuple[int, ...] = ()
    total_steps = None
    if found_lam is not None:
        lam = found_lam
        # mu: the first index i with values[i] == values[i + lam].
        mu = 0
        while values[mu] != values[mu + lam]:
            mu += 1
        values = values[: mu + lam + 1]
        raw_cycle = values[mu : mu + lam]
        least = min(raw_cycle, key=lambda q: (abs(q), q))
        j = raw_cycle.index(least)
        cycle = tuple(raw_cycle[j:] + raw_cycle[:j])
        tail = mu
        total_steps = values.index(least)
        status = "cycle"

    itinerary = tuple(v % d for v in values[:-1])
    stopping = None
    if n != 0:
        for i in range(1, len(values)):
            if abs(values[i]) < abs(n):
                stopping = i
                break
    peak = max(values, key=lambda q: (abs(q), q))
    return Orbit(
        m,
        n,
        tuple(values),
        itinerary,
        stopping,
        tail,
        cycle,
        total_steps,
        peak,
        status,
        max_steps,
        ceiling,
    )
