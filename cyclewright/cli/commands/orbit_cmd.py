"""``cyclewright orbit MAP N``: one integer's orbit."""

from __future__ import annotations

import click

from cyclewright.cycles.limits import check_start
from cyclewright.cycles.orbit import DEFAULT_GROWTH_DIGITS, check_orbit, orbit

from ..files import check_figure_path
from ..options import (
    ceiling_option,
    force_option,
    json_option,
    latex_tables,
    map_argument,
    maps_option,
    max_steps_option,
    parse_int,
    plot_options,
    resolve_map,
    show_option,
)
from ..render import emit_json, latex_mode, short, show_table, stdout_console


@click.command(
    "orbit",
    epilog="\b\nExamples:\n  cyclewright orbit 3x+1 27\n  cyclewright orbit 3x+1 -17\n  cyclewright orbit 5x+1 7 --max-steps 500 --ceiling 10^30\n  cyclewright orbit 3x+1 27 --plot orbit27.pdf\n  cyclewright orbit 3x+1 27 --latex",
)
@map_argument
@click.argument("start", metavar="N")
@max_steps_option
@ceiling_option
@show_option
@plot_options
@force_option
@maps_option
@json_option
@latex_tables
def orbit_cmd(
    map_spec, start, max_steps, ceiling, show, plot_path, width, force, map_files, as_json
) -> None:
    """Follow N under MAP: stopping time, the cycle entered, peak (exact); --plot draws it.

    For ax+b maps the classic undivided step count and peak are shown too.
    Negative N is allowed (its stopping time compares absolute values).
    With --ceiling none the orbit still stops as "escaped" once it has grown
    by 1000 digits over N (a value cap, like the step cap; not a proof of
    divergence). Limits: |N| <= 10^1000; --max-steps times the size of the
    values within the memory budget (2 GiB).
    """
    m = resolve_map(map_spec, map_files)
    n = parse_int(start, "N", check=check_start)
    ceil = ceiling
    check_orbit(n, max_steps, ceil)  # the API's limits, refused before any file is touched
    check_figure_path(plot_path, "--plot", force)
    o = orbit(m, n, max_steps=max_steps, ceiling=ceil)
    if plot_path:
        from ..plots import plot_orbit

        plot_orbit(o, plot_path, width=width)
    if as_json:
        emit_json(o.to_dict(max_values=None))
        return
    con = stdout_console()
    if latex_mode():  # the figures and the first values as tables, the rest as comments
        con.print(show_table(o.figures_table()))
        con.print(show_table(o.table(), show=show))
        return
    why = ""
    if o.status == "escaped":
        cap = (
            f"the value cap |N| * 10^{DEFAULT_GROWTH_DIGITS}"
            if ceil is None
            else f"the ceiling {short(ceil, 20)}"
        )
        why = f" (passed {cap}; not a proof of divergence)"
    elif o.status == "capped":
        why = " (the step cap; raise --max-steps to go on)"
    con.print(
        f"[bold]{m.label}[/bold], start {short(n)}: {o.status} after {o.steps} steps (exact){why}"
    )
    con.print(f"stopping time: {short(o.stopping_time)}")
    if o.cycle:
        cyc = ", ".join(short(v) for v in o.cycle[:12]) + (", ..." if len(o.cycle) > 12 else "")
        con.print(
            f"enters the cycle {{{cyc}}} (length {len(o.cycle)}, minimum {short(o.cycle[0])}) after {o.tail} steps"
        )
        con.print(f"total steps to the cycle minimum: {o.total_steps}")
    con.print(f"peak: {short(o.peak)}")
    if m.ax_b is not None:
        con.print(
            f"undivided form: total steps {short(o.undivided_total_steps)}, peak {short(o.undivided_peak)}"
        )
    vals = o.values[:show]
    con.print(
        "values: "
        + " ".join(short(v) for v in vals)
        + (" ..." if len(o.values) > len(vals) else "")
    )


COMMANDS = [orbit_cmd]
