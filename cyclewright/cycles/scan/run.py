"""The scan function: plan the chunks, reuse the store, run the executor, gather the result.

See :mod:`cyclewright.cycles.scan` for what the classes of starts mean.
"""

from __future__ import annotations

import time
from collections.abc import Callable
from pathlib import Path

import numpy as np

from cyclewright.maps import Map, as_map

from ..errors import InputError, StoreError
from ..integer_cycle import IntegerCycle
from ..limits import DEFAULT_MAX_STEPS
from ..progress import ProgressCallback, report
from ..sides import DEFAULT_SIDE, SIDES, Side, sides_of
from .chunks import (
    _COUNT_KEYS,
    LISTED_UNRESOLVED,
    ChunkTask,
    _batches,
    _side_tools,
    count_chunks,
    default_chunk_size,
    run_chunk,
)
from .result import ScanResult
from .store import MAX_START, ScanStore, default_store_path

__all__ = [
    "scan",
]


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
        from .kernel import warm_up

        warm_up(hard=False)
        for s in sides:
            _side_tools(m, s, cap, to)

    return prepare


def scan(
    m: Map | str,
    to: int,
    *,
    start: int = 1,
    side: Side = DEFAULT_SIDE,
    workers: int | None = None,
    store=None,
    max_steps: int = DEFAULT_MAX_STEPS,
    max_cycle_length: int | None = None,
    executor: str = "local",
    scheduler: str | None = None,
    progress: ProgressCallback | None = None,
    chunk_size: int | None = None,
) -> ScanResult:
    """Find every integer cycle whose minimum lies in ``[start, to]``, exactly.

    Parameters
    ----------
    m : Map or str
        The map, or its name, alias or ``ax+b`` shorthand.
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
        Step cap per start (ignored when ``max_cycle_length`` is given);
        default :data:`~cyclewright.cycles.limits.DEFAULT_MAX_STEPS`.
    max_cycle_length : int, optional
        Only decide whether each start is the minimum of a cycle of length at
        most ``K``; the cap is then ``K`` and undecided starts are
        ``beyond_length`` (certified), never unresolved.
    executor : {"local", "dask"}
    scheduler : str, optional
        Dask scheduler address (``executor="dask"``).
    progress : ProgressCallback, optional
        Called with a :class:`~cyclewright.cycles.progress.ProgressEvent`
        (phase ``"scan"``, unit ``"starts"``, detail: the side and the
        unresolved starts so far) before the first chunk of a side and after
        every chunk.
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
    >>> from cyclewright import maps
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
    cyclewright.cycles.errors.InputError: empty range: to = 10 is below start = 20

    References
    ----------
    Lagarias 1985, 1990; Terras 1976 (see the module docstring).
    """
    t0 = time.perf_counter()
    m = as_map(m)
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
    sides = sides_of(side)
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


def _detail(side: str, unresolved: int) -> str:
    """The detail of a scan's progress event: the side and the unresolved starts so far."""
    return f"{side} side, {unresolved:,} unresolved"


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
                report(progress, "scan", done_starts, total, "starts", _detail(side, unresolved))
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
                    report(
                        progress, "scan", done_starts, total, "starts", _detail(side, unresolved)
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
        cycles.extend(IntegerCycle.from_record(rec) for rec in led.cycles(sid, start, to))
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
