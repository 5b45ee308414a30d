"""``cyclewright floor MAP --verified-to N``: the least length a further cycle could have."""

from __future__ import annotations

import click

from cyclewright.cycles.floors import DEFAULT_NEXT_TYPES, floor
from cyclewright.cycles.sides import PerSide

from ..options import (
    IntExpr,
    json_option,
    latex_tables,
    map_argument,
    maps_option,
    resolve_map,
    side_option,
)
from ..render import emit_json, show_table, stdout_console


@click.command(
    "floor",
    epilog=(
        "\b\nExamples:\n  cyclewright floor 3x+1 --verified-to 2^40\n"
        "  cyclewright floor 3x+1 --verified-to 2^68 --side both --json\n"
        "  cyclewright floor 5x+1 --verified-to 1e9 --next 10\n"
        "\b\nMeaning: if no cycle on that side has its minimum (least |element|) at or\n"
        "below N apart from the known ones, every further cycle has at least the\n"
        "length shown (a proved bound, conditional on that verification)."
    ),
)
@map_argument
@click.option(
    "--verified-to",
    "verified_to",
    required=True,
    type=IntExpr(minimum=1),
    metavar="N",
    help="Verified range: no unknown cycle has |minimum| <= N (2^68, 1e20 and 3*2^40 forms work).",
)
@side_option
@click.option(
    "--next",
    "next_types",
    default=DEFAULT_NEXT_TYPES,
    show_default=True,
    type=IntExpr(minimum=0),
    metavar="J",
    help="How many further possible (length, odd steps) types to list.",
)
@maps_option
@json_option
@latex_tables
def floor_cmd(map_spec, verified_to, side, next_types, map_files, as_json) -> None:
    """The least length (and odd steps) any further cycle of MAP could have.

    From the proved bound on a cycle's minimum: the type (k, x) of a cycle
    whose elements all exceed N satisfies a^x < 2^k <= (a + b/(N+1))^x (for
    ax+b, b > 0; similar forms otherwise), so k/x lies in a thin interval
    beside log2 a; the simplest fraction there, a convergent or
    semiconvergent of log2 a, gives the least k and x (Eliahou 1993).
    All decisions are exact (integers, or interval arithmetic with precision
    raised until certain).
    """
    m = resolve_map(map_spec, map_files)
    n = verified_to
    got = floor(m, n, side, next_types=next_types)
    if isinstance(got, PerSide):
        results = list(got)
        problems = [
            {"side": s, "applicable": False, "reason": why} for s, why in got.problems.items()
        ]
    else:
        results, problems = [got], []
    if as_json:
        emit_json(
            {
                "map": m.label,
                "map_key": m.key,
                "verified_to": n,
                "floors": [r.to_dict() for r in results] + problems,
            }
        )
        return
    con = stdout_console()
    for r in results:
        _print_floor(con, r)
    for p in problems:
        con.print(f"[bold]{p['side']} side[/bold]: the bound does not apply: {p['reason']}")


def _print_floor(con, r) -> None:
    con.print(f"condition: {r.condition}")
    if not r.possible:
        con.print(f"[bold]{r.map.label}, {r.side} side[/bold], verified to N = {r.verified_to}")
        con.print(f"result (proved): {r.statement}")
        return
    con.print(show_table(r.figures_table()))


COMMANDS = [floor_cmd]
