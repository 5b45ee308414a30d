"""``cyclewright floor MAP --verified-to N``: the least length a further cycle could have."""

from __future__ import annotations

import re
from fractions import Fraction

import click

from cycles.errors import InputError
from cycles.floors import floor

from ..errors import BadInput
from ..options import json_option, maps_option, resolve_map
from ..render import emit_json, make_table, short, stdout_console

# Results above this many decimal digits are refused (1e100000 and the like).
_MAX_DIGITS = 100_000
# The floor's work grows with the digits of N (continued fraction terms, precision).
_MAX_FLOOR_DIGITS = 1000

_POWER = re.compile(r"^(\d+)\s*(?:\^|\*\*)\s*(\d+)$")
_TIMES_POWER = re.compile(r"^(\d+)\s*\*\s*(\d+)\s*(?:\^|\*\*)\s*(\d+)$")


def parse_big_int(text: str, what: str, *, minimum: int | None = None) -> int:
    """An integer written as ``1099511627776``, ``1_000``, ``2^68``, ``2**68``, ``3*2^40``,
    ``1e20`` or ``1.5e9`` (exact: no float is involved).

    >>> parse_big_int("2^68", "N")
    295147905179352825856
    >>> parse_big_int("1.5e9", "N"), parse_big_int("3*2^4", "N")
    (1500000000, 48)
    """
    t = str(text).strip().replace("_", "")
    neg = t.startswith("-")
    body = t[1:].strip() if neg else t
    value: int | None = None
    if re.fullmatch(r"\d+", body):
        value = int(body)
    else:
        mt = _TIMES_POWER.match(body)
        mp = _POWER.match(body)
        if mt or mp:
            c, b, e = mt.groups() if mt else ("1",) + mp.groups()
            base, exp = int(b), int(e)
            if base > 1 and exp * len(str(base)) > _MAX_DIGITS:
                raise BadInput(f"{what} {text!r} is too large")
            value = int(c) * base**exp
        elif re.fullmatch(r"\d+(\.\d+)?[eE]\+?\d+", body):
            mant, exp = re.split(r"[eE]\+?", body)
            if int(exp) > _MAX_DIGITS:
                raise BadInput(f"{what} {text!r} is too large")
            q = Fraction(mant) * 10 ** int(exp)
            if q.denominator != 1:
                raise BadInput(f"{what} must be an integer, got {text!r}")
            value = int(q)
    if value is None:
        raise BadInput(
            f"{what} must be an integer (like 1000000, 2^40, 3*2^40 or 1e20), got {text!r}"
        )
    if neg:
        value = -value
    if minimum is not None and value < minimum:
        raise BadInput(f"{what} must be at least {minimum}, got {text!r}")
    return value


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
@click.argument("map_spec", metavar="MAP")
@click.option(
    "--verified-to",
    "verified_to",
    required=True,
    metavar="N",
    help="Verified range: no unknown cycle has |minimum| <= N (2^68, 1e20 and 3*2^40 forms work).",
)
@click.option(
    "--side",
    type=click.Choice(["positive", "negative", "both"]),
    default="positive",
    show_default=True,
)
@click.option(
    "--next",
    "next_types",
    default=5,
    show_default=True,
    type=int,
    metavar="J",
    help="How many further possible (length, odd steps) types to list.",
)
@maps_option
@json_option
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
    n = parse_big_int(verified_to, "--verified-to", minimum=0)
    if len(str(n)) > _MAX_FLOOR_DIGITS:
        raise BadInput(
            f"--verified-to has {len(str(n))} digits; the floor accepts at most "
            f"{_MAX_FLOOR_DIGITS} (verified ranges in practice are below 10^30)"
        )
    if not 0 <= next_types <= 1000:
        raise BadInput(f"--next must be between 0 and 1000, got {next_types}")
    sides = ["positive", "negative"] if side == "both" else [side]
    results = []
    problems = []
    for s in sides:
        try:
            results.append(floor(m, n, s, next_types=next_types))
        except InputError as exc:
            if len(sides) == 1:
                raise
            problems.append({"side": s, "applicable": False, "reason": str(exc)})
    if not results:
        raise BadInput(problems[0]["reason"])
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
    con.print(f"[bold]{r.map.label}, {r.side} side[/bold], verified to N = {r.verified_to}")
    con.print(f"condition: {r.condition}")
    if not r.possible:
        con.print(f"result (proved): {r.statement}")
        return
    a = r.multiplier
    rows = [
        ["least length k", short(r.least_length), "proved"],
        ["odd steps x", short(r.odd_steps), "proved"],
        [f"k / {'x' if r.multiplying_branch == 1 else 'multiplying steps'}", str(r.ratio), "exact"],
        [
            f"from log2({a}) = [{_cf_text(r.continued_fraction)}]",
            r.approximant.describe() if r.approximant else "-",
            "exact",
        ],
        [
            "interval for k/x",
            f"{'[' if r.interval['lower_closed'] else '('}{r.interval['lower']}, "
            f"{r.interval['upper']}{']' if r.interval['upper_closed'] else ')'}",
            "exact",
        ],
        ["max precision", f"{r.precision_bits} bits", "-"],
    ]
    con.print(make_table(None, ["quantity", "value", "label"], rows))
    if r.next_possible:
        con.print("next possible types (proved; no other type has a length in between):")
        con.print(
            make_table(None, ["length k", "odd steps x"], [[k, x] for k, x in r.next_possible])
        )
    con.print(f"result (proved, given the condition): {r.statement}")


def _cf_text(terms) -> str:
    if not terms:
        return ""
    head, rest = terms[0], terms[1:]
    shown = ", ".join(str(t) for t in rest[:24]) + (", ..." if len(rest) > 24 else "")
    return f"{head}; {shown}" if rest else str(head)


COMMANDS = [floor_cmd]
