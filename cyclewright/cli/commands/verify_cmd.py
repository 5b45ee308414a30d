"""``cyclewright verify FILE.json``: re-check a census certificate."""

from __future__ import annotations

import click

from cyclewright.cycles.certificate import verify_certificate

from ..options import json_option, workers_option
from ..render import emit_json, stdout_console


@click.command(
    "verify",
    epilog=(
        "\b\nExamples:\n  cyclewright verify census-3x5.json\n  cyclewright verify big.json --rescan --json\n"
        "\b\nExit status 0 when the certificate holds, 1 when a check fails, 2 when the file is not a certificate."
    ),
)
@click.argument("path", type=click.Path(dir_okay=False), metavar="FILE.json")
@click.option(
    "--rescan/--no-rescan",
    default=None,
    help="Re-derive the cycle list (default: when the range is small).",
)
@workers_option
@json_option
def verify_cmd(path, rescan, workers, as_json):
    """Re-check every listed cycle exactly, recompute bounds and ranges, optionally rescan."""
    v = verify_certificate(path, rescan=rescan, workers=workers)
    if as_json:
        emit_json(v.to_dict())
    else:
        con = stdout_console()
        for c in v.checks:
            con.print(f"ok: {c}")
        for p in v.problems:
            con.print(f"FAILED: {p}")
        con.print(
            "certificate holds"
            if v.ok
            else f"certificate does NOT hold ({len(v.problems)} problem(s))"
        )
    if not v.ok:
        raise SystemExit(1)


COMMANDS = [verify_cmd]
