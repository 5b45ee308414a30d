"""``cyclewright demo``: run the demo study (cyclewright/scenarios/demo.toml, shipped as package data) and point at its report."""

from __future__ import annotations

import json
from pathlib import Path

import click

from ..errors import BadInput
from ..options import out_option, workers_option
from ..render import make_table, stdout_console
from ..study import run_study
from ..studyfile import StudyError, load_study

DEMO = Path(__file__).resolve().parents[2] / "scenarios" / "demo.toml"


@click.command(
    "demo",
    epilog="\b\nExamples:\n  cyclewright demo\n  cyclewright demo --out /tmp/demo-report --workers 2",
)
@out_option
@workers_option
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
    rows = json.loads((Path(out) / "compare.json").read_text())["rows"]
    con.print(
        make_table(
            "Highlights (from this run's data files)",
            [
                "map",
                "drift/step [exact = rounded]",
                f"cycles <= {rows[0]['census_length'] if rows else 'K'} other than 0, "
                "primitive/all [certified]",
                "minima",
                "unresolved share <= N",
                "floor + / -  [proved]",
            ],
            [
                [
                    r["map"],
                    f"{r['drift_exact']} = {r['drift']:+.4f}",
                    f"{r['census_primitive_cycles']}/{r['census_cycles']}",
                    ", ".join(map(str, r["census_minima"] or [])),
                    f"{r['unresolved_share']:.4f}",
                    f"{r['floor_positive_length'] or '-'} / {r['floor_negative_length'] or '-'}",
                ]
                for r in rows
            ],
        )
    )
    con.print(
        f"report: {summary['report']}  (HTML: {summary['html']}); data files, plots and certificates beside it"
    )


COMMANDS = [demo_cmd]
