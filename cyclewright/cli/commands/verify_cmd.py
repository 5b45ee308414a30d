"""``cyclewright verify FILE.json``: re-derive every claim of a census certificate."""

from __future__ import annotations

import click

from cyclewright.cycles.certificate import (
    EXIT_FAILS,
    EXIT_HOLDS,
    EXIT_NOT_RUN,
    RESCAN_MINUTES,
    verify_certificate,
)

from ..errors import BadInput
from ..options import json_option, latex_tables, workers_option
from ..progress import with_progress
from ..render import emit_json, latex_mode, show_table, stdout_console

__all__ = ["COMMANDS"]


@click.command(
    "verify",
    epilog=(
        "\b\nExamples:\n  cyclewright verify census-3x5.json\n"
        "  cyclewright verify big.json --rescan --json\n"
        "  cyclewright verify big.json --minutes 30\n"
        "  cyclewright verify census-3x5.json --latex\n"
        f"\b\nExit status:\n  {EXIT_HOLDS}  every claim re-derived and equal (the certificate holds)\n"
        f"  {EXIT_FAILS}  some claim differs from its recomputation (each field is named)\n"
        "  2  the file is not a certificate, or bad options\n"
        f"  {EXIT_NOT_RUN}  every check that ran holds, but the cycle list was NOT re-derived\n"
        "     (its estimated time is above --minutes, or --no-rescan)"
    ),
)
@click.argument("path", type=click.Path(dir_okay=False), metavar="FILE.json")
@click.option(
    "--rescan/--no-rescan",
    default=None,
    help="Always / never re-derive the cycle list by a fresh census (default: when the "
    "estimate, from a scan rate measured now, is within --minutes).",
)
@click.option(
    "--minutes",
    default=str(RESCAN_MINUTES),
    show_default=True,
    help="Largest estimated time of the automatic re-derivation.",
)
@workers_option
@json_option
@latex_tables
def verify_cmd(path, rescan, minutes, workers, as_json):
    """Re-derive every claim of a census certificate; name each field that differs."""
    try:
        limit = float(minutes)
    except ValueError:
        raise BadInput(f"--minutes must be a number, got {minutes!r}") from None
    if not limit >= 0:
        raise BadInput(f"--minutes must be at least 0, got {minutes!r}")
    v = with_progress(verify_certificate, path, rescan=rescan, workers=workers, minutes=limit)
    if as_json:
        emit_json(v.to_dict())
    elif latex_mode():  # one table of the checks, the verdict as its note
        stdout_console().print(show_table(v.table()))
    else:
        con = stdout_console()
        for c in v.checks:
            con.print(f"ok: {c}", highlight=False, markup=False)
        for c in v.not_run:
            con.print(f"NOT CHECKED: {c}", highlight=False, markup=False)
        for p in v.problems:
            con.print(f"FAILED: {p}", highlight=False, markup=False)
        con.print(v.verdict, highlight=False)
    if v.exit_status:
        raise SystemExit(v.exit_status)


COMMANDS = [verify_cmd]
