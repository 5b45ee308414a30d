"""``cyclewright solve MAP ITINERARY``: the exact rational cycle of an itinerary."""

from __future__ import annotations

import click

from cyclewright.cycles.solver import solve

from ..options import json_option, latex_tables, map_argument, maps_option, resolve_map
from ..render import elide_digits, emit_json, short, stdout_console


@click.command(
    "solve",
    epilog=(
        "\b\nExamples:\n  cyclewright solve 3x+5 11100\n  cyclewright solve 3x+1 1^3 0^2\n"
        "  cyclewright solve mod3-4x 0121 --json\n"
        "\b\nItinerary forms: digits (11100); words with a repeat count, separated by\n"
        "spaces (1^3 0^2, 10^4 0); for divisors above 10, residues separated by commas."
    ),
)
@map_argument
@click.argument("itinerary", nargs=-1, required=True, metavar="ITINERARY...")
@maps_option
@json_option
@latex_tables
def solve_cmd(map_spec, itinerary, map_files, as_json) -> None:
    """The rational cycle whose itinerary (parity vector) is ITINERARY, exactly."""
    m = resolve_map(map_spec, map_files)
    c = solve(m, " ".join(itinerary))
    if as_json:
        emit_json(c.to_dict())
        return
    con = stdout_console()
    info = c.to_dict()
    con.print(
        f"[bold]{m.label}[/bold], itinerary {_word(info['itinerary'])} (length {c.length}, content {list(c.content)})"
    )
    sign = "-" if c.B < 0 else "+"
    con.print(
        f"composite: T_w(n) = ({short(c.A)} n {sign} {short(abs(c.B))}) / {m.divisor}^{c.length}"
    )
    con.print(f"denominator D = d^k - A = {short(c.denominator)}")
    if not c.has_fixed_point:
        con.print(elide_digits(c.note))
        return
    con.print(f"fixed point: {short(c.fixed_point)}")
    kind = "integral" if c.integral else "rational (not integral)"
    con.print(
        f"cycle ({kind}, exact): {{"
        + ", ".join(short(e) for e in c.elements[:40])
        + (", ..." if len(c.elements) > 40 else "")
        + "}"
    )
    con.print(f"minimum: {short(c.minimum)}")
    if not c.primitive_itinerary:
        con.print(f"the itinerary is the power {c.repetitions} of {_word(info['primitive_root'])}")
    if not c.realized:
        con.print(f"not realized: {elide_digits(c.note)}")
    if c.integral:
        con.print(
            f"primitive (Lagarias): {'yes' if c.lagarias_primitive else 'no (a multiple of a cycle of a map with smaller offsets)'}"
        )


def _word(text: str, width: int = 80) -> str:
    """An itinerary for a sentence: whole up to ``width`` letters, else its ends."""
    if len(text) <= width:
        return text
    keep = width // 2 - 4
    return f"{text[:keep]}…{text[-keep:]}"


COMMANDS = [solve_cmd]
