"""Excursions: how high orbits climb before they drop below their start.

Inside
------
- :func:`excursions` -- for every start ``s`` of a range, follow the orbit
  until it first drops below ``|s|`` (its stopping time), returns to ``s``,
  passes a step cap, or would pass ``2^62``; report the value of largest
  absolute value reached (with its sign) and its start, the mean stopping time, and how many starts stopped, capped or
  overflowed. A compiled loop (numba) with exact int64 arithmetic: a value
  that would pass ``2^62`` ends that start's walk with the outcome
  ``overflow`` (never a wrapped number); the peak is then only a lower bound
  (the largest value actually reached), shown as such (:meth:`Excursions.peak_text`).
- :class:`Excursions` -- the result.

Every count is ``exact`` for the walks as defined; the peak (the value of
largest ``|value|`` seen before the walk ended) is ``exact`` when no walk
overflowed, else a lower bound (``proved``).

References
----------
.. [1] R. Terras, Acta Arithmetica 30 (1976) 241-252 (stopping time).
.. [2] T. Oliveira e Silva, "Maximum excursion and stopping time record-holders
   for the 3x+1 problem", Math. Comp. 68 (1999) 371-384.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction

import numpy as np
from numba import njit

from cyclewright.maps import Map, as_map

from .errors import InputError
from .labels import EXACT, PROVED
from .limits import (
    DEFAULT_MAX_STEPS,
    EXCURSION_WHY,
    MAX_EXCURSION_START,
    MAX_RECORDS_MINUTES,
    check_range,
    check_step_cap,
)
from .presentation import Presentable, Table
from .sides import DEFAULT_SIDE, PerSide, Side, on_sides, parse_side

__all__ = ["excursions", "Excursions", "peak_text"]

_LIMIT = MAX_EXCURSION_START


@njit(cache=True)
def _walk_range(lo, hi, sign, d, ma, mb, cap, limit):  # pragma: no cover - compiled
    best = 0
    best_val = 0
    best_start = 0
    stopped = 0
    returned = 0
    capped = 0
    overflow = 0
    total_time = 0
    for s0 in range(lo, hi + 1):
        s = s0 * sign
        v = s
        peak = s0
        peak_val = s
        ended = False
        for i in range(1, cap + 1):
            r = v % d
            a = ma[r]
            b = mb[r]
            if abs(v) > (limit - abs(b)) // abs(a):
                overflow += 1
                ended = True
                break
            v = (a * v + b) // d
            av = abs(v)
            if av > peak:
                peak = av
                peak_val = v
            if av < s0:
                stopped += 1
                total_time += i
                ended = True
                break
            if v == s:
                returned += 1
                ended = True
                break
        if not ended:
            capped += 1
        if peak > best:
            best = peak
            best_val = peak_val
            best_start = s
    return best_val, best_start, stopped, returned, capped, overflow, total_time


def peak_text(value: int, cut: bool) -> str | int:
    """A peak for display: the value itself, or when the walk was cut a lower bound on ``|peak|``.

    The bound is the largest power of two below the value reached, with the
    sign kept: ``> 2^60`` or ``< -2^60``.

    >>> peak_text(-785412368, False)
    -785412368
    >>> peak_text(3 * 2**60, True), peak_text(-3 * 2**60, True)
    ('> 2^61', '< -2^61')
    """
    if not cut:
        return value
    k = abs(value).bit_length() - 1
    strict = abs(value) > 2**k
    if value < 0:
        return f"{'<' if strict else '<='} -2^{k}"
    return f"{'>' if strict else '>='} 2^{k}"


@dataclass(frozen=True)
class Excursions(Presentable):
    """Walks from every start of a range until each drops below its start (exact counts).

    In a notebook it shows as an HTML table (:meth:`table`); ``to_pandas()``
    gives the same table as a DataFrame.
    """

    map: Map
    side: str
    start: int
    to: int
    max_steps: int
    peak: int
    peak_start: int
    peak_overflowed: bool
    #: ``peak`` is the value of largest ``|value|`` reached, with its sign; when
    #: ``peak_overflowed`` some walk was cut before ``2^62`` and ``|peak|`` is only
    #: a lower bound on the largest excursion.
    stopped: int
    returned: int
    capped: int
    overflowed: int
    mean_stopping_time: Fraction | None

    @property
    def starts(self) -> int:
        return self.to - self.start + 1

    @property
    def drop_share(self) -> Fraction:
        """Share of starts that drop below their start within the cap."""
        return Fraction(self.stopped, self.starts)

    @property
    def open_share(self) -> Fraction:
        """Share of starts neither dropping nor returning (capped or past 2^62)."""
        return Fraction(self.capped + self.overflowed, self.starts)

    def peak_text(self) -> str:
        """The peak as shown: the number, or a lower bound such as ``> 2^60`` when a walk was cut."""
        return peak_text(self.peak, self.peak_overflowed)

    def table(self) -> Table:
        """Every figure of the walks with its label, one a row."""
        peak_label = PROVED.value if self.peak_overflowed else EXACT.value
        rows = (
            ("starts", self.starts, EXACT.value),
            ("drop below their start", self.stopped, EXACT.value),
            ("return to their start", self.returned, EXACT.value),
            ("pass the step cap", self.capped, EXACT.value),
            ("would pass 2^62 (walk cut)", self.overflowed, EXACT.value),
            ("share that drops", self.drop_share, EXACT.value),
            ("share neither dropping nor returning", self.open_share, EXACT.value),
            ("mean stopping time of those that drop", self.mean_stopping_time, EXACT.value),
            (
                "largest value reached"
                + (" (a lower bound on |peak|)" if self.peak_overflowed else ""),
                self.peak_text(),
                peak_label,
            ),
            ("its start", self.peak_start, EXACT.value),
        )
        return Table(
            f"Excursions of {self.map.label}, {self.side} side, starts {self.start}..{self.to} "
            f"(step cap {self.max_steps})",
            ("figure", "value", "label"),
            rows,
            {},
            "each walk ends when the orbit drops below its start, returns to it, passes the "
            "step cap or would pass 2^62",
        )

    def to_dict(self) -> dict:
        return {
            "map": self.map.label,
            "side": self.side,
            "start": self.start,
            "to": self.to,
            "max_steps": self.max_steps,
            "peak": self.peak_text() if self.peak_overflowed else self.peak,
            "peak_reached": self.peak,
            "peak_start": self.peak_start,
            "peak_overflowed": self.peak_overflowed,
            "stopped": self.stopped,
            "returned": self.returned,
            "capped": self.capped,
            "overflowed": self.overflowed,
            "drop_share": self.drop_share,
            "open_share": self.open_share,
            "mean_stopping_time": self.mean_stopping_time,
            "labels": {
                **{k: EXACT.value for k in ("stopped", "capped", "overflowed", "drop_share")},
                "peak": PROVED.value if self.peak_overflowed else EXACT.value,
                "peak_reached": EXACT.value,
            },
        }


def excursions(
    m: Map | str,
    to: int,
    *,
    start: int = 1,
    side: Side = DEFAULT_SIDE,
    max_steps: int = DEFAULT_MAX_STEPS,
    max_minutes: float | None = MAX_RECORDS_MINUTES,
    rate: float | None = None,
) -> Excursions | PerSide[Excursions]:
    """Follow every start of ``start..to`` until it drops below its start.

    Parameters
    ----------
    m : Map
    to, start : int
        The range of absolute values (``1 <= start <= to < 2^62``).
    side : {"positive", "negative", "both"}
        With ``"both"``, one result per side.
    max_steps : int
        Step cap per start (default
        :data:`~cyclewright.cycles.limits.DEFAULT_MAX_STEPS`).
    max_minutes : float or None
        Refuse a run estimated to take longer (one process) before it
        starts, with the estimate (default
        :data:`~cyclewright.cycles.limits.MAX_RECORDS_MINUTES`; None: no
        limit; lifted inside :func:`~cyclewright.cycles.limits.lift_limits`).
        The estimate times the compiled walk on pieces of the range
        (:func:`~cyclewright.cycles.records_plan.plan_excursions`, heuristic).
    rate : float, optional
        Starts per second for the estimate, instead of timing.

    Returns
    -------
    Excursions or PerSide of Excursions
        One :class:`Excursions`; for ``side="both"`` a
        :class:`~cyclewright.cycles.sides.PerSide` with one per side.

    Raises
    ------
    InputError
        A range or step cap beyond the limits, or an estimate beyond
        ``max_minutes``: one line, before any walk.

    Examples
    --------
    >>> from cyclewright import maps
    >>> e = excursions(maps.get("3x+1"), 30)
    >>> e.peak, e.peak_start        # 27 climbs to 4616 (divided map) before dropping
    (4616, 27)
    >>> e.stopped, e.returned       # 1 returns to itself; every other start drops
    (29, 1)
    >>> [e.peak for e in excursions("3x+1", 30, side="both")]
    [4616, -136]

    References
    ----------
    Terras 1976 (stopping time); Oliveira e Silva 1999 (excursions); see the
    module docstring.
    """
    m = as_map(m)
    parse_side(side)
    if start < 1 or to < start:
        raise InputError(f"empty range {start}..{to}")
    check_range(to, "to", maximum=_LIMIT - 1, why=EXCURSION_WHY)
    check_step_cap(max_steps)
    if any(abs(a) >= 2**31 or abs(b) >= 2**31 for a, b in m.branches):
        raise InputError(f"{m.label}: coefficients too large for the compiled excursion walk")
    from .records_plan import check_plan, plan_excursions

    check_plan(
        plan_excursions(m, to, start=start, side=side, max_steps=max_steps, rate=rate),
        max_minutes,
        option="max_minutes",
        more_workers=False,
    )
    return on_sides(side, lambda s: _excursions(m, to, start, s, max_steps))


def _excursions(m: Map, to: int, start: int, side: str, max_steps: int) -> Excursions:
    """The walks of one side (arguments checked by :func:`excursions`)."""
    ma = np.array(m.multipliers, dtype=np.int64)
    mb = np.array(m.offsets, dtype=np.int64)
    sign = 1 if side == "positive" else -1
    best, bstart, stopped, returned, capped, over, ttime = _walk_range(
        start, to, sign, m.divisor, ma, mb, max_steps, _LIMIT
    )
    mean = Fraction(int(ttime), int(stopped)) if stopped else None
    return Excursions(
        m,
        side,
        start,
        to,
        max_steps,
        int(best),
        int(bstart),
        bool(over),
        int(stopped),
        int(returned),
        int(capped),
        int(over),
        mean,
    )
