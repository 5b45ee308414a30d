"""``cyclewright study FILE.toml --out DIR``: a reproducible study with its report."""

from __future__ import annotations

import click

from ..errors import BadInput
from ..options import force_option, json_option, out_option, workers_option
from ..progress import messages, progress_display
from ..render import emit_json, stdout_console
from ..study import run_study
from ..studyfile import StudyError, load_study


@click.command(
    "study",
    epilog=(
        "\b\nExamples:\n  cyclewright study cyclewright/scenarios/demo.toml --out demo-out\n"
        "  cyclewright study cyclewright/scenarios/family.toml --out family-out --workers 2\n"
        "\b\nThe output directory gets report.md and report.html, the figures (PNG, SVG and/or PDF\n"
        "at the width the study file's [report] table names), CSV and JSON for every table,\n"
        "census certificates, study.json (versions, parameters) and stores/ (scan results,\n"
        "reused by a re-run, which reproduces the data files byte for byte).\n"
        "\b\nA records or compare analysis keeps its records store in stores/ only with the\n"
        "analysis key store = true, or from 10^7 starts on; store = false keeps none."
    ),
)
@click.argument("path", type=click.Path(dir_okay=False), metavar="FILE.toml")
@out_option(required=True)
@workers_option
@force_option
@json_option
def study_cmd(path, out, workers, force, as_json):
    """Run the analyses of a study file and write a report with its data."""
    try:
        study = load_study(path)
    except StudyError as exc:
        raise BadInput(str(exc)) from None
    try:
        with progress_display() as show:
            summary = run_study(
                study, out, workers=workers, force=force, say=messages(show, "study", "analyses")
            )
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
    con.print(summary["store_use_line"], highlight=False)


COMMANDS = [study_cmd]
