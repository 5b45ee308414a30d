"""``cyclewright demo``: run the demo study (cyclewright/scenarios/demo.toml, shipped as package data) and point at its report."""

from __future__ import annotations

import json
from pathlib import Path

import click

from ..errors import BadInput
from ..options import latex_tables, out_option, workers_option
from ..render import make_table, short, stdout_console
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
    """The highlights table, read from the study's compare data file: K, N and x named in it.

    Every figure comes from the study's ``compare`` analysis, so the census
    length K, the range 1..N behind the unresolved share and the floors, and
    x are those of that analysis (the report's own floor section may assume
    another N; its table of parameters lists both).
    """
    from cyclewright.cycles.compare import ROW_HEADINGS

    spec = next(a for a in study.analyses if a.kind == "compare")
    K, N = spec.params["max_length"], spec.params["to"]
    doc = json.loads((out / "compare.json").read_text())
    rows = [{c: r.get(ROW_HEADINGS[c]) for c in ROW_HEADINGS} for r in doc["rows"]]
    return make_table(
        f"Highlights (from this run's data files; census length K = {K}, starts 1..N with N = {short(N)})",
        [
            "map",
            "drift per step [exact]",
            "drift, rounded [rounded]",
            f"cycles of length <= {K} other than 0: primitive of all [certified]",
            "cycle minima [certified]",
            f"share of 1..{short(N)} unresolved [rounded]",
            f"least length of a further cycle, + / -, given 1..{short(N)} verified [proved]",
        ],
        [
            [
                r["map"],
                r["drift_exact"],
                f"{r['drift']:+.4f}",
                f"{r['census_primitive_cycles']} of {r['census_cycles']}",
                ", ".join(map(str, r["census_minima"] or [])),
                f"{r['unresolved_share']:.4f}" if r["unresolved_share"] is not None else "-",
                f"{r['floor_positive_length'] or '-'} / {r['floor_negative_length'] or '-'}",
            ]
            for r in rows
        ],
    )


COMMANDS = [demo_cmd]
