"""The unit of work of a scan: one chunk of one side, and the fixed grid of chunks."""

from __future__ import annotations

import functools
import time
from dataclasses import dataclass

import numpy as np

from cyclewright.maps import Map, as_map

from ..integer_cycle import verified_cycle
from .store import code_version

__all__ = [
    "LISTED_UNRESOLVED",
    "ChunkTask",
    "ChunkOutcome",
    "run_chunk",
    "default_chunk_size",
    "iter_chunks",
    "plan_chunks",
    "count_chunks",
]


#: How many unresolved starts a result lists (all are in the store).
LISTED_UNRESOLVED = 20
_COUNT_KEYS = ("drops", "cycles", "other_cycle", "unresolved", "beyond_length")


# --------------------------------------------------------------------------- chunks
@dataclass(frozen=True)
class ChunkTask:
    """One chunk of one side: the map's definition (plain data), the range and the cap."""

    divisor: int
    branches: tuple
    side: str
    lo: int
    hi: int
    cap: int
    length_bound: bool  # True: the cap is a cycle-length bound (open -> beyond_length)


@dataclass
class ChunkOutcome:
    """What a worker sends back for one chunk (plain data)."""

    side: str
    lo: int
    hi: int
    counts: dict
    cycles: list
    unresolved: np.ndarray
    escaped: np.ndarray
    sieved: int
    sieve_depth: int
    seconds: float
    version: str


def _side_tools(m: Map, side: str, cap: int, hi: int):
    """The kernel form of the side's map and the sieve tables worth building for starts up to ``hi``.

    Below ``d^(K/2)`` (``K`` the deepest safe sieve depth) every start is
    iterated one by one anyway, so small scans skip building the tables; and
    a table of depth ``k`` serves only starts ``>= d^k``, so the depth is at
    most the largest ``k`` with ``d^k <= hi`` (a scan to 10^5 builds tables
    of 2^8 and 2^16 classes in milliseconds, not the 2^24 one). Skipping or
    lowering a table never changes a result, only the speed.
    """
    from .sieve import safe_depth

    mm = m if side == "positive" else m.conjugate()
    d = mm.divisor
    deepest = safe_depth(mm, cap)
    need = hi >= d ** max(1, deepest // 2)
    limit = deepest
    if need:
        # one key per table actually built: every chunk above d^deepest shares the
        # deepest table (a key per chunk size would load a copy per magnitude)
        k = 1
        while k < deepest and d ** (k + 1) <= hi:
            k += 1
        limit = k
    return _side_tables(m, side, max(limit, 1), need)


@functools.lru_cache(maxsize=16)
def _side_tables(m: Map, side: str, limit: int, need: bool):
    from .kernel import KernelMap
    from .sieve import sieve_levels

    mm = m if side == "positive" else m.conjugate()
    km = KernelMap.from_map(mm)
    levels = sieve_levels(mm, limit) if km is not None and need else ()
    return km, levels


def _python_outcomes(m: Map, side: str, lo: int, hi: int, cap: int):
    """Exact Python classification for maps beyond the kernel's coefficient range."""
    from .reference import classify

    sign = 1 if side == "positive" else -1
    drops = other = 0
    cycles, opens, esc = [], [], []
    limit = 2**63
    for s in range(lo, hi + 1):
        outcome, steps = classify(m, sign * s, cap)
        if outcome == "drop":
            drops += 1
        elif outcome == "cycle":
            cycles.append((s, steps))
        elif outcome == "other_cycle":
            other += 1
        else:
            opens.append(s)
            v, big = sign * s, False
            for _ in range(cap):
                v = m.step(v)
                if abs(v) >= limit:
                    big = True
                    break
            esc.append(big)
    return drops, other, cycles, opens, esc, 0


def run_chunk(task: ChunkTask) -> ChunkOutcome:
    """Classify one chunk exactly (runs in a worker process or on a Dask worker).

    >>> from cyclewright import maps
    >>> m = maps.get("3x+1")
    >>> out = run_chunk(ChunkTask(2, tuple(m.branches), "negative", 1, 100, 1000, False))
    >>> [c["minimum"] for c in out.cycles], out.counts["drops"]
    ([-1, -5, -17], 97)
    """
    t0 = time.perf_counter()
    m = Map(task.divisor, [tuple(b) for b in task.branches])
    km, table = _side_tools(m, task.side, task.cap, task.hi)
    if km is None:
        drops, other, cyc, opens, esc, sieved = _python_outcomes(
            m, task.side, task.lo, task.hi, task.cap
        )
        depth = 0
        opens_arr = np.array(opens, dtype=np.int64)
        esc_arr = np.array(esc, dtype=bool)
    else:
        from .kernel import classify_range

        out = classify_range(km, task.lo, task.hi, task.cap, task.side == "positive", table)
        drops, other, cyc, sieved = out.drops, out.other, out.cycles, out.sieved
        depth = max((t.depth for t in table), default=0)
        opens_arr = np.array(out.open_starts, dtype=np.int64)
        esc_arr = np.array(out.open_escaped, dtype=bool)
    cycles = [verified_cycle(m, task.side, s, L).to_record() for s, L in cyc]
    n_open = int(opens_arr.shape[0])
    counts = {
        "drops": drops,
        "cycles": len(cycles),
        "other_cycle": other,
        "unresolved": 0 if task.length_bound else n_open,
        "beyond_length": n_open if task.length_bound else 0,
    }
    if sum(counts.values()) != task.hi - task.lo + 1:  # pragma: no cover - defensive
        raise RuntimeError(f"internal error: counts of chunk [{task.lo}, {task.hi}] do not add up")
    return ChunkOutcome(
        task.side,
        task.lo,
        task.hi,
        counts,
        cycles,
        opens_arr,
        esc_arr,
        int(sieved),
        int(depth),
        time.perf_counter() - t0,
        code_version(),
    )


def default_chunk_size(m: Map | str) -> int:
    """Starts per chunk: ``2^27`` for maps that contract on average, ``2^18`` otherwise.

    Contracting maps (negative drift, e.g. 3x+1) are cheap per start; for
    expanding ones (5x+1) most starts are followed up to the cap, so chunks
    are smaller. Fixed per map, so that re-runs find their chunks again.

    >>> from cyclewright import maps
    >>> default_chunk_size(maps.get("3x+1")), default_chunk_size(maps.get("5x+1"))
    (134217728, 262144)
    """
    m = as_map(m)
    return 2**27 if m.drift_ratio() < 1 else 2**18


def iter_chunks(start: int, to: int, chunk_size: int):
    """The chunks of ``[start, to]`` on the grid of multiples of ``chunk_size``, lazily."""
    lo = start
    while lo <= to:
        hi = min(to, (lo // chunk_size + 1) * chunk_size - 1)
        yield (lo, hi)
        lo = hi + 1


def plan_chunks(start: int, to: int, chunk_size: int) -> list[tuple[int, int]]:
    """The chunks of ``[start, to]`` on the grid of multiples of ``chunk_size``.

    >>> plan_chunks(1, 25, 10)
    [(1, 9), (10, 19), (20, 25)]
    """
    return list(iter_chunks(start, to, chunk_size))


def count_chunks(start: int, to: int, chunk_size: int) -> int:
    """``len(plan_chunks(start, to, chunk_size))`` without listing them.

    >>> count_chunks(1, 25, 10), count_chunks(10, 10, 10)
    (3, 1)
    """
    return to // chunk_size - start // chunk_size + 1


def _batches(start: int, to: int, chunk_size: int, size: int = 4096):
    batch = []
    for c in iter_chunks(start, to, chunk_size):
        batch.append(c)
        if len(batch) == size:
            yield batch
            batch = []
    if batch:
        yield batch
