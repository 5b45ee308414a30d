"""``cyclewright scan MAP --to N``: every integer cycle whose minimum lies in a range, exactly."""

from __future__ import annotations

import click

from cyclewright.cycles.scan.run import scan

from ..errors import BadInput
from ..numbers import MAX_CHUNKS
from ..options import (
    IntExpr,
    executor_options,
    from_option,
    json_option,
    latex_tables,
    map_argument,
    maps_option,
    max_length_option,
    max_minutes_option,
    max_steps_option,
    plan_option,
    resolve_map,
    resolve_store,
    show_option,
    side_option,
    store_options,
    to_option,
    workers_option,
)
from ..progress import progress_display
from ..render import emit_json, show_table, stdout_console
from .records_cmd import parse_minutes, print_plan, show_plan

_EPILOG = """\b
Examples:
  cyclewright scan 3x+1 --to 10^9
  cyclewright scan 3x+5 --to 1000 --side both --json
  cyclewright scan 5x+1 --to 10^6 --max-steps 2000 --store five.sqlite
  cyclewright scan 3x+1 --from 10^10 --to 10^10+10^8 --max-length 10000
  cyclewright scan 3x+1 --to 10^9 --executor dask --scheduler tcp://10.0.0.5:8786
\b
Each start s is classified exactly: it drops below s (no cycle minimum), it
returns to s (s is a cycle minimum; the cycle is reported), it enters another
cycle, or it is unresolved within the step cap. With --max-length K the
question is only "is s the minimum of a cycle of length <= K?" (the step cap
is K, no start stays unresolved) and undecided starts are counted as beyond
length K. Ranges are of absolute values; the negative side scans -N .. -M.
Finished chunks are kept in the store (default: one file per map in the user
data directory, $CYCLEWRIGHT_DATA_DIR overrides), so an interrupted scan
resumes where it stopped.
\b
Before it starts, the scan is timed on pieces of its own range (a map whose
orbits grow: a few starts walked with growing step caps, scaled to the cap,
leaning high) and refused, with the estimate, when that is above
--max-minutes (heuristic; --plan shows the estimate only).
"""


@click.command("scan", epilog=_EPILOG)
@map_argument
@to_option(required=True)
@from_option
@side_option
@workers_option
@store_options
@max_steps_option
@max_length_option
@executor_options
@click.option(
    "--chunk-size",
    type=IntExpr(minimum=1),
    default=None,
    help=f"Starts per chunk (advanced; at most {MAX_CHUNKS} chunks per scan).",
)
@click.option(
    "--no-recompute",
    is_flag=True,
    help="Refuse (exit 2) instead of recomputing a stored chunk that fails its checks.",
)
@max_minutes_option
@plan_option
@show_option
@maps_option
@json_option
@latex_tables
def scan_cmd(
    map_spec,
    to,
    start,
    side,
    workers,
    store,
    no_store,
    max_steps,
    max_length,
    executor,
    scheduler,
    chunk_size,
    no_recompute,
    max_minutes,
    plan_only,
    show,
    map_files,
    as_json,
) -> None:
    """Every integer cycle of MAP whose minimum lies in [M, N], by an exact scan of the starts."""
    m = resolve_map(map_spec, map_files)
    limit = parse_minutes(max_minutes)
    if plan_only:
        _plan(
            m, to, start, side, workers, max_steps, max_length, executor, chunk_size, limit, as_json
        )
        return
    with progress_display() as show_progress:
        result = scan(
            m,
            to,
            start=start,
            side=side,
            workers=workers,
            store=resolve_store(store, no_store),
            max_steps=max_steps,
            max_cycle_length=max_length,
            executor=executor,
            scheduler=scheduler,
            progress=show_progress,
            chunk_size=chunk_size,
            recompute=not no_recompute,
            notice=show_progress.notice,
            max_minutes=limit,
            on_plan=show_plan,
        )
    if as_json:
        emit_json(result.to_dict())
        return
    _print(result, show)


def _plan(m, to, start, side, workers, max_steps, max_length, executor, chunk_size, limit, as_json):
    """``--plan``: the estimate and whether the scan would be refused; nothing runs."""
    from cyclewright.cycles.records_plan import plan_scan
    from cyclewright.cycles.scan.run import scan_arguments

    if start < 1 or to < start:
        raise BadInput(f"empty range: {start}..{to}")
    # the API's checks and refusals, naming the options (cli/app.py)
    scan_arguments(m, to, start, side, workers, max_steps, max_length, chunk_size, executor)
    plan = plan_scan(
        m,
        to,
        start=start,
        side=side,
        max_steps=max_steps,
        max_cycle_length=max_length,
        workers=workers,
        executor=executor,
        chunk_size=chunk_size,
    )
    print_plan(plan, limit, as_json)


def _print(r, show_n: int) -> None:
    con = stdout_console()
    m = r.map
    cap = (
        f"cycles of length <= {r.max_cycle_length}"
        if r.max_cycle_length
        else f"step cap {r.max_steps}"
    )
    con.print(
        f"[bold]{m.label}[/bold] ({m.formula()}), starts {r.start}..{r.to} "
        f"({' and '.join(r.sides)}), {cap}: [bold]{r.label}[/bold]"
        + ("" if r.complete else " (some starts unresolved, see below)")
    )
    counts, cycles = r.tables()
    con.print(show_table(counts))
    if r.cycles:
        con.print(show_table(cycles, show_n))
    else:
        con.print("No cycle has its minimum in the range.")
    for s in r.sides:
        n = r.unresolved_count[s]
        if n:
            first = ", ".join(str(x) for x in r.unresolved_first[s])
            con.print(
                f"{s}: {n:,} starts unresolved within {r.max_steps} steps "
                f"({r.unresolved_escaped[s]:,} of them passed 2^63); first: {first}"
                + ("" if r.store_path is None else "; all are in the store")
            )
    where = r.store_path or "not stored"
    rate = r.computed / r.seconds if r.seconds > 0 else 0.0
    con.print(
        f"store: {where}; chunks {r.chunks_total} ({r.chunks_reused} reused); "
        f"{r.seconds:.2f} s, {rate:,.0f} starts/s computed (wall-clock measurement)"
    )


COMMANDS = [scan_cmd]
