"""``cyclewright demo``: run the demo study (cyclewright/scenarios/demo.toml, shipped as package data) and point at its report."""

from __future__ import annotations

import json
from dataclasses import replace
from pathlib import Path

import click

from cyclewright.cycles.compare import ROW_HEADINGS, overview_table

from ..errors import BadInput
from ..options import latex_tables, out_option, workers_option
from ..render import short, show_table, stdout_console
from ..study import run_study
from ..studyfile import StudyError, load_study

DEMO = Path(__file__).resolve().parents[2] / "scenarios" / "demo.toml"


@click.command(
    "demo",
    epilog="\b\nExamples:\n  cyclewright demo\n  cyclewright demo --out /tmp/demo-report --workers 2\n  cyclewright demo --latex",
)
@out_option
@workers_option
@latex_tables
def demo_cmd(out, workers) -> None:
    """Run the built-in demo study: seven maps counted, censused, scanned, floored and compared."""
    if not DEMO.is_file():
        raise BadInput(f"the demo study {DEMO} is missing (run from a source checkout)")
    try:
        study = load_study(DEMO)
        summary = run_study(study, out, workers=workers)
    except StudyError as exc:
        raise BadInput(str(exc)) from None
    con = stdout_console()
    con.print(f"[bold]{study.title}[/bold]")
    con.print(highlights(study, Path(out)))
    con.print(
        f"report: {summary['report']}  (HTML: {summary['html']}); data files, plots and certificates beside it"
    )


def highlights(study, out: Path):
    """The highlights: columns of the comparison's overview, read from the study's data file.

    Every figure comes from the study's ``compare`` analysis, so the census
    length K, the range 1..N behind the unresolved share and the floors, and
    x are those of that analysis (the report's own floor section may assume
    another N; its table of parameters lists both). The table is
    :func:`~cyclewright.cycles.compare.overview_table`, the one the
    ``compare`` command prints: no figure is formatted twice.
    """
    spec = next(a for a in study.analyses if a.kind == "compare")
    K, N, X = spec.params["max_length"], spec.params["to"], spec.params["odd"]
    doc = json.loads((out / "compare.json").read_text())
    rows = [{c: r.get(ROW_HEADINGS[c]) for c in ROW_HEADINGS} for r in doc["rows"]]
    view = overview_table(rows, K, N, X)
    keep = [
        c
        for c in view.columns
        if c.startswith(("map", "drift", "cycles of length", "cycle minima", "share of", "least"))
    ]
    title = f"Highlights (from this run's data files; census length K = {K}, starts 1..N with N = {short(N)})"
    return show_table(replace(view, title=title).select(keep))


COMMANDS = [demo_cmd]
