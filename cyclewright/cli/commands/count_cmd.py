"""``cyclewright count MAP --length K --odd X``: counting figures for one type."""

from __future__ import annotations

import re

import click

from cyclewright.cycles.counting import DEFAULT_LIMIT, count
from cyclewright.cycles.integer_cycle import cycles_table
from cyclewright.cycles.labels import HEURISTIC_CAUTION

from ..errors import BadInput
from ..numbers import int_expression
from ..options import (
    json_option,
    latex_tables,
    length_option,
    limit_option,
    map_argument,
    maps_option,
    odd_option,
    resolve_map,
    show_option,
)
from ..progress import with_progress
from ..render import emit_json, short, show_table, stdout_console

__all__ = ["COMMANDS", "parse_content"]


def parse_content(text: str) -> dict[int, int]:
    """``"0:5,1:8"`` -> ``{0: 5, 1: 8}``; counts are integer expressions (``0:2^10``).

    >>> parse_content("0:5, 1:2^3")
    {0: 5, 1: 8}
    """
    out: dict[int, int] = {}
    for part in [p for p in re.split(r"[\s,]+", text.strip()) if p]:
        m = re.fullmatch(r"(\d+):(\S+)", part)
        try:
            if not m:
                raise ValueError(part)
            r, c = int(m.group(1)), int_expression(m.group(2))
        except ValueError:
            raise BadInput(
                f"cannot read {part!r} in --content: use residue:count pairs, e.g. 0:5,1:8"
            ) from None
        if r in out:
            raise BadInput(f"residue {r} appears twice in --content")
        out[r] = c
    if not out:
        raise BadInput("--content is empty: use residue:count pairs, e.g. 0:5,1:8")
    return out


@click.command(
    "count",
    epilog=(
        "\b\nExamples:\n"
        "  cyclewright count 3x+1 --length 13 --odd 8\n"
        "  cyclewright count 3x+5 --length 5 --odd 3 --json\n"
        "  cyclewright count 3x+1 --length 40 --odd 25 --limit 0\n"
        "  cyclewright count mod3-mixed --content 0:2,1:3,2:1\n"
        "\b\nLabels: exact (closed formulas, enumeration), proved (a theorem's bound),\n"
        "certified (interval arithmetic), heuristic (necklaces/|D|, never a proof)."
    ),
)
@map_argument
@length_option
@odd_option
@click.option(
    "--content",
    "content_text",
    default=None,
    help="Counts per residue, r:c,... (any divisor), e.g. 0:5,1:8.",
)
@limit_option
@show_option
@maps_option
@json_option
@latex_tables
def count_cmd(map_spec, length, odd, content_text, limit, show, map_files, as_json) -> None:
    """Words, necklaces, denominator, proved bound, candidates and integer cycles of one type.

    The type is (length k, odd steps x) for two-branch maps and a content
    (how often each residue occurs) in general.
    """
    m = resolve_map(map_spec, map_files)
    if limit is None:
        limit = DEFAULT_LIMIT
    content = parse_content(content_text) if content_text else None
    if content is None and m.divisor == 2 and (length is None or odd is None):
        raise BadInput("give --length K and --odd X (or --content r:c,...)")
    if content is None and m.divisor != 2:
        raise BadInput(
            f"{m.label} has divisor {m.divisor}: give the type as --content r:c,... "
            "(how often each residue occurs)"
        )
    tc = with_progress(
        count,
        m,
        length,
        odd,
        content=content,
        limit=limit,
    )
    if as_json:
        emit_json(tc.to_dict())
        return
    _print_human(tc, show)


def _print_human(tc, show: int) -> None:
    con = stdout_console()
    m = tc.map
    con.print(
        f"[bold]{m.label}[/bold], type {tc.type_text()}"
        + (f" (content {list(tc.content)})" if m.divisor == 2 else "")
        + ": "
        f"D = {m.divisor}^{tc.length} - {'(' + short(tc.A, 30) + ')' if tc.A < 0 else short(tc.A, 30)} = {short(tc.denominator, 30)}, "
        f"serves the {tc.side} side"
    )
    con.print(show_table(tc.figures_table()))
    if tc.integer_cycles:
        con.print(show_table(cycles_table(tc.integer_cycles, m.divisor), show))
    lf = tc.linear_form
    if lf.applies:
        con.print(f"linear form: {lf.form}; {lf.constants}")
    con.print(HEURISTIC_CAUTION)


COMMANDS = [count_cmd]
