"""How long a scan will take: timed samples across the range, scaled by the sieve (heuristic).

Inside
------
- :func:`visited_starts` -- how many starts of a range the compiled pass
  iterates: the residue sieve proves the others drop without touching them
  (exact, from the sieve tables; no scan).
- :func:`scan_seconds` -- the estimate's formula: the time of a sample per
  visited start, times the visited starts of the range.
- :class:`ScanEstimate`, :class:`Sample` -- one side's estimate with the
  timed pieces it rests on.
- :func:`estimate_scan` -- measure one side: load the kernels and the sieve
  tables untimed, then time growing pieces of the real chunk grid in
  :data:`PARTS` places across the range (one worker, in this process) until
  a time budget is spent.

Why not simply time one chunk: the sieve of depth ``K`` skips whole residue
classes mod ``d^K``, so the cost of a range is the cost of its *visited*
starts, and their share differs between the start of the range (below
``d^K`` every start is iterated) and its top; and the first call of a kernel
in a process loads it (seconds) -- a sample that includes it, or that is much
shorter than the sieve's period, says little about a range of 10^12 starts.
Here the samples sit on the chunk grid across the range (where the scan
spends its time), the kernels are loaded before the clock starts, and the
median sample's time per visited start is multiplied by the range's exact
visited count (the median: a rare start whose orbit passes 2^63 costs a
piece tens of milliseconds of exact arithmetic).

Every figure here is a measurement of this machine at this moment (other
processes, turbo, cache), labelled ``heuristic``; the counts of starts are
exact.
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass

from cyclewright.maps import Map, as_map

__all__ = [
    "ScanEstimate",
    "Sample",
    "PARTS",
    "estimate_scan",
    "scan_seconds",
    "visited_starts",
    "DEFAULT_BUDGET",
]

#: Seconds of timed sampling per side (after the untimed warm-up).
DEFAULT_BUDGET = 0.3
_FIRST_PIECE = 16
_INT64_MAX = 2**63 - 1


def visited_starts(levels, lo: int, hi: int) -> int:
    """How many starts of ``[lo, hi]`` the compiled pass iterates with these sieve tables (exact).

    The segmentation is the scan's (:func:`cyclewright.cycles.scan.kernel.classify_range`):
    starts below the shallowest table's modulus are all iterated; above it,
    only the surviving classes of the deepest table that applies.

    Parameters
    ----------
    levels : sequence of SieveTable
        The tables the scan uses (empty: no sieve).
    lo, hi : int
        ``1 <= lo <= hi``.

    Returns
    -------
    int

    Examples
    --------
    >>> from cyclewright import maps
    >>> from cyclewright.cycles.scan.sieve import sieve_levels
    >>> levels = sieve_levels(maps.get("3x+1"))
    >>> visited_starts((), 1, 1000)
    1000
    >>> n = visited_starts(levels, 2**24, 2**25 - 1)   # one period of the 2^24 sieve
    >>> n == levels[-1].survivors, n < 2**24 // 50
    (True, True)
    """
    if hi < lo:
        return 0
    from .kernel import _iterated_count

    tables = sorted((t for t in levels if t.depth > 0), key=lambda t: t.depth)
    bounds = [1] + [t.modulus for t in tables] + [_INT64_MAX + 1]
    total = 0
    for i in range(len(bounds) - 1):
        a, b = max(lo, bounds[i]), min(hi, bounds[i + 1] - 1)
        if a > b:
            continue
        if i == 0:
            total += b - a + 1
        else:
            t = tables[i - 1]
            total += _iterated_count(a, b, t.depth, t.modulus, t)
    return total


def scan_seconds(
    visited: int, sample_visited: int, sample_starts: int, sample_seconds: float, starts: int
) -> float:
    """One worker's time for a range: the sample's time per visited start times the range's visited starts.

    When the sample visited no start (every class sieved), its time per
    start is used instead. A heuristic: it assumes the visited starts of the
    range cost what those of the sample did.

    Parameters
    ----------
    visited : int
        Starts of the range the pass iterates (:func:`visited_starts`).
    sample_visited, sample_starts : int
        The same counts for the timed sample.
    sample_seconds : float
        The sample's time.
    starts : int
        Starts of the range.

    Returns
    -------
    float

    Examples
    --------
    >>> scan_seconds(10**10, 10**7, 2**30, 0.5, 10**12)    # 5e-8 s per visited start
    500.0
    >>> scan_seconds(0, 0, 1000, 0.001, 10**6)              # nothing visited: per start
    1.0
    """
    if sample_visited > 0:
        return visited * sample_seconds / sample_visited
    if sample_starts > 0:
        return starts * sample_seconds / sample_starts
    return math.inf


@dataclass(frozen=True)
class Sample:
    """One timed piece: ``[lo, hi]``, its visited starts, its seconds, and the part it stands for.

    The last and largest piece timed in the part (the smaller ones before it
    only find its size).
    """

    lo: int
    hi: int
    visited: int
    seconds: float
    part_lo: int
    part_hi: int
    part_visited: int


@dataclass(frozen=True)
class ScanEstimate:
    """One side's estimated scan time on one worker, and the samples it rests on.

    Attributes
    ----------
    side : str
    start, to : int
        The range of absolute values.
    starts, visited : int
        Its starts, and those the pass iterates (exact).
    samples : tuple of Sample
        One timed piece per part of the range (up to :data:`PARTS` equal
        parts), each on the chunk grid near the middle of its part.
    seconds : float
        Estimated time on one worker (heuristic): the range's visited
        starts at the median sample's time per visited start.
    """

    side: str
    start: int
    to: int
    starts: int
    visited: int
    samples: tuple[Sample, ...]
    seconds: float

    @property
    def rate(self) -> float:
        """Starts per second of one worker over the whole range (heuristic)."""
        return self.starts / self.seconds if self.seconds > 0 else math.inf

    @property
    def sample_starts(self) -> int:
        return sum(x.hi - x.lo + 1 for x in self.samples)

    @property
    def sample_seconds(self) -> float:
        return sum(x.seconds for x in self.samples)

    def describe(self) -> str:
        """One line: what was timed, and the sieve's share."""
        return (
            f"{self.side} side: {self.sample_starts:,} starts timed in {len(self.samples)} "
            f"place{'s' if len(self.samples) != 1 else ''} of the range "
            f"({self.sample_seconds:.2g} s, one worker), "
            f"{self.visited / max(self.starts, 1):.2%} of the range visited past the sieve"
        )


def _median_sample(samples) -> tuple[int, int, float]:
    """(visited, starts, seconds) of the sample with the median time per visited start."""
    ranked = sorted(
        samples, key=lambda x: x.seconds / x.visited if x.visited else x.seconds / (x.hi - x.lo + 1)
    )
    x = ranked[(len(ranked) - 1) // 2]
    return x.visited, x.hi - x.lo + 1, max(x.seconds, 1e-9)


#: The range is cut into this many equal parts, each timed near its middle.
PARTS = 4


def estimate_scan(
    m: Map | str,
    to: int,
    *,
    side: str = "positive",
    max_cycle_length: int,
    start: int = 1,
    budget: float = DEFAULT_BUDGET,
    chunk_size: int | None = None,
    length_bound: bool = True,
) -> ScanEstimate:
    """Measure one side's scan of ``[start, to]`` in cycle-length mode on one worker (heuristic).

    The kernels and the side's sieve tables are loaded first (untimed, as
    the scan's own workers do before their first chunk). The range is cut
    into :data:`PARTS` equal parts (one when it spans fewer than that many
    chunks); in each, pieces of the chunk of the grid nearest its middle (the
    last chunk for one part) are classified in this process, growing
    fourfold from 16 starts, until the part's share of ``budget`` is spent,
    1% of the range is sampled, or the chunk is done; when the sampling has
    taken more than ``max(2 budget, 1 s)`` (slow starts: an expanding map
    with a large cap), the remaining parts are not sampled. Each part's time is the time per visited start of
    its piece times the part's visited starts (:func:`visited_starts`,
    :func:`scan_seconds`); the estimate is their sum (a midpoint rule: the
    cost of a start grows with its size).

    Parameters
    ----------
    m : Map or str
    to : int
        Largest absolute value (``< 2^63``).
    side : {"positive", "negative"}
    max_cycle_length : int
        The cycle-length bound ``K`` of the census (the scan's cap).
    start : int
    budget : float
        Seconds of timed sampling.
    chunk_size : int, optional
        The scan's chunk size (default: the map's).
    length_bound : bool
        True (the census): ``max_cycle_length`` is a cycle-length bound;
        False (a scan with a step cap): it is the step cap.

    Returns
    -------
    ScanEstimate

    Examples
    --------
    >>> from cyclewright import maps
    >>> e = estimate_scan(maps.get("3x+1"), 10**6, max_cycle_length=1000, budget=0.01)
    >>> e.starts, e.samples[0].part_hi, len(e.samples)
    (1000000, 1000000, 1)
    """
    from .chunks import ChunkTask, _side_tools, default_chunk_size, run_chunk
    from .kernel import warm_up

    m = as_map(m)
    if not 1 <= start <= to <= _INT64_MAX:
        raise ValueError(f"range [{start}, {to}] is outside [1, 2^63 - 1]")
    cap = max_cycle_length
    cs = chunk_size or default_chunk_size(m)
    km, levels = _side_tools(m, side, cap, to)  # builds or loads the tables: untimed
    if km is not None:
        warm_up(hard=True)  # loads every kernel (the exact continuation too)
    branches = tuple(tuple(b) for b in m.branches)

    def task(a: int, b: int) -> ChunkTask:
        return ChunkTask(m.divisor, branches, side, a, b, cap, length_bound)

    total = to - start + 1
    parts = PARTS if total >= PARTS * cs else 1
    samples = []
    overall = 0.0
    for j in range(parts):
        if overall > max(2 * budget, 1.0):
            break  # slow starts (an expanding map, a large cap): the parts timed so far do
        p_lo = start + j * total // parts
        p_hi = start + (j + 1) * total // parts - 1
        if parts == 1:  # the last chunk of the grid below the top
            lo = max(start, (to // cs - 1) * cs) if to >= 2 * cs else start
        else:
            lo = max(p_lo, ((p_lo + p_hi) // 2 // cs) * cs)
        end = min(p_hi, lo + cs - 1)
        if j == 0 and end - lo + 1 > 2 * _FIRST_PIECE:  # untimed: any first call
            t0 = time.perf_counter()
            run_chunk(task(lo, lo + _FIRST_PIECE - 1))
            overall += time.perf_counter() - t0
            lo += _FIRST_PIECE
        pos, n, spent = lo, _FIRST_PIECE, 0.0
        while pos <= end:
            hi = min(end, pos + n - 1)
            t0 = time.perf_counter()
            run_chunk(task(pos, hi))
            dt = time.perf_counter() - t0
            spent += dt
            piece = (pos, hi, visited_starts(levels, pos, hi), dt)
            pos = hi + 1
            if spent >= budget / parts or (pos - lo) * parts >= max(total // 100, 1 << 22):
                break  # the part's share of the budget, or 1% of the range, is sampled
            n *= 4
        overall += spent
        # the last piece stands for the part: the largest, at least 3/4 of what was
        # timed there, the least weighed by the fixed cost of a call
        samples.append(Sample(*piece, p_lo, p_hi, visited_starts(levels, p_lo, p_hi)))
    all_visited = visited_starts(levels, start, to)
    seconds = scan_seconds(all_visited, *_median_sample(samples), total)
    return ScanEstimate(side, start, to, total, all_visited, tuple(samples), seconds)
