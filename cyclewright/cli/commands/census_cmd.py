"""``cyclewright census MAP --max-length K``: every integer cycle up to a length, certified."""

from __future__ import annotations

import sys

import click

from cyclewright.cycles.census import MAX_SCAN, census, census_family, parse_family
from cyclewright.cycles.certificate import write_certificate
from cyclewright.maps import MapError, parse_int_range

from ..errors import BadInput
from ..options import json_option, maps_option, resolve_map
from ..render import emit_json, make_table, short, stderr_console, stdout_console
from .count_cmd import parse_count

__all__ = ["COMMANDS"]


def _progress():
    if not sys.stderr.isatty():
        return None
    con = stderr_console()

    def cb(p) -> None:
        done = getattr(p, "done", None)
        total = getattr(p, "total", None)
        if done is not None and total:
            con.print(f"scan: {done:,} / {total:,} starts", end="\r")

    return cb


@click.command(
    "census",
    epilog=(
        "\b\nExamples:\n"
        "  cyclewright census 3x+1 --max-length 10000\n"
        "  cyclewright census 3x+5 --max-length 30 --side positive --certificate c.json\n"
        "  cyclewright census mod3-4x --max-length 16 --method itineraries\n"
        '  cyclewright census "3x+k" --k 1..200 --max-length 30\n'
        "\b\nMethods: bound-scan (proved bound on cycle minima + exhaustive scan),\n"
        "itineraries (all words by meet in the middle), necklaces (every primitive\n"
        "necklace, small K), both (cross-check), auto."
    ),
)
@click.argument("map_spec", metavar="MAP")
@click.option(
    "--max-length", "-K", "max_length", required=True, help="Largest cycle length K (>= 1)."
)
@click.option(
    "--side", type=click.Choice(["positive", "negative", "both"]), default="both", show_default=True
)
@click.option(
    "--method",
    type=click.Choice(["auto", "bound-scan", "itineraries", "necklaces", "both"]),
    default="auto",
    show_default=True,
)
@click.option(
    "--k",
    "k_range",
    default=None,
    help="For a family template (3x+k): the range of k, e.g. 1..200.",
)
@click.option("--all-k", is_flag=True, help="Family: every valid k, not only k prime to 2a.")
@click.option(
    "--certificate",
    "cert_path",
    type=click.Path(dir_okay=False),
    help="Write a certificate (JSON).",
)
@click.option("--store", type=click.Path(dir_okay=False), help="Scan results store (SQLite).")
@click.option(
    "--workers", type=int, default=None, help="Scan worker processes (default: all cores)."
)
@click.option(
    "--max-scan", default=str(MAX_SCAN), show_default=True, help="Refuse scans longer than this."
)
@maps_option
@json_option
def census_cmd(
    map_spec,
    max_length,
    side,
    method,
    k_range,
    all_k,
    cert_path,
    store,
    workers,
    max_scan,
    map_files,
    as_json,
):
    """All integer cycles of MAP with length at most K, certified complete."""
    K = parse_count(max_length, "--max-length")
    if K < 1:
        raise BadInput(f"--max-length must be at least 1, got {K}")
    limit = parse_count(max_scan, "--max-scan")
    if workers is not None and workers < 1:
        raise BadInput(f"--workers must be at least 1, got {workers}")
    kw = {"store": store, "workers": workers, "max_scan": limit, "method": method}
    if "k" in map_spec.replace(" ", "").lower().split("x")[-1]:
        _family(map_spec, k_range, K, side, all_k, cert_path, kw, as_json)
        return
    if k_range is not None:
        raise BadInput("--k applies to a family template such as 3x+k")
    m = resolve_map(map_spec, map_files)
    c = census(m, K, side=side, progress=_progress(), **kw)
    if cert_path:
        write_certificate(c, cert_path)
    if as_json:
        doc = c.to_dict()
        doc["certificate"] = cert_path
        emit_json(doc)
        return
    con = stdout_console()
    con.print(
        f"[bold]{m.label}[/bold]: cycles of length <= {K}, {' and '.join(c.sides)} side(s) (certified)"
    )
    for s, p in c.plans.items():
        if p.method == "bound-scan":
            ctype = f" at content {list(p.bound_content)}" if p.bound_content else ""
            con.print(
                f"  {s}: proved bound |min| <= {p.bound}{ctype}; scanned 1..{p.scan_to} exhaustively"
                + (f" (sign changes possible from |n| <= {p.crossing})" if p.crossing else "")
            )
        else:
            con.print(f"  {s}: itinerary method ({p.reason})")
    rows = []
    for x in c.cycles:
        first = ", ".join(str(e) for e in x.elements[:6]) + (", ..." if x.length > 6 else "")
        steps = x.odd_steps if x.odd_steps is not None else list(x.content)
        rows.append(
            [x.minimum, x.length, steps, short(x.itinerary, 30), first, x.lagarias_primitive]
        )
    head = "odd steps" if m.divisor == 2 else "content"
    con.print(
        make_table(
            None, ["minimum", "length", head, "itinerary", "first elements", "primitive"], rows
        )
    )
    con.print(c.statement())
    if cert_path:
        con.print(f"certificate written to {cert_path}")


def _family(template, k_range, K, side, all_k, cert_path, kw, as_json):
    try:
        parse_family(template)
    except Exception as exc:
        raise BadInput(str(exc)) from None
    if k_range is None:
        raise BadInput("a family needs --k, e.g. --k 1..200")
    if cert_path:
        raise BadInput(
            "--certificate is for a single map; run the census of one member to certify it"
        )
    try:
        ks = parse_int_range(k_range)
    except MapError as exc:
        raise BadInput(str(exc)) from None
    con = stderr_console()

    def prog(done, total):
        if sys.stderr.isatty():
            con.print(f"family: {done} / {total} members", end="\r")

    side = "positive" if side == "both" else side
    fam = census_family(template, ks, K, side=side, all_k=all_k, progress=prog, **kw)
    if as_json:
        emit_json(fam.to_dict())
        return
    rows = [
        [r["k"], r["primitive_count"], r["primitive_minima"], r["cycle_count"], r["scan_to"]]
        for r in fam.table()
    ]
    stdout_console().print(
        make_table(
            f"{template}: cycles of length <= {K}, {side} side (certified per row)",
            ["k", "primitive cycles", "their minima", "all cycles", "scanned to"],
            rows,
        )
    )


COMMANDS = [census_cmd]
