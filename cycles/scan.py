"""Real integer cycles: an exact, resumable scan of a range of starts by cycle minimum.

Inside
------
- :func:`scan` -- classify every start of ``[start, to]`` (positive starts,
  negative starts ``-to .. -start``, or both) and report the cycles whose
  minimum lies in the range, with counts per classification and the
  unresolved starts.
- :class:`ScanResult` -- the result (notebook-friendly repr, ``to_dict()``,
  ``minima`` per side for comparisons).
- :class:`FoundCycle` -- one integer cycle: minimum, length, odd steps or
  content, itinerary, elements, primitivity (of the word; Lagarias').
- :class:`ScanProgress` -- what a progress callback receives.
- :func:`run_chunk` -- the unit of work (one chunk of one side), as run by
  the executors; :class:`ChunkTask` and :class:`ChunkOutcome` are its input
  and output.
- :func:`plan_chunks`, :func:`default_chunk_size`, :data:`DEFAULT_MAX_STEPS`.

Classification (see :mod:`cycles.kernels` for the exact definitions)
--------------------------------------------------------------------
Each start ``s`` is, within the step cap ``S`` (``max_steps``):

- ``drops``: its orbit reaches a value smaller in absolute value (on the
  positive side also ``-s``): ``s`` is not the minimum of a cycle;
- ``cycles``: it returns to ``s`` first: ``s`` is the minimum of a cycle
  (verified again in exact arithmetic and by :func:`cycles.solver.solve` on
  its itinerary before it is reported);
- ``other_cycle``: it enters a cycle that does not contain ``s``;
- ``unresolved``: none of these within ``S`` steps. Unresolved starts are
  followed in exact arithmetic up to ``S`` steps (past the int64 ceiling);
  all are stored, the first ones listed.

With ``max_cycle_length=K`` the cap is ``K`` and the fourth class is
``beyond_length``: a start that neither drops below itself nor returns to
itself within ``K`` steps cannot be the minimum of a cycle of length ``<= K``
(certified, not unresolved). This is what a census of all cycles up to length
``K`` needs.

The negative side is the positive side of the conjugate map
``n -> -T(-n)``, so one kernel serves both; negative cycles are reported with
their (negative) elements, and ``minimum`` is the element of least absolute
value, as everywhere in cyclewright.

Work is split into chunks on a fixed grid (so re-runs and longer ranges reuse
finished chunks), run by a local process pool or a Dask cluster
(:mod:`cycles.executors`), and every finished chunk is written atomically to
the SQLite store (:mod:`cycles.store`). Killing the process at any moment and
running the same scan again gives exactly the results of an uninterrupted run.

References
----------
.. [1] J. C. Lagarias, "The 3x+1 problem and its generalizations",
   American Mathematical Monthly 92 (1985) 3-23 (cycles of 3x+k, the
   negative cycles of 3x+1).
.. [2] J. C. Lagarias, "The set of rational cycles for the 3x+1 problem",
   Acta Arithmetica 56 (1990) 33-53 (primitive cycles).
.. [3] R. Terras, Acta Arithmetica 30 (1976) 241-252 (the residue sieve).
"""

from __future__ import annotations

import functools
import time
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from maps import Map, MapError

from .errors import InputError, StoreError
from .itinerary import content as word_content
from .itinerary import format_itinerary, is_primitive
from .labels import CERTIFIED, EXACT
from .solver import cycle_representative, lagarias_primitive, solve
from .store import MAX_START, ScanStore, code_version, default_store_path

__all__ = [
    "scan",
    "ScanResult",
    "FoundCycle",
    "ScanProgress",
    "ChunkTask",
    "ChunkOutcome",
    "run_chunk",
    "plan_chunks",
    "iter_chunks",
    "count_chunks",
    "default_chunk_size",
    "DEFAULT_MAX_STEPS",
    "SIDES",
]

#: Default step cap per start.
DEFAULT_MAX_STEPS = 1000
SIDES = ("positive", "negative")
#: How many unresolved starts a result lists (all are in the store).
LISTED_UNRESOLVED = 20
_COUNT_KEYS = ("drops", "cycles", "other_cycle", "unresolved", "beyond_length")


# --------------------------------------------------------------------------- cycles
@dataclass(frozen=True)
class FoundCycle:
    """An integer cycle found by the scan (every figure exact).

    Attributes
    ----------
    side : str
        ``"positive"`` or ``"negative"``: the sign of the minimum.
    minimum : int
        The element of least absolute value (negative for negative cycles).
    length : int
        Number of elements (the period).
    odd_steps : int or None
        For two-branch maps: steps through residue 1.
    content : tuple of int
        How many steps go through each residue.
    itinerary : str
        The residues visited from the minimum (the parity vector for d = 2).
    elements : tuple of int
        The cycle from its minimum.
    primitive_itinerary : bool
        The itinerary is not a power of a shorter word.
    lagarias_primitive : bool
        The elements' gcd with the offsets is 1 (Lagarias 1990); a
        non-primitive cycle is a multiple of a cycle of a map with smaller offsets.
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
    def from_record(cls, rec: dict) -> FoundCycle:
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
        return (
            f"FoundCycle(min {self.minimum}, length {self.length}{steps}: {{{shown}{more}}}{kind})"
        )


def verified_cycle(m: Map, side: str, start: int, length: int) -> FoundCycle:
    """Rebuild and prove the cycle of ``start`` (kernel coordinates) in exact arithmetic.

    The orbit of ``x0 = +-start`` under ``m`` is iterated ``length`` steps; it
    must return to ``x0`` exactly then, with ``x0`` its representative. When
    the itinerary's denominator is non-zero, :func:`~cycles.solver.solve`
    must give the same integral, realized cycle. Anything else is an internal
    error (never reported as a cycle).

    >>> import maps
    >>> verified_cycle(maps.get("3x+1"), "negative", 17, 11).elements[:4]
    (-17, -25, -37, -55)
    """
    d = m.divisor
    x0 = start if side == "positive" else -start
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
    return FoundCycle(
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
    iterated one by one anyway, so small scans skip building the tables.
    Skipping a table never changes a result, only the speed.
    """
    from .sieve import safe_depth

    mm = m if side == "positive" else m.conjugate()
    need = hi >= mm.divisor ** max(1, safe_depth(mm, cap) // 2)
    return _side_tables(m, side, cap, need)


@functools.lru_cache(maxsize=16)
def _side_tables(m: Map, side: str, cap: int, need: bool):
    from .kernels import KernelMap
    from .sieve import sieve_levels

    mm = m if side == "positive" else m.conjugate()
    km = KernelMap.from_map(mm)
    levels = sieve_levels(mm, cap) if km is not None and need else ()
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

    >>> import maps
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
        from .kernels import classify_range

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


def default_chunk_size(m: Map) -> int:
    """Starts per chunk: ``2^27`` for maps that contract on average, ``2^18`` otherwise.

    Contracting maps (negative drift, e.g. 3x+1) are cheap per start; for
    expanding ones (5x+1) most starts are followed up to the cap, so chunks
    are smaller. Fixed per map, so that re-runs find their chunks again.

    >>> import maps
    >>> default_chunk_size(maps.get("3x+1")), default_chunk_size(maps.get("5x+1"))
    (134217728, 262144)
    """
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


# --------------------------------------------------------------------------- results
@dataclass(frozen=True)
class ScanProgress:
    """Progress of a scan, as passed to the ``progress`` callback."""

    side: str
    done: int
    total: int
    unresolved: int
    elapsed: float
    computed: int

    @property
    def rate(self) -> float:
        """Starts computed per second in this run (a measurement, float)."""
        return self.computed / self.elapsed if self.elapsed > 0 else 0.0


@dataclass(frozen=True)
class ScanResult:
    """The outcome of :func:`scan`.

    Attributes
    ----------
    map : Map
    start, to : int
        The range of absolute values scanned.
    sides : tuple of str
    max_steps : int
    max_cycle_length : int or None
    counts : dict
        ``side -> {"drops", "cycles", "other_cycle", "unresolved", "beyond_length"}``.
    cycles : tuple of FoundCycle
        Every cycle whose minimum lies in the range, by side then ``|minimum|``.
    unresolved_count, unresolved_escaped : dict
        Per side: unresolved starts, and how many of them passed 2^63.
    unresolved_first : dict
        Per side: the first unresolved starts (signed); all are in the store.
    sieved : dict
        Per side: starts decided by the residue sieve without iteration.
    sieve_depth : dict
        Per side: the sieve's depth ``K`` (classes mod ``d^K``).
    store_path : str or None
    chunk_size, chunks_total, chunks_reused : int
    seconds : float
        Wall time of this call (a measurement).
    computed : int
        Starts classified in this call (the rest came from the store).
    executor : str
    """

    map: Map
    start: int
    to: int
    sides: tuple[str, ...]
    max_steps: int
    max_cycle_length: int | None
    counts: dict
    cycles: tuple[FoundCycle, ...]
    unresolved_count: dict
    unresolved_escaped: dict
    unresolved_first: dict
    sieved: dict
    sieve_depth: dict
    store_path: str | None
    chunk_size: int
    chunks_total: int
    chunks_reused: int
    seconds: float
    computed: int
    executor: str = "local"
    version: str = field(default_factory=code_version)

    # ----------------------------------------------------------------- derived
    @property
    def minima(self) -> dict[str, tuple[int, ...]]:
        """Per side, the cycle minima found, sorted by absolute value."""
        out = {s: [] for s in self.sides}
        for c in self.cycles:
            out.setdefault(c.side, []).append(c.minimum)
        return {s: tuple(sorted(v, key=abs)) for s, v in out.items()}

    @property
    def complete(self) -> bool:
        """True when no start is unresolved: the classification of the range is complete."""
        return not any(self.unresolved_count.values())

    @property
    def label(self) -> str:
        """``certified`` for a complete classification of the range, else ``exact``.

        With unresolved starts the cycles listed are exact but the list may
        miss cycles whose minimum is an unresolved start.
        """
        return CERTIFIED.value if self.complete else EXACT.value

    @property
    def labels(self) -> dict[str, str]:
        return {
            "counts": CERTIFIED.value,
            "cycles": EXACT.value,
            "minima": self.label,
            "unresolved": CERTIFIED.value,
        }

    @property
    def starts_per_side(self) -> int:
        return self.to - self.start + 1

    def method(self) -> str:
        cap = (
            f"cycle length <= {self.max_cycle_length}"
            if self.max_cycle_length
            else f"step cap {self.max_steps}"
        )
        depths = sorted(set(self.sieve_depth.values()))
        sieve = (
            f"residue sieve mod {self.map.divisor}^{'/'.join(map(str, depths))}"
            if any(depths)
            else "no sieve"
        )
        return (
            "every start classified exactly (drops below itself / returns to itself / "
            f"enters another cycle / undecided), {cap}, {sieve}, int64 with overflow "
            "checks and exact multi-limb continuation; cycles re-verified by exact "
            "iteration and the itinerary's rational cycle"
        )

    def to_dict(self) -> dict:
        m = self.map
        unresolved = {
            s: {
                "count": self.unresolved_count[s],
                "escaped": self.unresolved_escaped[s],
                "first": list(self.unresolved_first[s]),
            }
            for s in self.sides
        }
        return {
            "map": m.label,
            "formula": m.formula(),
            "map_key": m.key,
            "range": {"from": self.start, "to": self.to},
            "sides": list(self.sides),
            "max_steps": self.max_steps,
            "max_cycle_length": self.max_cycle_length,
            "complete": self.complete,
            "label": self.label,
            "method": self.method(),
            "counts": {s: dict(self.counts[s]) for s in self.sides},
            "minima": {s: list(v) for s, v in self.minima.items()},
            "cycles": [c.to_record() for c in self.cycles],
            "unresolved": unresolved,
            "sieve": {
                s: {"depth": self.sieve_depth[s], "sieved": self.sieved[s]} for s in self.sides
            },
            "store": self.store_path,
            "chunks": {
                "chunk_size": self.chunk_size,
                "total": self.chunks_total,
                "reused": self.chunks_reused,
                "computed": self.chunks_total - self.chunks_reused,
            },
            "run": {
                "seconds": self.seconds,
                "computed_starts": self.computed,
                "starts_per_second": self.computed / self.seconds if self.seconds > 0 else None,
                "executor": self.executor,
                "code_version": self.version,
                "note": "wall-clock measurement, not a result",
            },
            "labels": self.labels,
        }

    def __repr__(self) -> str:
        parts = []
        for s in self.sides:
            mins = self.minima.get(s, ())
            shown = ", ".join(map(str, mins[:8])) + (", ..." if len(mins) > 8 else "")
            un = self.unresolved_count[s]
            extra = f", {un} unresolved" if un else ""
            if self.max_cycle_length:
                extra += (
                    f", {self.counts[s]['beyond_length']} beyond length {self.max_cycle_length}"
                )
            parts.append(f"{s}: minima [{shown}]{extra}")
        return (
            f"ScanResult({self.map.label}, [{self.start}, {self.to}]; "
            + "; ".join(parts)
            + f"; {self.label})"
        )


# --------------------------------------------------------------------------- the scan
def _as_int(value, what: str) -> int:
    if isinstance(value, bool):
        raise InputError(f"{what} must be an integer, got {value!r}")
    if isinstance(value, int):
        return int(value)
    if type(value).__name__ == "mpz" or isinstance(value, np.integer):
        return int(value)
    raise InputError(f"{what} must be an integer, got {value!r}")


def _open_store(store, m: Map) -> tuple[ScanStore, bool]:
    """(store, opened_here)."""
    if isinstance(store, ScanStore):
        if store.map.key != m.key:
            raise StoreError(
                f"the store given holds scans of {store.map.label}, not of {m.label}; use another store"
            )
        return store, False
    if store is False:
        return ScanStore(":memory:", m), True
    if store is None:
        return ScanStore(default_store_path(m), m, create_dirs=True), True
    if isinstance(store, (str, Path)):
        if Path(store).is_dir():  # a directory of stores, one per map definition
            return ScanStore(Path(store) / default_store_path(m).name, m), True
        return ScanStore(store, m), True
    raise InputError(f"store must be a path, a ScanStore, None (default) or False, got {store!r}")


def _prepare_parent(m: Map, sides, cap: int, to: int) -> Callable[[], None]:
    def prepare() -> None:
        from .kernels import warm_up

        warm_up(hard=False)
        for s in sides:
            _side_tools(m, s, cap, to)

    return prepare


def scan(
    m: Map | str,
    to: int,
    *,
    start: int = 1,
    side: str = "positive",
    workers: int | None = None,
    store=None,
    max_steps: int = DEFAULT_MAX_STEPS,
    max_cycle_length: int | None = None,
    executor: str = "local",
    scheduler: str | None = None,
    progress: Callable[[ScanProgress], None] | None = None,
    chunk_size: int | None = None,
) -> ScanResult:
    """Find every integer cycle whose minimum lies in ``[start, to]``, exactly.

    Parameters
    ----------
    m : Map or str
        The map (a name or shorthand is resolved with :func:`maps.get`).
    to : int
        Largest absolute value of a start (at most ``2^63 - 1``).
    start : int
        Smallest absolute value of a start (at least 1).
    side : {"positive", "negative", "both"}
        Positive starts, negative starts (``-to .. -start``), or both.
    workers : int, optional
        Worker processes of the local executor (default: all cores).
    store : path, ScanStore, None or False
        The results store. None: the map's default store in the user data
        directory (``$CYCLEWRIGHT_DATA_DIR`` overrides); False: keep nothing.
    max_steps : int
        Step cap per start (ignored when ``max_cycle_length`` is given).
    max_cycle_length : int, optional
        Only decide whether each start is the minimum of a cycle of length at
        most ``K``; the cap is then ``K`` and undecided starts are
        ``beyond_length`` (certified), never unresolved.
    executor : {"local", "dask"}
    scheduler : str, optional
        Dask scheduler address (``executor="dask"``).
    progress : callable, optional
        Called with a :class:`ScanProgress` after every chunk.
    chunk_size : int, optional
        Starts per chunk (default :func:`default_chunk_size`); chunks lie on
        the grid of its multiples, and only identical chunks are reused.

    Returns
    -------
    ScanResult

    Raises
    ------
    InputError
        Empty or reversed range, a bound beyond ``2^63 - 1``, ``workers <= 0``,
        a cap below 1, an unknown side or executor, an unreachable scheduler.
    StoreError
        The store belongs to another map definition or version, is corrupt or
        cannot be written (it is left untouched).

    Examples
    --------
    >>> import maps
    >>> r = scan(maps.get("3x+5"), 400, store=False, workers=1)
    >>> r.minima["positive"]                # OEIS A226607: 1, 19, 23, 187, 347 (and 5)
    (1, 5, 19, 23, 187, 347)
    >>> [c.lagarias_primitive for c in r.cycles][:2]
    [True, False]
    >>> scan("3x+1", 1000, side="negative", store=False, workers=1).minima
    {'negative': (-1, -5, -17)}
    >>> scan("3x+1", 10, start=20, store=False)
    Traceback (most recent call last):
    ...
    cycles.errors.InputError: empty range: to = 10 is below start = 20

    References
    ----------
    Lagarias 1985, 1990; Terras 1976 (see the module docstring).
    """
    t0 = time.perf_counter()
    if isinstance(m, str):
        import maps as _maps

        try:
            m = _maps.get(m)
        except MapError as exc:
            raise InputError(str(exc)) from None
    if not isinstance(m, Map):
        raise InputError(f"expected a Map or a map name, got {m!r}")
    to = _as_int(to, "to")
    start = _as_int(start, "start")
    if start < 1:
        raise InputError(
            f"start = {start}: ranges are of absolute values and start at 1 or above "
            "(use side='negative' for negative starts)"
        )
    if to < start:
        raise InputError(f"empty range: to = {to} is below start = {start}")
    if to > MAX_START:
        raise InputError(
            f"to = {to} is beyond what the store schema allows (starts up to 2^63 - 1 = {MAX_START})"
        )
    if side not in ("positive", "negative", "both"):
        raise InputError(f"side must be 'positive', 'negative' or 'both', got {side!r}")
    if workers is not None:
        workers = _as_int(workers, "workers")
        if workers < 1:
            raise InputError(f"workers must be at least 1, got {workers}")
    max_steps = _as_int(max_steps, "max_steps")
    if max_steps < 1:
        raise InputError(f"max_steps must be at least 1, got {max_steps}")
    if max_cycle_length is not None:
        max_cycle_length = _as_int(max_cycle_length, "max_cycle_length")
        if max_cycle_length < 1:
            raise InputError(f"max_cycle_length must be at least 1, got {max_cycle_length}")
    if chunk_size is not None:
        chunk_size = _as_int(chunk_size, "chunk_size")
        if chunk_size < 1:
            raise InputError(f"chunk_size must be at least 1, got {chunk_size}")
    if executor not in ("local", "dask"):
        raise InputError(f"unknown executor {executor!r}: use 'local' or 'dask'")
    cap = max_cycle_length if max_cycle_length is not None else max_steps
    sides = SIDES if side == "both" else (side,)
    cs = chunk_size or default_chunk_size(m)

    from .executors import make_executor

    ex = make_executor(
        executor, workers=workers, scheduler=scheduler, prepare=_prepare_parent(m, sides, cap, to)
    )
    try:
        led, opened = _open_store(store, m)
        try:
            return _run(
                m,
                led,
                ex,
                sides,
                start,
                to,
                cap,
                max_steps,
                max_cycle_length,
                cs,
                progress,
                t0,
            )
        finally:
            if opened:
                led.close()
    finally:
        ex.close()


def _run(m, led, ex, sides, start, to, cap, max_steps, K, cs, progress, t0) -> ScanResult:
    branches = tuple(tuple(b) for b in m.branches)
    counts, cycles, ucount, uesc, ufirst, sieved, depth = {}, [], {}, {}, {}, {}, {}
    reused = 0
    computed = 0
    total = to - start + 1
    for side in sides:
        sid = led.scan_id(side, max_steps, K)
        # what the store already has (streamed: memory does not grow with the range)
        done_starts = unresolved = n_done = 0
        for batch in _batches(start, to, cs):
            for r in led.finished(sid, batch).values():
                n_done += 1
                done_starts += r.hi - r.lo + 1
                unresolved += r.counts["unresolved"]
        reused += n_done

        def todo(sid=sid, side=side):
            for batch in _batches(start, to, cs):
                have = led.finished(sid, batch)
                for lo, hi in batch:
                    if (lo, hi) not in have:
                        yield ChunkTask(m.divisor, branches, side, lo, hi, cap, K is not None)

        if done_starts < total:
            run_id = led.begin_run(sid, start, to, cs)
            status = "interrupted"
            try:
                if progress is not None:
                    progress(
                        ScanProgress(
                            side, done_starts, total, unresolved, time.perf_counter() - t0, computed
                        )
                    )
                for out in ex.map_unordered(run_chunk, todo()):
                    led.record_chunk(
                        sid,
                        out.lo,
                        out.hi,
                        out.counts,
                        out.cycles,
                        out.unresolved,
                        out.escaped,
                        sieved=out.sieved,
                        sieve_depth=out.sieve_depth,
                        seconds=out.seconds,
                        version=out.version,
                    )
                    n = out.hi - out.lo + 1
                    done_starts += n
                    computed += n
                    unresolved += out.counts["unresolved"]
                    if progress is not None:
                        progress(
                            ScanProgress(
                                side,
                                done_starts,
                                total,
                                unresolved,
                                time.perf_counter() - t0,
                                computed,
                            )
                        )
                status = "complete"
            finally:
                try:
                    led.end_run(run_id, status)
                except Exception:  # pragma: no cover - best effort while unwinding
                    pass
        c = dict.fromkeys(_COUNT_KEYS, 0)
        n_sieved = n_depth = n_open = n_esc = 0
        first: list[int] = []
        for batch in _batches(start, to, cs):
            records = led.finished(sid, batch)
            if len(records) != len(batch):  # pragma: no cover - defensive
                raise RuntimeError("internal error: a chunk is missing from the store")
            for r in records.values():
                for k in _COUNT_KEYS:
                    c[k] += r.counts[k]
                n_sieved += r.sieved
                n_depth = max(n_depth, r.sieve_depth)
            o, e, f = led.unresolved_summary(sid, batch, LISTED_UNRESOLVED - len(first))
            n_open, n_esc = n_open + o, n_esc + e
            first.extend(f)
        if n_open != c["unresolved"] + c["beyond_length"]:  # pragma: no cover - defensive
            raise RuntimeError("internal error: unresolved starts and counts disagree")
        counts[side] = c
        sieved[side] = n_sieved
        depth[side] = n_depth
        cycles.extend(FoundCycle.from_record(rec) for rec in led.cycles(sid, start, to))
        ucount[side] = c["unresolved"]
        uesc[side] = n_esc if c["unresolved"] else 0
        ufirst[side] = tuple(first) if c["unresolved"] else ()
    cycles.sort(key=lambda cy: (SIDES.index(cy.side), abs(cy.minimum)))
    return ScanResult(
        map=m,
        start=start,
        to=to,
        sides=tuple(sides),
        max_steps=max_steps,
        max_cycle_length=K,
        counts=counts,
        cycles=tuple(cycles),
        unresolved_count=ucount,
        unresolved_escaped=uesc,
        unresolved_first=ufirst,
        sieved=sieved,
        sieve_depth=depth,
        store_path=None if led.memory else str(led.path),
        chunk_size=cs,
        chunks_total=count_chunks(start, to, cs) * len(sides),
        chunks_reused=reused,
        seconds=time.perf_counter() - t0,
        computed=computed,
        executor=ex.describe(),
    )


def cycle_from_element(m: Map, x0: int, length: int) -> FoundCycle:
    """The verified cycle record of the cycle whose minimum is ``x0`` (any sign, 0 allowed)."""
    if x0 == 0:
        x, elems, word = 0, [], []
        for _ in range(length):
            elems.append(x)
            word.append(x % m.divisor)
            x = m.step(x)
        if x != 0:
            raise RuntimeError(f"internal error: 0 does not return after {length} steps")
        cont = word_content(word, m.divisor)
        return FoundCycle(
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
