"""``cyclewright orbit MAP N``: one integer's orbit."""

from __future__ import annotations

import click

from cyclewright.cycles.orbit import orbit

from ..errors import BadInput
from ..files import check_figure_path
from ..options import (
    ceiling_option,
    force_option,
    json_option,
    map_argument,
    maps_option,
    max_steps_option,
    parse_int,
    plot_option,
    resolve_map,
    show_option,
)
from ..render import emit_json, short, stdout_console


@click.command(
    "orbit",
    epilog="\b\nExamples:\n  cyclewright orbit 3x+1 27\n  cyclewright orbit 3x+1 -17\n  cyclewright orbit 5x+1 7 --max-steps 500 --ceiling 10^30\n  cyclewright orbit 3x+1 27 --plot orbit27.pdf",
)
@map_argument
@click.argument("start", metavar="N")
@max_steps_option
@ceiling_option
@show_option
@plot_option
@force_option
@maps_option
@json_option
def orbit_cmd(
    map_spec, start, max_steps, ceiling, show, plot_path, force, map_files, as_json
) -> None:
    """Follow N under MAP: stopping time, the cycle entered, peak (exact); --plot draws it.

    For ax+b maps the classic undivided step count and peak are shown too.
    Negative N is allowed (its stopping time compares absolute values).
    """
    m = resolve_map(map_spec, map_files)
    n = parse_int(start, "N")
    ceil = ceiling
    if ceil is not None and ceil < abs(n):
        raise BadInput(
            f"--ceiling {ceil} is below |N| = {abs(n)}: give a larger --ceiling, or 'none'"
        )
    check_figure_path(plot_path, "--plot", force)
    o = orbit(m, n, max_steps=max_steps, ceiling=ceil)
    if plot_path:
        from ..plots import plot_orbit

        plot_orbit(o, plot_path)
    if as_json:
        emit_json(o.to_dict(max_values=None))
        return
    con = stdout_console()
    con.print(f"[bold]{m.label}[/bold], start {n}: {o.status} after {o.steps} steps (exact)")
    con.print(f"stopping time: {short(o.stopping_time)}")
    if o.cycle:
        cyc = ", ".join(short(v) for v in o.cycle[:12]) + (", ..." if len(o.cycle) > 12 else "")
        con.print(
            f"enters the cycle {{{cyc}}} (length {len(o.cycle)}, minimum {o.cycle[0]}) after {o.tail} steps"
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
