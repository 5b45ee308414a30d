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
from ..limits import (
    DEFAULT_MAX_STEPS,
    MAX_CHUNKS,
    MAX_RECORDS_MINUTES,
    MAX_STEP_CAP,
    check_memory,
    check_range,
    check_step_cap,
    check_workers,
    limits_lifted,
    short_int,
)
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
from .store import (
    MAX_START,
    ScanStore,
    _stderr_notice,
    adopt_legacy_store,
    default_store_path,
    prove_cycle_rows,
)

#: A scan estimated to take this many seconds or more runs its chunks in worker
#: processes even with one worker (see :class:`~.executors.LocalExecutor`).
ISOLATE_SECONDS = 1.0

_CLAIM_GROUP = 16  # chunks claimed per store transaction
_CLAIM_POLL = 0.5  # seconds between looks at chunks another run is computing

__all__ = [
    "scan",
    "check_store_for_maps",
    "check_chunks",
    "scan_arguments",
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


def _open_store(store, m: Map, notice=None) -> tuple[ScanStore, bool]:
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
        adopt_legacy_store(m)
        return ScanStore(default_store_path(m), m, create_dirs=True, notice=notice), True
    if isinstance(store, (str, Path)):
        if Path(store).is_dir():  # a directory of stores, one per map definition
            return ScanStore(Path(store) / default_store_path(m).name, m, notice=notice), True
        return ScanStore(store, m, notice=notice), True
    raise InputError(f"store must be a path, a ScanStore, None (default) or False, got {store!r}")


def check_store_for_maps(store, ms, what: str) -> None:
    """Refuse, before any work, one store file (or ScanStore) for several map definitions.

    A store holds the scans of one map definition; ``what`` (a comparison, a
    family census) of several maps needs a directory of stores, or none.
    """
    keys = {as_map(m).key for m in ms}
    if len(keys) < 2 or store is None or store is False:
        return
    if isinstance(store, ScanStore) or not Path(store).is_dir():
        where = store.path if isinstance(store, ScanStore) else store
        raise InputError(
            f"store {where}: {what} of {len(keys)} maps needs a directory of stores "
            "(one file per map definition), not one store file"
        )


def _prepare_parent(m: Map, sides, cap: int, to: int) -> Callable[[], None]:
    def prepare() -> None:
        from .kernel import warm_up

        warm_up(hard=False)
        for s in sides:
            _side_tools(m, s, cap, to)

    return prepare


def check_scan_end(to: int, what: str = "to") -> int:
    """``to`` if at most 2^63 - 1 (the store's 64-bit starts), else :class:`InputError`.

    >>> check_scan_end(2**63)
    Traceback (most recent call last):
    ...
    cyclewright.cycles.errors.InputError: to must be at most 2^63-1, got 2^63 (the store holds starts as 64-bit integers)
    """
    return check_range(to, what, maximum=MAX_START, why="the store holds starts as 64-bit integers")


def check_chunks(starts_per_side: int, n_sides: int, chunk_size: int) -> int:
    """The number of chunks ``chunk_size`` cuts a scan into; :class:`InputError` past the limit.

    At most :data:`~cyclewright.cycles.limits.MAX_CHUNKS` chunks (each costs
    bookkeeping and a store row); lifted inside
    :func:`~cyclewright.cycles.limits.lift_limits`.

    >>> check_chunks(10**6, 1, 1000)
    1000
    >>> check_chunks(10**5, 1, 1)
    Traceback (most recent call last):
    ...
    cyclewright.cycles.errors.InputError: chunk_size 1 cuts 100000 starts into 100000 chunks; at most 10000 are allowed (each costs bookkeeping and a store row): use a chunk size of 10 or more, or leave it out
    """
    starts = max(starts_per_side, 0) * n_sides
    chunks = -(-starts // chunk_size)
    if chunks > MAX_CHUNKS and not limits_lifted():
        raise InputError(
            f"chunk_size {chunk_size} cuts {short_int(starts)} starts into "
            f"{short_int(chunks)} chunks; at most {MAX_CHUNKS} are allowed (each costs "
            f"bookkeeping and a store row): use a chunk size of "
            f"{-(-starts // MAX_CHUNKS)} or more, or leave it out",
            param="chunk_size",
        )
    return chunks


def scan_arguments(m, to, start, side, workers, max_steps, max_cycle_length, chunk_size, executor):
    """The arguments of :func:`scan` checked, in its words (:class:`InputError`); nothing runs.

    Returns ``(map, to, start, sides, workers, max_steps, max_cycle_length,
    chunk_size)``.
    """
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
    check_scan_end(to)
    sides = sides_of(side)
    if workers is not None:
        workers = check_workers(_as_int(workers, "workers"))
    max_steps = check_step_cap(_as_int(max_steps, "max_steps"))
    if max_cycle_length is not None:
        max_cycle_length = check_step_cap(
            _as_int(max_cycle_length, "max_cycle_length"), "max_cycle_length"
        )
    if chunk_size is not None:
        chunk_size = _as_int(chunk_size, "chunk_size")
        check_range(
            chunk_size,
            "chunk_size",
            minimum=1,
            maximum=MAX_STEP_CAP,
            why="the store holds it as a 64-bit integer",
        )
        check_chunks(to - start + 1, len(sides), chunk_size)
    if executor not in ("local", "dask"):
        raise InputError(f"unknown executor {executor!r}: use 'local' or 'dask'")
    return m, to, start, sides, workers, max_steps, max_cycle_length, chunk_size


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
    recompute: bool = True,
    notice: Callable[[str], None] | None = None,
    max_minutes: float | None = MAX_RECORDS_MINUTES,
    rate: float | None = None,
    on_plan: Callable | None = None,
    isolate: bool | None = None,
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
    recompute : bool
        A stored chunk that fails its checks (checksum, counts, a cycle that
        does not re-prove) is marked damaged and recomputed; with False the
        scan refuses instead (:class:`StoreError`). Either way it is never
        reported.
    notice : callable, optional
        Receives one-line messages (a damaged chunk recomputed, a busy
        store waited for, chunks another run is computing); default: stderr.
    max_minutes : float or None
        Refuse (:class:`InputError`, before anything runs) a scan whose
        estimated wall time is above this many minutes (default
        :data:`~cyclewright.cycles.limits.MAX_RECORDS_MINUTES`; the estimate
        is measured now on pieces of the range,
        :func:`~cyclewright.cycles.records_plan.plan_scan`, heuristic).
        None, or inside :func:`~cyclewright.cycles.limits.lift_limits`:
        never refused.
    rate : float, optional
        Starts per second per worker for that estimate, instead of a
        measurement.
    on_plan : callable, optional
        Receives the :class:`~cyclewright.cycles.records_plan.WalkPlan`
        before the scan starts.
    isolate : bool, optional
        Run the chunks in worker processes even on one worker, so that a stop
        signal ends the scan within a second (a long compiled call in this
        process answers none until it returns). None: when the estimate says
        :data:`ISOLATE_SECONDS` or more, or when there is no estimate.

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
    m, to, start, sides, workers, max_steps, max_cycle_length, chunk_size = scan_arguments(
        m, to, start, side, workers, max_steps, max_cycle_length, chunk_size, executor
    )
    cap = max_cycle_length if max_cycle_length is not None else max_steps
    if executor == "local":
        _check_growing_orbits(m, cap, workers)
    cs = chunk_size or default_chunk_size(m)
    from ..records_plan import check_minutes, check_plan, plan_scan

    if max_minutes is not None:
        check_minutes(max_minutes)
    plan = None
    if max_minutes is not None or on_plan is not None:
        plan = plan_scan(
            m,
            to,
            start=start,
            side=side,
            max_steps=max_steps,
            max_cycle_length=max_cycle_length,
            workers=workers,
            executor=executor,
            chunk_size=cs,
            rate=rate,
        )  # measured on pieces of the range: refused here, before any chunk
        check_plan(plan, max_minutes)
        if on_plan is not None:
            on_plan(plan)

    from .executors import make_executor

    ex = make_executor(
        executor,
        workers=workers,
        scheduler=scheduler,
        prepare=_prepare_parent(m, sides, cap, to),
        # work of a second or more runs in worker processes even on one worker: a long
        # compiled call in this process would not answer a stop signal until it returns
        isolate=(plan is None or plan.seconds >= ISOLATE_SECONDS) if isolate is None else isolate,
    )
    try:
        if notice is None:
            notice = _stderr_notice
        if hasattr(ex, "notice"):
            ex.notice = notice
        led, opened = _open_store(store, m, notice)
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
                recompute,
                notice,
            )
        finally:
            if opened:
                led.close()
    finally:
        ex.close()


def _check_growing_orbits(m: Map, cap: int, workers: int | None) -> None:
    """Refuse a step cap whose orbits could not fit the memory budget, for maps whose orbits grow.

    When orbits grow on average (drift above 0, e.g. 5x+1), most starts run to the
    step cap: each worker then keeps a history of ``cap + 1`` hashes (8 bytes each)
    and two values of up to ``cap`` times the multiplier's bits.
    """
    import os

    from cyclewright.maps.drift import drift_exact

    if drift_exact(m)[1] <= 1:
        return
    bits = max(abs(a) for a in m.multipliers).bit_length()
    per_worker = 8 * (cap + 1) + 2 * (cap * bits) // 8
    n = workers or os.cpu_count() or 1
    check_memory(
        n * per_worker,
        f"a scan of {m.label} (its orbits grow on average, so most run to the step cap) "
        f"with step cap {cap} on {n} worker(s)",
        hint="lower max_steps",
        param="max_steps",
    )


def _detail(side: str, unresolved: int) -> str:
    """The detail of a scan's progress event: the side and the unresolved starts so far."""
    return f"{side} side, {unresolved:,} unresolved"


def _check_batch(m, led, sid, side, batch, recompute, notice) -> dict:
    """The good finished chunks of ``batch``; damaged ones are marked (or refused)."""
    chk = led.check(sid, batch)
    damaged = list(chk.damaged)
    good = dict(chk.good)
    for key, rows in chk.cycles.items():
        why = prove_cycle_rows(m, side, rows)
        if why is not None:
            damaged.append((key[0], key[1], why))
            good.pop(key, None)
    if damaged:
        lo, hi, why = damaged[0]
        more = f" and {len(damaged) - 1} more" if len(damaged) > 1 else ""
        where = led.path or "in memory"
        verb = "are" if more else "is"
        what = f"store {where}: chunk [{lo}, {hi}] of the {side} side{more} {verb} damaged ({why})"
        if not recompute:
            raise StoreError(f"{what}; refused (recompute off), nothing was reported")
        if led.readonly:
            raise StoreError(
                f"{what}; the store is not writable, so it cannot be recomputed; nothing was reported"
            )
        led.mark_damaged(sid, damaged)
        notice(f"{what}; recomputing {'them' if more else 'it'}")
    return good


def _run(m, led, ex, sides, start, to, cap, max_steps, K, cs, progress, t0, recompute, notice):
    branches = tuple(tuple(b) for b in m.branches)
    counts, cycles, ucount, uesc, ufirst, sieved, depth = {}, [], {}, {}, {}, {}, {}
    reused = 0
    computed = 0
    total = to - start + 1
    for side in sides:
        sid = led.scan_id(side, max_steps, K, create=not led.readonly)
        if sid is None:
            raise StoreError(
                f"store {led.path} is not writable (permission denied) and does not hold the "
                f"{side} scan asked for; nothing was changed"
            )
        # what the store already has, checked (streamed: memory does not grow with the range)
        done_starts = unresolved = n_done = 0
        for batch in _batches(start, to, cs):
            for r in _check_batch(m, led, sid, side, batch, recompute, notice).values():
                n_done += 1
                done_starts += r.hi - r.lo + 1
                unresolved += r.counts["unresolved"]
        reused += n_done

        if done_starts < total:
            if led.readonly:
                raise StoreError(
                    f"store {led.path} is not writable (permission denied) and lacks "
                    f"{total - done_starts} of the {total} starts of the {side} side; "
                    "nothing was changed"
                )
            run_id = led.begin_run(sid, start, to, cs)
            waiting: dict = {}
            shared: list = []

            def todo(sid=sid, side=side, run_id=run_id, waiting=waiting, shared=shared):
                for batch in _batches(start, to, cs):
                    have = led.finished(sid, batch)
                    missing = [c for c in batch if c not in have]
                    for i in range(0, len(missing), _CLAIM_GROUP):
                        mine, others = led.claim(sid, run_id, missing[i : i + _CLAIM_GROUP])
                        waiting.update(others)
                        for lo, hi in mine:
                            yield ChunkTask(m.divisor, branches, side, lo, hi, cap, K is not None)
                # chunks another run is computing: wait for them, or take them over
                told = False
                while waiting:
                    mine, others = led.claim(sid, run_id, list(waiting))
                    for c in list(waiting):
                        if c not in others:
                            del waiting[c]
                    for lo, hi in mine:
                        yield ChunkTask(m.divisor, branches, side, lo, hi, cap, K is not None)
                    if others:
                        shared.append(True)
                        if not told:
                            who = sorted(set(others.values()))[0]
                            notice(
                                f"waiting for {len(others)} chunk{'s' if len(others) != 1 else ''}"
                                f" of the {side} side that {who} is computing"
                            )
                            told = True
                        time.sleep(_CLAIM_POLL)

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
                        run_id=run_id,
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
            if shared:  # what other runs finished meanwhile is checked like the rest
                for batch in _batches(start, to, cs):
                    _check_batch(m, led, sid, side, batch, recompute, notice)
        c = dict.fromkeys(_COUNT_KEYS, 0)
        n_sieved = n_depth = n_open = n_esc = 0
        first: list[int] = []
        for batch in _batches(start, to, cs):
            records = led.finished(sid, batch)
            if len(records) != len(batch):  # pragma: no cover - a concurrent writer's damage
                raise StoreError(
                    f"store {led.path}: a chunk of the {side} side went missing during the run "
                    "(another process changed the store); re-run to complete it"
                )
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
