"""``cyclewright demo``: a short built-in tour of what the workbench computes."""

from __future__ import annotations

import click

from cycles.orbit import orbit
from cycles.solver import solve

from ..options import catalog_for
from ..render import make_table, short, stdout_console


@click.command("demo", epilog="\b\nExample:\n  cyclewright demo")
def demo_cmd() -> None:
    """A short demonstration on built-in defaults: maps, an orbit, solved cycles."""
    con = stdout_console()
    cat = catalog_for(())
    con.print(
        make_table(
            "Catalogue",
            ["name", "definition", "drift/step"],
            [[m.name, m.formula(), f"{m.drift():+.4f}"] for m in cat],
        )
    )
    m = cat.get("3x+1")
    o = orbit(m, 27)
    con.print(
        f"orbit of 27 under 3x+1 (exact): {o.steps} divided steps, "
        f"{o.undivided_total_steps} undivided, peak {o.undivided_peak}, stopping time {o.stopping_time}"
    )
    rows = []
    for name, word in [
        ("3x+1", "10"),
        ("3x+1", "1^3 0^2"),
        ("3x+5", "11100"),
        ("3x+7", "1100"),
        ("mod3-4x", "12"),
    ]:
        c = solve(cat.get(name), word)
        rows.append(
            [
                name,
                word,
                c.denominator,
                "{" + ", ".join(short(e) for e in c.elements) + "}",
                c.integral,
            ]
        )
    con.print(
        make_table(
            "Rational cycles of itineraries (exact)",
            ["map", "itinerary", "D", "cycle", "integral"],
            rows,
        )
    )


COMMANDS = [demo_cmd]
