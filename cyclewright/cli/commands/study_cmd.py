"""``cyclewright study FILE.toml --out DIR``: a reproducible study with its report."""

from __future__ import annotations

import sys

import click

from ..errors import BadInput
from ..render import emit_json, stderr_console, stdout_console
from ..study import run_study
from ..studyfile import StudyError, load_study


@click.command(
    "study",
    epilog=(
        "\b\nExamples:\n  cyclewright study cyclewright/scenarios/demo.toml --out demo-out\n"
        "  cyclewright study cyclewright/scenarios/family.toml --out family-out --workers 2\n"
        "\b\nThe output directory gets report.md and report.html, PNG plots, CSV and JSON for every\n"
        "table, census certificates, study.json (versions, parameters) and stores/ (scan results,\n"
        "reused by a re-run, which reproduces the data files byte for byte)."
    ),
)
@click.argument("path", type=click.Path(dir_okay=False), metavar="FILE.toml")
@click.option(
    "--out", "out", required=True, type=click.Path(file_okay=False), help="Output directory."
)
@click.option(
    "--workers", type=int, default=None, help="Scan worker processes (default: all cores)."
)
@click.option("--force", is_flag=True, help="Write into a directory that holds something else.")
@click.option("--json", "as_json", is_flag=True, help="Print a JSON summary instead of text.")
def study_cmd(path, out, workers, force, as_json):
    """Run the analyses of a study file and write a report with its data."""
    if workers is not None and workers < 1:
        raise BadInput(f"--workers must be at least 1, got {workers}")
    try:
        study = load_study(path)
    except StudyError as exc:
        raise BadInput(str(exc)) from None
    err = stderr_console()
    say = (lambda msg: err.print(f"[study] {msg}")) if sys.stderr.isatty() else None
    try:
        summary = run_study(study, out, workers=workers, force=force, say=say)
    except StudyError as exc:
        raise BadInput(str(exc)) from None
    if as_json:
        emit_json(summary)
        return
    con = stdout_console()
    con.print(
        f"study '{study.title}': {summary['sections']} sections, {summary['files']} data files"
    )
    con.print(f"report: {summary['report']}  (HTML: {summary['html']})")


COMMANDS = [study_cmd]
