"""``cyclewright maps`` and ``cyclewright maps show MAP``."""

from __future__ import annotations

import click

from ..options import (
    catalog_for,
    json_option,
    latex_tables,
    map_argument,
    maps_option,
    resolve_map,
)
from ..render import (
    emit_json,
    latex_mode,
    latex_output,
    make_table,
    stderr_console,
    stdout_console,
)


@click.group(
    "maps",
    invoke_without_command=True,
    epilog="\b\nExamples:\n  cyclewright maps\n  cyclewright maps --maps mine.toml --json\n  cyclewright maps --latex\n  cyclewright maps show mod3-4x",
)
@maps_option
@json_option
@click.pass_context
@latex_tables
def maps_group(ctx: click.Context, map_files, as_json: bool) -> None:
    """The catalog: one row a map (name, definition, divisor, drift, source)."""
    ctx.ensure_object(dict)
    ctx.obj["map_files"] = map_files
    ctx.obj["latex"] = latex_mode()  # `maps --latex show MAP` prints LaTeX too
    if ctx.invoked_subcommand is not None:
        return
    cat = catalog_for(map_files)
    rows = []
    for m in cat:
        rows.append(
            {
                "name": m.name,
                "formula": m.formula(),
                "divisor": m.divisor,
                "drift": m.drift(),
                "drift_exact": m.drift_formula(),
                "source": m.source,
                "aliases": list(m.aliases),
                "key": m.key,
                "labels": {"drift": "rounded", "drift_exact": "exact"},
            }
        )
    if as_json:
        emit_json({"maps": rows, "problems": cat.problems})
        return
    table = make_table(
        "Maps in the catalog",
        ["name", "definition", "d", "drift per step [exact]", "drift, rounded [rounded]", "source"],
        [
            [
                r["name"],
                r["formula"],
                r["divisor"],
                r["drift_exact"],
                f"{r['drift']:+.4f}",
                r["source"],
            ]
            for r in rows
        ],
        caption="drift = mean change of ln|n| per step: (1/d) sum ln(|a_r|/d) when every multiplier "
        "is prime to d, else weighted by the residue frequencies of the Markov chain "
        "(Matthews and Watts). Any ax+b shorthand works as a name too.",
    )
    stdout_console().print(table)
    for p in cat.problems:
        stderr_console().print(f"warning: {p}")


@maps_group.command(
    "show",
    epilog="\b\nExamples:\n  cyclewright maps show 3x+1\n  cyclewright maps show 7x+3 --json\n  cyclewright maps show 3x+1 --latex",
)
@map_argument
@maps_option
@json_option
@click.pass_context
@latex_tables
def show(ctx: click.Context, map_spec: str, map_files, as_json: bool) -> None:
    """One map in full: branches, canonical hash, drift, source."""
    files = tuple(map_files) + tuple((ctx.obj or {}).get("map_files", ()))
    m = resolve_map(map_spec, files)
    info = m.describe()
    if as_json:
        emit_json(info)
        return
    with latex_output(latex_mode() or bool((ctx.obj or {}).get("latex"))):
        _show(m)


def _show(m) -> None:
    con = stdout_console()
    con.print(f"[bold]{m.label}[/bold]  {m.formula()}")
    if m.description:
        con.print(m.description)
    con.print(
        make_table(
            None,
            ["residue r", "multiplier a_r", "offset b_r", "T(n) for n = r mod d"],
            [
                [r, a, b, f"({a}n{'+' if b >= 0 else '-'}{abs(b)})/{m.divisor}"]
                for r, (a, b) in enumerate(m.branches)
            ],
        )
    )
    con.print(
        f"divisor: {m.divisor}    multipliers prime to d: {'yes' if m.multipliers_prime_to_divisor() else 'no'}"
    )
    con.print(f"drift per step: {m.drift_formula()} = {m.drift():+.6f}")
    if m.aliases:
        con.print(f"aliases: {', '.join(m.aliases)}")
    con.print(f"source: {m.source}" + (f"    reference: {m.reference}" if m.reference else ""))
    con.print(f"canonical key: {m.key}")


COMMANDS = [maps_group]
