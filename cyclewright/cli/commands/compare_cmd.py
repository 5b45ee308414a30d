"""``cyclewright compare MAP MAP ...``: maps side by side, and predictions against findings."""

from __future__ import annotations

import sys

import click

from cyclewright.cycles.census import default_family_members, parse_family
from cyclewright.cycles.compare import COMPARE_DEFAULTS, check_compare, compare
from cyclewright.cycles.errors import InputError
from cyclewright.cycles.labels import HEURISTIC_CAUTION
from cyclewright.cycles.records import RECORDS_STORE_ABOVE
from cyclewright.maps import MapError, parse_shorthand

from ..errors import BadInput
from ..files import check_distinct, check_figure_path, check_output
from ..options import (
    all_offsets_option,
    csv_option,
    executor_options,
    json_option,
    latex_tables,
    maps_option,
    max_length_option,
    max_minutes_option,
    max_steps_option,
    odd_option,
    offsets_option,
    plot_options,
    power_text,
    resolve_map,
    resolve_store,
    store_options,
    to_option,
    workers_option,
)
from ..progress import with_progress
from ..render import emit_json, show_table, stdout_console, write_csv
from .records_cmd import parse_minutes

__all__ = ["COMMANDS", "resolve_maps"]


def resolve_maps(specs, offsets, map_files, all_k=False):
    """Map names, shorthands and family templates (``3x+k`` with ``--offsets``) to maps."""
    out = []
    for spec in specs:
        if spec.replace(" ", "").lower().endswith(("+k", "-k")):
            if offsets is None:
                raise BadInput(f"the family {spec} needs --offsets, e.g. --offsets 1..50")
            try:
                a, sign = parse_family(spec)
                ks = list(offsets)
            except (InputError, MapError) as exc:
                raise BadInput(str(exc)) from None
            members = (
                [k for k in ks if k > 0 and (a + k) % 2 == 0]
                if all_k
                else default_family_members(a, ks)
            )
            if not members:
                raise BadInput(
                    f"{spec}: no member in --offsets {ks[0]}..{ks[-1]} gives a valid map"
                )
            out += [parse_shorthand(f"{a}x{'+' if sign > 0 else '-'}{k}") for k in members]
        else:
            out.append(resolve_map(spec, map_files))
    if not out:
        raise BadInput("compare needs at least one map")
    seen: dict = {}
    for m in out:
        if m in seen:
            raise BadInput(
                f"{m.label} is given twice (the same map as {seen[m].label}); name each map once"
            )
        seen[m] = m
    return out


_HELP = (
    "Maps side by side: drift, critical ratio, census, scan, floor, counting; predictions vs "
    "findings.\n\nWithout --max-length, --to and --odd: census length "
    f"{COMPARE_DEFAULTS['max_length']}, scan 1..{power_text(COMPARE_DEFAULTS['to'])} on both sides, "
    f"counting figures at x = {COMPARE_DEFAULTS['odd']}."
)


@click.command(
    "compare",
    help=_HELP,
    epilog=(
        "\b\nExamples:\n"
        "  cyclewright compare 3x+1 5x+1 7x+1 --max-length 20 --to 10^5\n"
        "  cyclewright compare 3x+1 mod3-4x --json\n"
        '  cyclewright compare "3x+k" --offsets 1..50 --max-length 16 --csv fam.csv\n'
        "  cyclewright compare 3x+1 3x+5 181x+1 --plot cmp.png\n"
        "  cyclewright compare 3x+1 5x+1 --to 10^5 --store cmp-stores\n"
        "\b\nStores: the census and the scans keep their results in the user data directory\n"
        "(--store DIR instead, --no-store for none). The records over 1..N keep a store only\n"
        "when asked (--store) or when N is at least "
        f"{power_text(RECORDS_STORE_ABOVE)}: a small comparison leaves no\n"
        "records store behind. A repeated run with the same --store reuses it (the last line\n"
        "says how many chunks came from the stores)."
    ),
)
@click.argument("map_specs", nargs=-1, required=True, metavar="MAP...")
@max_length_option
@to_option
@odd_option
@max_steps_option
@offsets_option
@all_offsets_option
@csv_option
@plot_options
@store_options
@workers_option
@executor_options
@max_minutes_option
@maps_option
@json_option
@latex_tables
def compare_cmd(
    map_specs,
    max_length,
    to,
    odd,
    max_steps,
    offsets,
    all_offsets,
    csv_path,
    plot_path,
    width,
    store,
    no_store,
    workers,
    executor,
    scheduler,
    max_minutes,
    map_files,
    as_json,
):
    limit = parse_minutes(max_minutes)
    given = {"max_length": max_length, "to": to, "odd": odd}
    # the API's limits, refused before any output is checked or map resolved
    check_compare(
        **{k: v for k, v in given.items() if v is not None}, max_steps=max_steps, workers=workers
    )
    check_distinct(csv_path, plot_path)
    check_output(csv_path, "--csv")
    check_figure_path(plot_path, "--plot")
    ms = resolve_maps(map_specs, offsets, map_files, all_offsets)
    cmp = with_progress(
        compare,
        ms,
        **{k: v for k, v in given.items() if v is not None},
        max_steps=max_steps,
        store=resolve_store(store, no_store),
        workers=workers,
        executor=executor,
        scheduler=scheduler,
        max_minutes=limit,
    )
    if csv_path:
        target = sys.stdout if csv_path == "-" else csv_path
        t = cmp.table()
        write_csv(target, list(t.columns), t.rows)
    if plot_path:
        from ..plots import plot_comparison

        plot_comparison(cmp, cmp.sweeps(), plot_path, width=width)
    if as_json:
        emit_json(cmp.to_dict())
        return
    if csv_path == "-":
        return
    con = stdout_console()
    con.print(show_table(cmp.overview()))
    for p in cmp.profiles:
        if p.census is None and p.census_note:
            con.print(f"{p.map.label}: no census: {p.census_note}", highlight=False)
        if p.predictions is not None:
            con.print(show_table(p.predictions.table()))
    con.print(cmp.store_use.line(), highlight=False)
    con.print(HEURISTIC_CAUTION)


COMMANDS = [compare_cmd]
