"""How long a walk over every start of a range will take, and its refusal before it starts (heuristic).

Inside
------
- :class:`WalkPlan` -- the estimate of one run of :func:`~cyclewright.cycles.records.records`
  or :func:`~cyclewright.cycles.excursions.excursions`: its starts (exact),
  the timed samples it rests on, the time per start on one worker, the
  workers assumed and the wall time (heuristic).
- :func:`plan_records`, :func:`plan_excursions` -- measure the compiled walk
  that run would use, on small pieces of the run's own range.
- :func:`plan_scan` -- the same for :func:`~cyclewright.cycles.scan.run.scan`:
  a contracting map's chunks timed on the chunk grid with the residue sieve
  counted (:func:`~cyclewright.cycles.scan.rate.estimate_scan`), a map whose
  orbits grow timed by :func:`growing_seconds`.
- :func:`growing_seconds` -- one start's time for a map whose orbits grow:
  the real chunk walked with step caps growing fourfold, the time at the
  real cap extrapolated (leaning high).
- :func:`measure_pieces` -- the sampler both use: any piece function timed
  on growing pieces at :data:`~cyclewright.cycles.scan.rate.PARTS` places
  across the range, after one untimed piece that loads the kernels and
  tables.
- :func:`check_plan` -- the refusal: a plan whose wall time is above
  ``max_minutes`` raises :class:`~cyclewright.cycles.errors.InputError` with
  one line that gives the estimate and how to go further.
- :func:`is_quick` -- the ranges too small to be worth measuring.
- :func:`records_memory` -- the memory a records run may hold for its
  slowest starts (the exact walk keeps the values of up to ``2 max_steps + 1``
  steps), checked against the memory budget before anything runs, the
  timing included.

How the estimate is made. Neither walk can skip starts (every start's figures
are wanted, so no sieve applies), and a start's cost depends on its orbit:
a start of a contracting map drops within a few steps, a start of an
expanding one walks to the step cap, and a start beyond 64 bits goes on in
exact arithmetic. So the run's own piece function is timed -- the records
chunk (:func:`~cyclewright.cycles.records._run_chunk`, with its table) or
the compiled excursion walk -- on pieces of the range itself, growing
fourfold from one start near the middle of each of up to four equal parts
of the range, until a time budget is spent; the median piece's time per
start times the range's starts is the time on one worker, and the workers
divide it (:func:`~cyclewright.cycles.census.scan_wall_seconds`). The
estimate follows the kernel the run uses, whatever makes it faster. It
counts every start of the range: chunks already in a records store are
reused by the run, which is then quicker.

Every time here is a measurement of this machine at this moment (other
processes, turbo, cache), labelled ``heuristic``; the counts of starts are
``exact``.
"""

from __future__ import annotations

import math
import os
import time
from collections.abc import Callable
from dataclasses import dataclass

from cyclewright.maps import Map, as_map

from .errors import InputError, Name
from .labels import EXACT, HEURISTIC
from .limits import (
    MAX_RECORDS_MINUTES,
    QUICK_WALK_WORK,
    check_memory,
    limits_lifted,
    refuse_time,
)
from .presentation import duration_text
from .scan.rate import PARTS, Sample, _median_sample
from .sides import DEFAULT_SIDE, Side, sides_of

__all__ = [
    "WalkPlan",
    "plan_records",
    "plan_excursions",
    "plan_scan",
    "growing_seconds",
    "measure_pieces",
    "check_plan",
    "check_minutes",
    "is_quick",
    "growth_bits",
    "records_memory",
    "DEFAULT_BUDGET",
    "QUICK_SECONDS",
]

#: Seconds of timed sampling per side (after the untimed first piece).
DEFAULT_BUDGET = 0.3

#: A contracting map's scan of fewer than 10^8 starts with ``starts * cap`` at most
#: this is not measured (its starts drop within a few steps; under a few seconds).
NOMINAL_SCAN_WORK = 10**11

#: Sampling stops early once the run is estimated below this many seconds on one worker.
QUICK_SECONDS = 1.0


def _label(m: Map) -> str:
    """The map's label, its middle cut out when longer than 60 characters (a huge multiplier)."""
    t = m.label
    return t if len(t) <= 60 else f"{t[:24]}…{t[-24:]} ({len(t)} characters)"


def growth_bits(m: Map | str) -> int:
    """Bits a value may gain in one step: those of the largest multiplier (1 at least).

    >>> from cyclewright import maps
    >>> growth_bits(maps.get("3x+1")), growth_bits(maps.get("5x+1"))
    (2, 3)
    """
    m = as_map(m)
    return max(1, max(abs(a) for a in m.multipliers).bit_length())


def is_quick(starts: int, max_steps: int) -> bool:
    """True when a walk over ``starts`` starts with step cap ``max_steps`` is not worth measuring.

    A start takes at most ``max_steps`` steps, each on values of at most a few
    times ``max_steps`` bits; so ``starts * max_steps^2`` at most
    :data:`~cyclewright.cycles.limits.QUICK_WALK_WORK` (10^9) bounds the
    work of the whole run by about 10^9 / 64 word operations: well under a
    second, less than measuring it would cost.

    >>> is_quick(1000, 1000), is_quick(10**6, 1000), is_quick(1, 10**6)
    (True, False, False)
    """
    return starts * max_steps * max_steps <= QUICK_WALK_WORK


def records_memory(m: Map | str, max_steps: int, workers: int = 1, to: int = 1) -> int:
    """Bytes a records run may hold at once for starts that go on in exact arithmetic (heuristic).

    A start whose values leave 64 bits is walked exactly, keeping its values
    (a dict of up to ``2C + 1`` values to find the cycle, then lists of the
    path to its minimum: about twice that, with about 100 bytes of
    bookkeeping each). An orbit that climbs gains on average the map's drift
    in bits per step (:meth:`~cyclewright.maps.Map.drift`; 0 for a
    contracting map), so its ``i``-th value takes about ``28 + 4 (b + g i) / 30``
    bytes, ``b`` the bits of ``to``. Each worker walks one such start at a
    time. A heuristic: a start may climb faster than the mean.

    Parameters
    ----------
    m : Map or str
    max_steps : int
        The step cap ``C``.
    workers : int
    to : int
        Largest start.

    Returns
    -------
    int

    Examples
    --------
    >>> records_memory("3x+1", 1000) < 10**6            # contracting: values stay small
    True
    >>> records_memory("5x+1", 10**6) > 2**31           # climbing 0.16 bits a step
    True

    References
    ----------
    None: a count of the exact walk's own values (cyclewright.cycles.records).
    """
    m = as_map(m)
    g = max(0.0, m.drift() / math.log(2))
    c = 2 * max_steps + 1
    b = abs(to).bit_length()
    per_walk = 2 * (c * (130 + 4 * b / 30) + 4 * g / 30 * c * c / 2)
    return int(per_walk) * max(workers, 1)


def measure_pieces(
    run_piece: Callable[[int, int], object],
    lo: int,
    hi: int,
    *,
    budget: float = DEFAULT_BUDGET,
    quick_seconds: float = QUICK_SECONDS,
    clock: Callable[[], float] = time.perf_counter,
) -> tuple[Sample, ...]:
    """Time ``run_piece(a, b)`` on growing pieces of ``[lo, hi]`` (one worker, this process).

    One untimed piece of one start first (it loads what the walk needs). The
    range is cut into up to :data:`~cyclewright.cycles.scan.rate.PARTS`
    equal parts; in each, pieces starting near the middle grow fourfold from
    one start until the part's share of ``budget`` is spent or 1% of the part
    is sampled. Sampling stops altogether once the starts timed say the
    whole range takes under ``quick_seconds``, or once it has taken
    ``max(2 budget, 1 s)``. The last piece of each part stands for it.

    Parameters
    ----------
    run_piece : callable
        Walks the starts ``a .. b`` as the run does.
    lo, hi : int
        The range, ``lo <= hi``.
    budget, quick_seconds : float
        Seconds, see above.
    clock : callable
        The timer (a fake one in tests).

    Returns
    -------
    tuple of Sample
        One per part sampled; ``visited`` is every start of the piece.

    Examples
    --------
    >>> ticks = iter(range(1000))
    >>> samples = measure_pieces(lambda a, b: None, 1, 10**6, clock=lambda: next(ticks))
    >>> [(s.lo, s.hi) for s in samples]   # a fake clock: 1 s a piece; stops after 1 s in all
    [(125000, 125000), (375000, 375000)]
    """
    total = hi - lo + 1
    parts = PARTS if total >= PARTS * 64 else 1
    run_piece(lo, lo)  # untimed: loads the kernels and tables
    samples: list[Sample] = []
    overall = 0.0
    for j in range(parts):
        if overall > max(2 * budget, 1.0):
            break
        p_lo = lo + j * total // parts
        p_hi = lo + (j + 1) * total // parts - 1
        pos = max(p_lo, (p_lo + p_hi) // 2) if parts > 1 else p_lo + (p_hi - p_lo) // 2
        pos = min(pos, p_hi)
        first = pos
        n, spent, piece, quick = 1, 0.0, None, False
        while pos <= p_hi:
            b = min(p_hi, pos + n - 1)
            t0 = clock()
            run_piece(pos, b)
            dt = clock() - t0
            spent += dt
            piece = (pos, b, b - pos + 1, dt)
            pos = b + 1
            # quick: a piece of 1024 starts or more (the fixed cost of a call spread
            # thin) says the whole range takes under quick_seconds on one worker
            quick = b - piece[0] >= 1023 and dt / (b - piece[0] + 1) * total < quick_seconds
            if quick or spent >= budget / parts or (pos - first) * 100 >= p_hi - p_lo + 1:
                break
            n *= 4
        overall += spent
        if piece is not None:
            samples.append(Sample(*piece, p_lo, p_hi, p_hi - p_lo + 1))
        if quick:
            break  # the other parts would say little more
    return tuple(samples)


@dataclass(frozen=True)
class WalkPlan:
    """What a records or excursions run will cost, known before it starts (times heuristic).

    Attributes
    ----------
    what : str
        ``"records"`` or ``"excursions"``.
    map : Map
    start, to : int
        The range of absolute values.
    sides : tuple of str
    max_steps : int
    starts : int
        Starts over all sides (exact).
    samples : tuple of Sample
        The timed pieces (empty when not measured).
    seconds_per_start : float
        Time of one start on one worker (heuristic; 0 when not measured).
    workers : int
        Workers the run uses (the wall time divides by them).
    seconds : float
        Estimated wall time (heuristic).
    source : str
        How the time per start was found.
    """

    what: str
    map: Map
    start: int
    to: int
    sides: tuple[str, ...]
    max_steps: int
    starts: int
    samples: tuple[Sample, ...]
    seconds_per_start: float
    workers: int
    seconds: float
    source: str

    @property
    def rate(self) -> float:
        """Starts per second of one worker (heuristic)."""
        return 1.0 / self.seconds_per_start if self.seconds_per_start > 0 else math.inf

    def seconds_on(self, workers: int) -> float:
        """Estimated wall time on ``workers`` workers at the same time per start (heuristic)."""
        from .census import scan_wall_seconds

        return scan_wall_seconds(self.starts, self.rate, workers)

    def lines(self) -> list[str]:
        """The plan as short lines of text (shown before a long run starts)."""
        side = " and ".join(self.sides)
        rate = f"{self.rate:.2g} starts/s per worker" if self.seconds_per_start > 0 else "-"
        return [
            f"{self.what} of {_label(self.map)} over {self.start:,}..{self.to:,} ({side} "
            f"side{'s' if len(self.sides) > 1 else ''}), step cap {self.max_steps:,}: "
            f"{self.starts:,} starts",
            f"about {duration_text(self.seconds)} at {rate} x {self.workers} "
            f"worker{'s' if self.workers != 1 else ''} ({self.source}; estimate, heuristic)",
        ]

    def to_dict(self) -> dict:
        return {
            "what": self.what,
            "map": self.map.label,
            "start": self.start,
            "to": self.to,
            "sides": list(self.sides),
            "max_steps": self.max_steps,
            "starts": self.starts,
            "samples": [
                {"from": s.lo, "to": s.hi, "seconds": round(s.seconds, 6)} for s in self.samples
            ],
            "seconds_per_start": self.seconds_per_start,
            "workers": self.workers,
            "seconds": round(self.seconds, 3),
            "source": self.source,
            "labels": {
                "starts": EXACT.value,
                "seconds_per_start": HEURISTIC.value,
                "seconds": HEURISTIC.value,
            },
        }


def _plan(
    what: str,
    m: Map,
    start: int,
    to: int,
    sides: tuple[str, ...],
    max_steps: int,
    workers: int,
    rate: float | None,
    piece_for: Callable[[str], Callable[[int, int], object]],
    budget: float,
) -> WalkPlan:
    starts = (to - start + 1) * len(sides)
    samples: tuple[Sample, ...] = ()
    if rate is not None:
        if not rate > 0:
            raise InputError(f"rate must be a positive number of starts per second, got {rate!r}")
        per_start, source = 1.0 / rate, "rate given"
    elif is_quick(starts, max_steps):
        per_start = 0.0
        source = "not measured: starts x step cap^2 <= 10^9, well under a second"
    else:
        per_side = []
        for s in sides:
            got = measure_pieces(piece_for(s), start, to, budget=budget / len(sides))
            samples += got
            visited, _, secs = _median_sample(got)
            per_side.append(secs / visited)
        per_start = sum(per_side) / len(per_side)
        timed = sum(x.hi - x.lo + 1 for x in samples)
        source = (
            f"measured now: {timed:,} starts timed in {len(samples)} "
            f"place{'s' if len(samples) != 1 else ''}, one worker"
        )
    seconds = starts * per_start / max(workers, 1)
    return WalkPlan(
        what, m, start, to, sides, max_steps, starts, samples, per_start, workers, seconds, source
    )


def _workers(workers: int | None, executor: str) -> int:
    if workers is not None:
        return int(workers)
    if executor == "local":
        return os.cpu_count() or 1
    return 1


def plan_records(
    m: Map | str,
    to: int,
    *,
    start: int = 1,
    side: Side = DEFAULT_SIDE,
    max_steps: int,
    workers: int | None = 1,
    executor: str = "local",
    rate: float | None = None,
    budget: float = DEFAULT_BUDGET,
) -> WalkPlan:
    """Estimate a :func:`~cyclewright.cycles.records.records` run before it starts (heuristic).

    First the memory its slowest starts may hold (:func:`records_memory`)
    is checked against the budget (refused at once beyond it, before any
    timing). Then the records chunk the run uses (its compiled walk and its
    table, loaded first, untimed) is timed on pieces of each side's range
    (:func:`measure_pieces`), unless the range is quick (:func:`is_quick`)
    or ``rate`` is given. The arguments are those of ``records``, already
    checked.

    Parameters
    ----------
    m : Map or str
    to, start : int
    side : {"positive", "negative", "both"}
    max_steps : int
    workers : int, optional
        As for ``records``: None is every core of the local executor; a Dask
        run is counted as ``workers`` workers (1 when not given: the
        cluster's size is not known before it is reached).
    executor : {"local", "dask"}
    rate : float, optional
        Starts per second per worker, instead of a measurement.
    budget : float
        Seconds of timed sampling in all.

    Returns
    -------
    WalkPlan

    Examples
    --------
    >>> p = plan_records("3x+1", 10**12, max_steps=1000, workers=2, rate=1e7)
    >>> p.starts, round(p.seconds / 3600, 1)          # 10^12 starts at 10^7 a second on 2 workers
    (1000000000000, 13.9)
    >>> plan_records("3x+1", 1000, max_steps=1000).source.startswith("not measured")
    True

    References
    ----------
    None: a measurement of this machine (see the module docstring).
    """
    from .records import _TABLE_CONTRACTING, _TABLE_EXPANDING, _run_chunk

    m = as_map(m)
    n = _workers(workers, executor)
    check_memory(
        records_memory(m, max_steps, n, to),
        f"records of {m.label} with step cap {max_steps:,} on {n} worker{'s' if n != 1 else ''} "
        f"(starts that climb are walked exactly, keeping up to {2 * max_steps + 1:,} values "
        "each; heuristic)",
        hint="lower the step cap (max_steps, --max-steps) or the workers",
    )
    sides = tuple(sides_of(side))
    size = min((_TABLE_CONTRACTING if m.drift_ratio() < 1 else _TABLE_EXPANDING), to + 1)
    branches = tuple(tuple(b) for b in m.branches)

    def piece_for(s: str) -> Callable[[int, int], object]:
        return lambda a, b: _run_chunk((m.divisor, branches, s, a, b, max_steps, size))

    return _plan("records", m, start, to, sides, max_steps, n, rate, piece_for, budget)


def plan_excursions(
    m: Map | str,
    to: int,
    *,
    start: int = 1,
    side: Side = DEFAULT_SIDE,
    max_steps: int,
    rate: float | None = None,
    budget: float = DEFAULT_BUDGET,
) -> WalkPlan:
    """Estimate an :func:`~cyclewright.cycles.excursions.excursions` run before it starts (heuristic).

    Times the compiled excursion walk on pieces of each side's range
    (:func:`measure_pieces`; one worker: the walk runs in this process),
    unless the range is quick (:func:`is_quick`) or ``rate`` is given.

    Parameters
    ----------
    m : Map or str
    to, start : int
    side : {"positive", "negative", "both"}
    max_steps : int
    rate : float, optional
        Starts per second, instead of a measurement.
    budget : float
        Seconds of timed sampling in all.

    Returns
    -------
    WalkPlan

    Examples
    --------
    >>> p = plan_excursions("3x+1", 2**62 - 1, max_steps=1000, rate=1e8)
    >>> p.workers, p.seconds > 365 * 86400             # 4.6e18 starts at 10^8 a second
    (1, True)

    References
    ----------
    None: a measurement of this machine (see the module docstring).
    """
    import numpy as np

    from .excursions import _LIMIT, _walk_range

    m = as_map(m)
    sides = tuple(sides_of(side))
    ma = np.array(m.multipliers, dtype=np.int64)
    mb = np.array(m.offsets, dtype=np.int64)

    def piece_for(s: str) -> Callable[[int, int], object]:
        sign = 1 if s == "positive" else -1
        return lambda a, b: _walk_range(a, b, sign, m.divisor, ma, mb, max_steps, _LIMIT)

    return _plan("excursions", m, start, to, sides, max_steps, 1, rate, piece_for, budget)


def growing_seconds(
    run_capped: Callable[[int], object],
    cap: int,
    *,
    pieces: int = 1,
    budget: float = DEFAULT_BUDGET,
    clock: Callable[[], float] = time.perf_counter,
) -> tuple[float, int, float]:
    """Seconds per start at step cap ``cap`` of a walk whose values grow (heuristic, leaning high).

    An orbit that climbs gains about the same number of bits every step, so
    its ``i``-th step costs about ``alpha + beta i`` and a walk of ``c`` steps
    ``alpha c + beta c^2 / 2``. ``run_capped(c)`` (the run's own chunk on
    ``pieces`` starts, with step cap ``c``) is timed for ``c = 16, 64, 256,
    ...`` up to ``cap``, until the next cap would take more than the budget;
    at ``cap`` itself the time is measured, below it the two last caps give
    ``alpha`` and ``beta`` and the larger of that fit and the straight
    scaling ``t(c) cap / c`` (or, the fit failing, ``t(c) (cap / c)^2``) is
    taken. A start that closes a cycle early costs less than this.

    Parameters
    ----------
    run_capped : callable
        Walks the sample starts with the step cap given.
    cap : int
        The run's step cap.
    pieces : int
        Starts walked per call (the time is divided by them).
    budget : float
        Seconds of timing.
    clock : callable
        The timer (a fake one in tests).

    Returns
    -------
    (float, int, float)
        Seconds per start at ``cap``, the largest cap timed, and its seconds.

    Examples
    --------
    >>> t = {"now": 0.0}
    >>> def walk(c):                       # a fake walk: 1 us + 1 ns x step, per step
    ...     t["now"] += 1e-6 * c + 1e-9 * c * c
    >>> s, c, _ = growing_seconds(walk, 10**7, clock=lambda: t["now"])
    >>> c < 10**7, 0.9e5 < s < 1.1e5       # about 10 s + 10^5 s
    (True, True)

    References
    ----------
    None: a measurement of this machine (see the module docstring).
    """
    c, prev = min(16, cap), None
    spent = 0.0
    while True:
        t0 = clock()
        run_capped(c)
        dt = max(clock() - t0, 1e-9)
        spent += dt
        if c >= cap or spent + 16 * dt > budget:
            break
        prev = (c, dt)
        c = min(cap, 4 * c)
    if c >= cap:
        return dt / pieces, c, dt
    straight = dt * cap / c
    if prev is not None and prev[0] * 4 == c:
        c1, t1 = prev
        beta = max(0.0, dt - 4 * t1) / (12 * c1 * c1)
        alpha = max(0.0, (t1 - beta * c1 * c1) / c1)
        fitted = alpha * cap + beta * cap * cap
    else:
        fitted = dt * (cap / c) ** 2
    return max(straight, fitted) / pieces, c, dt


def plan_scan(
    m: Map | str,
    to: int,
    *,
    start: int = 1,
    side: Side = DEFAULT_SIDE,
    max_steps: int,
    max_cycle_length: int | None = None,
    workers: int | None = None,
    executor: str = "local",
    chunk_size: int | None = None,
    rate: float | None = None,
    budget: float = DEFAULT_BUDGET,
) -> WalkPlan:
    """Estimate a :func:`~cyclewright.cycles.scan.run.scan` before it starts (heuristic).

    A map that contracts on average (drift ratio below 1): each side's chunks
    are timed on the chunk grid across the range, the sieve's skipped
    classes counted (:func:`~cyclewright.cycles.scan.rate.estimate_scan`).
    A map whose orbits grow: a few starts near the middle of the range are
    walked by the scan's chunk with step caps growing to the real one
    (:func:`growing_seconds`; leaning high), times the range's starts. Not
    measured when the range is quick (:func:`is_quick`, with a growing
    map's starts weighed by :func:`growth_bits`), when ``rate`` is given, or
    for a contracting map's scan of fewer than 10^8 starts with ``starts x
    cap`` at most :data:`NOMINAL_SCAN_WORK` (the census's nominal rate). Every start of the range is counted, those already in a store
    too. The arguments are those of ``scan``, already checked.

    Parameters
    ----------
    m : Map or str
    to, start : int
    side : {"positive", "negative", "both"}
    max_steps : int
    max_cycle_length : int, optional
        When given, the scan's cap is this cycle-length bound.
    workers : int, optional
        As for ``scan`` (None: every core of the local executor; a Dask run
        is counted as ``workers`` workers, 1 when not given).
    executor : {"local", "dask"}
    chunk_size : int, optional
    rate : float, optional
        Starts per second per worker, instead of a measurement.
    budget : float
        Seconds of timed sampling in all.

    Returns
    -------
    WalkPlan

    Examples
    --------
    >>> p = plan_scan("3x+1", 2**63 - 1, max_steps=1000, workers=2, rate=1e9)
    >>> p.what, p.seconds > 365 * 86400           # 9.2e18 starts at 10^9 a second on 2 workers
    ('scan', True)
    >>> plan_scan("3x+1", 1000, max_steps=1000).source.startswith("not measured")
    True

    References
    ----------
    None: a measurement of this machine (see the module docstring).
    """
    m = as_map(m)
    n = _workers(workers, executor)
    sides = tuple(sides_of(side))
    bound = max_cycle_length is not None
    cap = max_cycle_length if bound else max_steps
    starts = (to - start + 1) * len(sides)
    growing = m.drift_ratio() >= 1
    # a growing map's values gain up to growth_bits a step: its work grows with them
    if rate is not None or is_quick(starts * (growth_bits(m) if growing else 1), cap):
        return _plan("scan", m, start, to, sides, cap, n, rate, lambda s: None, budget)
    from .census import MEASURE_ABOVE, NOMINAL_RATE

    if not growing and starts < MEASURE_ABOVE and starts * cap <= NOMINAL_SCAN_WORK:
        # a contracting map's starts drop within a few steps: under a few seconds
        per = 1.0 / NOMINAL_RATE
        return WalkPlan(
            "scan",
            m,
            start,
            to,
            sides,
            cap,
            starts,
            (),
            per,
            n,
            starts * per / n,
            "not measured: fewer than 10^8 starts of a contracting map, nominal rate",
        )
    from .scan.chunks import ChunkTask, default_chunk_size, run_chunk
    from .scan.rate import estimate_scan

    branches = tuple(tuple(b) for b in m.branches)
    total = 0.0
    samples: list[Sample] = []
    timed = 0
    for s in sides:
        if not growing:
            e = estimate_scan(
                m,
                to,
                side=s,
                start=start,
                max_cycle_length=cap,
                budget=budget / len(sides),
                chunk_size=chunk_size or default_chunk_size(m),
                length_bound=bound,
            )
            total += e.seconds
            samples += e.samples
            timed += e.sample_starts
            continue
        k = min(4, to - start + 1)
        mid = start + (to - start + 1 - k) // 2

        def walk(c: int, s: str = s, mid: int = mid, k: int = k) -> object:
            return run_chunk(ChunkTask(m.divisor, branches, s, mid, mid + k - 1, c, bound))

        walk(1)  # untimed: loads the kernels
        per_start, c, dt = growing_seconds(walk, cap, pieces=k, budget=budget / len(sides))
        total += per_start * (to - start + 1)
        samples.append(Sample(mid, mid + k - 1, k, dt, start, to, to - start + 1))
        timed += k
        growing_cap = c
    if growing:
        source = (
            f"measured now: {timed:,} starts walked to the step cap, one worker"
            if growing_cap >= cap
            else f"measured now: {timed:,} starts walked with step caps up to {growing_cap:,}, "
            "scaled to the cap (orbits grow; leaning high), one worker"
        )
    else:
        source = (
            f"measured now: {timed:,} starts timed in {len(samples)} "
            f"place{'s' if len(samples) != 1 else ''} (the sieve counted), one worker"
        )
    per_start = total / starts
    return WalkPlan(
        "scan", m, start, to, sides, cap, starts, tuple(samples), per_start, n, total / n, source
    )


def check_minutes(max_minutes: float, what: str = "max_minutes") -> float:
    """``max_minutes`` if a number of minutes >= 0, else :class:`InputError` (one wording).

    >>> check_minutes(30)
    30
    >>> check_minutes(-1)
    Traceback (most recent call last):
    ...
    cyclewright.cycles.errors.InputError: max_minutes must be a number of minutes >= 0, got -1
    """
    if isinstance(max_minutes, bool) or not (
        isinstance(max_minutes, (int, float)) and max_minutes >= 0
    ):
        shown = f"{max_minutes:g}" if isinstance(max_minutes, (int, float)) else repr(max_minutes)
        raise InputError(f"{what} must be a number of minutes >= 0, got {shown}", param=what)
    return max_minutes


def check_plan(
    plan: WalkPlan,
    max_minutes: float | None = MAX_RECORDS_MINUTES,
    *,
    option: str = "max_minutes",
    more_workers: bool = True,
    raise_it: str = "raise it",
) -> WalkPlan:
    """``plan`` if its wall time is at most ``max_minutes``, else :class:`InputError` (one line).

    The message gives the estimate, the limit and the ways on: raise the
    limit, use more workers or a Dask cluster (``more_workers``), or a
    smaller range. None for ``max_minutes``, or inside
    :func:`~cyclewright.cycles.limits.lift_limits`: never refused.

    Parameters
    ----------
    plan : WalkPlan
    max_minutes : float or None
    option : str
        The parameter the limit is (named in the message; the command line
        says its option, and ``workers``, ``executor``, ``scheduler`` as
        options too).
    more_workers : bool
        Whether the run can use more workers (records: yes; excursions: no).
    raise_it : str
        How the limit is raised, the first way on named.

    Returns
    -------
    WalkPlan

    Examples
    --------
    >>> p = plan_records("3x+1", 10**12, max_steps=1000, workers=1, rate=1e7)
    >>> check_plan(p, 30)
    Traceback (most recent call last):
    ...
    cyclewright.cycles.errors.InputError: records of 3x+1 over 1..1,000,000,000,000 (positive side, step cap 1,000): 1e+12 starts, about 27.8 h at 1e+07 starts/s per worker x 1 worker (rate given; heuristic); beyond the limit of 30 min (max_minutes): raise it, use more workers or a Dask cluster (executor dask, scheduler ADDRESS; about 26 min on 64 workers), or use a smaller range
    >>> check_plan(p, None) is p
    True
    """
    if max_minutes is None or limits_lifted():
        return plan
    check_minutes(max_minutes)
    if plan.seconds <= max_minutes * 60:
        return plan
    ways = (
        (
            "use more ",
            Name("workers"),
            " or a Dask cluster (",
            Name("executor"),
            " dask, ",
            Name("scheduler"),
            f" ADDRESS; about {duration_text(plan.seconds_on(64))} on 64 workers), ",
        )
        if more_workers
        else ()
    )
    w = plan.workers
    refuse_time(
        f"{plan.what} of {_label(plan.map)} over {plan.start:,}..{plan.to:,} "
        f"({' and '.join(plan.sides)} side{'s' if len(plan.sides) > 1 else ''}, step cap "
        f"{plan.max_steps:,}): {plan.starts:.3g} starts",
        plan.seconds,
        plan.source,
        max_minutes,
        at=f" at {plan.rate:.2g} starts/s per worker x {w} worker{'s' if w != 1 else ''}",
        option=option,
        raise_it=raise_it,
        ways=ways,
    )
