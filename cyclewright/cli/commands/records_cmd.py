"""``cyclewright records MAP --to N``: record holders, distributions and basins over a range."""

from __future__ import annotations

import sys

import click

from cyclewright.cycles.errors import InputError
from cyclewright.cycles.records import records
from cyclewright.cycles.records_plan import check_minutes, check_plan, plan_records

from ..errors import BadInput
from ..files import atomic_write, check_distinct, check_figure_path, check_output
from ..options import (
    csv_option,
    executor_options,
    force_option,
    from_option,
    json_option,
    latex_option,
    map_argument,
    maps_option,
    max_minutes_option,
    max_steps_option,
    plan_option,
    plot_options,
    resolve_map,
    resolve_store,
    show_option,
    side_option,
    store_options,
    to_option,
    workers_option,
)
from ..progress import progress_display
from ..render import (
    emit_json,
    latex_output,
    show_table,
    stderr_console,
    stdout_console,
    write_csv,
)

_EPILOG = """\b
Examples:
  cyclewright records 3x+1 --to 10^6
  cyclewright records 3x+5 --to 10^5 --side both --plot 3x5.pdf
  cyclewright records 5x+1 --to 10^4 --max-steps 500 --json
  cyclewright records 3x+1 --to 10^7 --csv rec.csv --latex
\b
Finished chunks are kept in a store beside the map's scan store (--store,
--no-store): an interrupted run resumes, a repeated run reuses them.
\b
Every start s of the range is followed to the minimum of the cycle it enters.
delay: steps to that minimum; glide: first step below |s|; peak: largest
|value| on the way. For ax+b maps the classic undivided counts are shown too
(full = steps + odd steps; the peak also sees a*n+b before each halving). A
record holder beats every start of smaller |s| in the range. Starts that do
not close a cycle within --max-steps are unresolved: counted, listed, and
left out of every record and distribution. Model means are heuristic.
\b
Before it starts, the run is timed on small pieces of its own range and
refused, with the estimate, when that is above --max-minutes (heuristic;
--plan shows the estimate only).
"""


@click.command("records", epilog=_EPILOG)
@map_argument
@to_option(required=True)
@from_option
@side_option
@max_steps_option
@workers_option
@executor_options
@csv_option
@plot_options
@latex_option
@show_option
@force_option
@maps_option
@store_options
@max_minutes_option
@plan_option
@json_option
def records_cmd(
    map_spec,
    to,
    start,
    side,
    max_steps,
    workers,
    executor,
    scheduler,
    csv_path,
    plot_path,
    width,
    as_latex,
    show,
    force,
    map_files,
    store,
    no_store,
    max_minutes,
    plan_only,
    as_json,
) -> None:
    """Record holders (delay, glide, peak), exact distributions and basin sizes of MAP over [M, N]."""
    m = resolve_map(map_spec, map_files)
    if to < 1:
        raise BadInput(f"--to must be at least 1, got {to}")
    limit = parse_minutes(max_minutes)
    if plan_only:
        _plan(m, to, start, side, max_steps, workers, executor, limit, as_json)
        return
    if as_json and as_latex:
        raise BadInput("--json and --latex exclude each other")
    if csv_path == "-" and (as_json or as_latex):
        raise BadInput("--csv - writes to stdout; give --csv a file name with --json or --latex")
    check_distinct(csv_path, plot_path)
    if csv_path != "-":
        check_output(csv_path, "--csv", force)
    check_figure_path(plot_path, "--plot", force)
    # the API's refusals (range end, step cap, time) name the options (cli/app.py)
    with progress_display() as show_progress:
        r = records(
            m,
            to,
            start=start,
            side=side,
            max_steps=max_steps,
            workers=workers,
            executor=executor,
            scheduler=scheduler,
            progress=show_progress,
            store=resolve_store(store, no_store),
            max_minutes=limit,
            on_plan=show_plan,
        )
    # outputs only after the whole computation succeeded
    if csv_path:
        cols, rows = csv_rows(r)
        if csv_path == "-":
            write_csv(sys.stdout, cols, rows)
        else:
            atomic_write(csv_path, lambda fh: write_csv(fh, cols, rows))
    if plot_path:
        from ..plots import plot_records

        plot_records(r, plot_path, width=width)
    if csv_path == "-":
        return
    if as_json:
        emit_json(r.to_dict())
        return
    if as_latex:
        print(latex_text(r, show))
        return
    _print(r, show)


def parse_minutes(max_minutes: str) -> float:
    """``--max-minutes`` as a number of minutes >= 0 (records and scan), in the API's words."""
    try:
        limit = float(max_minutes)
    except ValueError:
        raise BadInput(f"--max-minutes must be a number, got {max_minutes!r}") from None
    if limit == float("inf"):
        raise BadInput(f"--max-minutes must be a finite number of minutes, got {max_minutes!r}")
    return check_minutes(limit, "--max-minutes")  # the API's check and words


def print_plan(plan, limit: float, as_json: bool) -> None:
    """``--plan``: the estimate and whether the run would be refused (records and scan)."""
    try:
        check_plan(plan, limit)
        refused = ""
    except InputError as exc:
        refused = str(exc)
    if as_json:
        emit_json({**plan.to_dict(), "max_minutes": limit, "refused": bool(refused)})
        return
    con = stdout_console()
    for line in plan.lines():
        con.print(line, highlight=False)
    if refused:
        con.print(
            f"beyond --max-minutes {limit:g}: the run would be refused here; raise --max-minutes, "
            "use more --workers, or --executor dask --scheduler ADDRESS",
            highlight=False,
        )


def show_plan(plan) -> None:
    """The estimate on stderr before a run of a second or more (a short run starts at once)."""
    if plan.seconds >= 1.0:
        for line in plan.lines():
            stderr_console().print(f"plan: {line}", highlight=False, soft_wrap=True)


def _plan(m, to, start, side, max_steps, workers, executor, limit, as_json) -> None:
    """``--plan``: the estimate and whether the run would be refused; nothing runs."""
    if start < 1 or to < start:
        raise BadInput(f"empty range: {start}..{to}")
    # the API's refusals name the options (cli/app.py)
    plan = plan_records(
        m, to, start=start, side=side, max_steps=max_steps, workers=workers, executor=executor
    )
    print_plan(plan, limit, as_json)


def csv_rows(r):
    """Long-format rows: side, table, kind, key, value, label."""
    cols = ["side", "table", "kind", "key", "value", "label"]
    rows = []
    for sd in r.sides.values():
        for k in r.kinds:
            for rec in sd.records.get(k, ()):
                rows.append([sd.side, "record", k, rec.start, rec.value, "exact"])
        for name, dist in (
            ("delay", sd.delays),
            ("full_delay", sd.full_delays),
            ("glide", sd.glides),
            ("full_glide", sd.full_glides),
        ):
            if name.startswith("full") and not r.undivided:
                continue
            for x, n in sorted(dist.items()):
                rows.append([sd.side, "distribution", name, x, n, "exact"])
        rows.append([sd.side, "distribution", "glide", "none", sd.no_glide, "exact"])
        for cmin, n in sd.basins.items():
            rows.append([sd.side, "basin", "cycle_minimum", cmin, n, "exact"])
        rows.append([sd.side, "unresolved", "count", "", sd.unresolved, "exact"])
        for s in sd.unresolved_first:
            rows.append([sd.side, "unresolved", "start", s, "", "exact"])
        for key in ("delay_mean", "delay_sd", "full_delay_mean", "glide_mean", "full_glide_mean"):
            if key in sd.heuristic:
                rows.append([sd.side, "model", key, "", sd.heuristic[key], "heuristic"])
    return cols, rows


def latex_text(r, show_n: int) -> str:
    """The result's own overview tables (:meth:`RangeRecords.overview`) as LaTeX."""
    with latex_output(True):
        parts = [show_table(t).text for t in r.overview(show_n, one_row_per_holder=True)]
    return "\n\n".join(parts + [f"% caution: {r.caution}"])


def _print(r, show_n: int) -> None:
    con = stdout_console()
    m = r.map
    con.print(
        f"[bold]{m.label}[/bold] ({m.formula()}), starts {r.start}..{r.to} "
        f"({' and '.join(r.sides)}), step cap {r.max_steps}: exact"
        + ("" if not r.unresolved else f" ({r.unresolved:,} unresolved, see below)")
    )
    tables = r.overview(show_n)
    con.print(show_table(tables[0]))
    for sd, (holders, basins) in zip(
        r.sides.values(), zip(tables[1::2], tables[2::2], strict=True), strict=True
    ):
        con.print(show_table(holders))
        con.print(show_table(basins))
        if sd.unresolved:
            first = ", ".join(str(x) for x in sd.unresolved_first[:20])
            con.print(
                f"{sd.side}: {sd.unresolved:,} starts unresolved within {r.max_steps} steps "
                f"(left out of the records above); first: {first}"
            )
    con.print(f"caution: {r.caution}")
    con.print(f"{store_line(r)}; {r.seconds:.2f} s (wall-clock measurement)")


def store_line(r) -> str:
    """Where the chunks are kept and how many were reused (or recomputed as damaged)."""
    if r.store is None:
        return "store: not stored"
    text = f"store: {r.store}; chunks {r.chunks_total} ({r.chunks_reused} reused from the store"
    if r.chunks_damaged:
        text += f", {r.chunks_damaged} damaged and recomputed"
    return text + ")"


COMMANDS = [records_cmd]
