"""``cyclewright scan MAP --to N``: every integer cycle whose minimum lies in a range, exactly."""

from __future__ import annotations

import sys
import time

import click

from cyclewright.cycles.scan.chunks import DEFAULT_MAX_STEPS
from cyclewright.cycles.scan.run import scan

from ..errors import BadInput
from ..options import json_option, maps_option, parse_int, resolve_map
from ..render import emit_json, make_table, short, stderr_console, stdout_console

_EPILOG = """\b
Examples:
  cyclewright scan 3x+1 --to 10^9
  cyclewright scan 3x+5 --to 1000 --side both --json
  cyclewright scan 5x+1 --to 10^6 --max-steps 2000 --store five.sqlite
  cyclewright scan 3x+1 --from 10^10 --to 10^10+10^8 --max-cycle-length 10000
  cyclewright scan 3x+1 --to 10^9 --executor dask --scheduler tcp://10.0.0.5:8786
\b
Each start s is classified exactly: it drops below s (no cycle minimum), it
returns to s (s is a cycle minimum; the cycle is reported), it enters another
cycle, or it is unresolved within the step cap. With --max-cycle-length K the
question is only "is s the minimum of a cycle of length <= K?" and undecided
starts are counted as beyond length K. Ranges are of absolute values; the
negative side scans -N .. -M. Finished chunks are kept in the store (default:
one file per map in the user data directory, $CYCLEWRIGHT_DATA_DIR overrides),
so an interrupted scan resumes where it stopped.
"""


def parse_bound(text: str, what: str) -> int:
    """An integer like ``1000``, ``10^9``, ``1e9``, ``2^63-1`` or ``10^10+10^8``."""
    return parse_int(text, what)


class _Progress:
    """Progress on stderr once the work has taken more than a second."""

    def __init__(self) -> None:
        self.t0 = time.monotonic()
        self.last = 0.0
        self.shown = False
        self.tty = sys.stderr.isatty()
        self.console = stderr_console()

    def __call__(self, p) -> None:
        now = time.monotonic()
        if now - self.t0 < 1.0:
            return
        if self.shown and now - self.last < 0.5 and p.done < p.total:
            return
        self.last = now
        self.shown = True
        pct = 100.0 * p.done / p.total if p.total else 100.0
        text = (
            f"scan {p.side}: {p.done:,}/{p.total:,} starts ({pct:.1f}%), "
            f"{p.rate:,.0f} starts/s, {p.unresolved:,} unresolved so far"
        )
        if self.tty:
            sys.stderr.write("\r\x1b[2K" + text)
            sys.stderr.flush()
        else:
            self.console.print(text)

    def finish(self) -> None:
        if self.shown and self.tty:
            sys.stderr.write("\n")
            sys.stderr.flush()


@click.command("scan", epilog=_EPILOG)
@click.argument("map_spec", metavar="MAP")
@click.option("--to", "to_text", required=True, metavar="N", help="Largest |start| (e.g. 10^9).")
@click.option(
    "--from", "from_text", default="1", show_default=True, metavar="M", help="Smallest |start|."
)
@click.option(
    "--side",
    type=click.Choice(["positive", "negative", "both"]),
    default="positive",
    show_default=True,
    help="Positive starts, negative starts (-N .. -M), or both.",
)
@click.option(
    "--workers", type=int, default=None, help="Local worker processes [default: all cores]."
)
@click.option(
    "--store",
    "store_path",
    type=click.Path(dir_okay=False),
    default=None,
    help="SQLite results store [default: one per map in the user data directory].",
)
@click.option("--no-store", is_flag=True, help="Keep nothing (no resume).")
@click.option(
    "--max-steps",
    type=int,
    default=DEFAULT_MAX_STEPS,
    show_default=True,
    help="Step cap per start; undecided starts are followed exactly up to it.",
)
@click.option(
    "--max-cycle-length",
    type=int,
    default=None,
    metavar="K",
    help="Only find cycles of length <= K (the cap is K; no start stays unresolved).",
)
@click.option(
    "--executor",
    type=click.Choice(["local", "dask"]),
    default="local",
    show_default=True,
    help="Where chunks run.",
)
@click.option(
    "--scheduler", default=None, metavar="ADDR", help="Dask scheduler (with --executor dask)."
)
@click.option("--chunk-size", type=int, default=None, help="Starts per chunk (advanced).")
@click.option(
    "--show", "show_n", default=40, show_default=True, help="Cycles to list in the table."
)
@maps_option
@json_option
def scan_cmd(
    map_spec,
    to_text,
    from_text,
    side,
    workers,
    store_path,
    no_store,
    max_steps,
    max_cycle_length,
    executor,
    scheduler,
    chunk_size,
    show_n,
    map_files,
    as_json,
) -> None:
    """Every integer cycle of MAP whose minimum lies in [M, N], by an exact scan of the starts."""
    m = resolve_map(map_spec, map_files)
    to = parse_bound(to_text, "--to")
    start = parse_bound(from_text, "--from")
    if no_store and store_path:
        raise BadInput("--store and --no-store exclude each other")
    store = False if no_store else store_path
    prog = _Progress()
    try:
        result = scan(
            m,
            to,
            start=start,
            side=side,
            workers=workers,
            store=store,
            max_steps=max_steps,
            max_cycle_length=max_cycle_length,
            executor=executor,
            scheduler=scheduler,
            progress=prog,
            chunk_size=chunk_size,
        )
    finally:
        prog.finish()
    if as_json:
        emit_json(result.to_dict())
        return
    _print(result, show_n)


_NAMES = {
    "drops": "drops below its start",
    "cycles": "cycle minimum (returns to its start)",
    "other_cycle": "enters another cycle",
    "unresolved": "unresolved",
    "beyond_length": "beyond the length bound",
}


def _print(r, show_n: int) -> None:
    con = stdout_console()
    m = r.map
    cap = (
        f"cycles of length <= {r.max_cycle_length}"
        if r.max_cycle_length
        else f"step cap {r.max_steps}"
    )
    con.print(
        f"[bold]{m.label}[/bold] ({m.formula()}), starts {r.start}..{r.to} "
        f"({' and '.join(r.sides)}), {cap}: [bold]{r.label}[/bold]"
        + ("" if r.complete else " (some starts unresolved, see below)")
    )
    keys = ["drops", "cycles", "other_cycle"]
    keys.append("beyond_length" if r.max_cycle_length else "unresolved")
    rows = []
    for k in keys:
        rows.append([_NAMES[k]] + [r.counts[s][k] for s in r.sides] + ["certified"])
    rows.append(
        ["of which decided by the residue sieve"] + [r.sieved[s] for s in r.sides] + ["certified"]
    )
    con.print(make_table("Classification of the starts", ["", *r.sides, "label"], rows))
    if r.cycles:
        crow = []
        for c in r.cycles[:show_n]:
            steps = c.odd_steps if c.odd_steps is not None else " ".join(map(str, c.content))
            crow.append(
                [
                    c.minimum,
                    c.length,
                    steps,
                    short(c.itinerary, 30),
                    c.primitive_itinerary,
                    c.lagarias_primitive,
                ]
            )
        more = f"; {len(r.cycles) - show_n} more with --json" if len(r.cycles) > show_n else ""
        con.print(
            make_table(
                f"Cycles with minimum in range ({len(r.cycles)}, exact)",
                [
                    "minimum",
                    "length",
                    "odd steps" if m.divisor == 2 else "content",
                    "itinerary",
                    "primitive word",
                    "primitive (Lagarias)",
                ],
                crow,
                caption="minimum = element of least absolute value; each cycle re-proved by exact iteration"
                + more,
            )
        )
    else:
        con.print("No cycle has its minimum in the range.")
    for s in r.sides:
        n = r.unresolved_count[s]
        if n:
            first = ", ".join(str(x) for x in r.unresolved_first[s])
            con.print(
                f"{s}: {n:,} starts unresolved within {r.max_steps} steps "
                f"({r.unresolved_escaped[s]:,} of them passed 2^63); first: {first}"
                + ("" if r.store_path is None else "; all are in the store")
            )
    where = r.store_path or "not stored"
    rate = r.computed / r.seconds if r.seconds > 0 else 0.0
    con.print(
        f"store: {where}; chunks {r.chunks_total} ({r.chunks_reused} reused); "
        f"{r.seconds:.2f} s, {rate:,.0f} starts/s computed (wall-clock measurement)"
    )


COMMANDS = [scan_cmd]
