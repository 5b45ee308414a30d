"""``cyclewright sweep MAP --odd 1..X``: counting figures along the critical line."""

from __future__ import annotations

import dataclasses
import sys

import click

from cyclewright.cycles.counting import DEFAULT_SWEEP_LIMIT
from cyclewright.cycles.labels import HEURISTIC_CAUTION
from cyclewright.cycles.sides import PerSide
from cyclewright.cycles.sweep import sweep

from ..errors import BadInput
from ..files import atomic_write, check_distinct, check_figure_path, check_output
from ..options import (
    IntExpr,
    csv_option,
    force_option,
    json_option,
    latex_tables,
    limit_option,
    map_argument,
    maps_option,
    odd_range_option,
    plot_options,
    resolve_map,
    show_option,
    side_option,
)
from ..plots import plot_sweep
from ..progress import with_progress
from ..render import emit_json, show_table, stdout_console, write_csv

__all__ = ["COMMANDS"]


@click.command(
    "sweep",
    epilog=(
        "\b\nExamples:\n"
        "  cyclewright sweep 3x+1 --odd 1..2000\n"
        "  cyclewright sweep 3x+1 --odd 1..60 --extra-lengths 2 --side negative\n"
        "  cyclewright sweep 5x+1 --odd 1..300 --csv 5x1.csv --plot 5x1.png\n"
        "  cyclewright sweep 3x+5 --odd 1..40 --json\n"
        "\b\nFor each x: the smallest k with d^k above the product of multipliers (the side\n"
        "whose cycles need D > 0) or the largest k below it (the other side), plus\n"
        "--extra-lengths more. For divisors above 2, x counts the steps off residue 0 and\n"
        "every content of the other residues gets a row."
    ),
)
@map_argument
@odd_range_option(required=True)
@click.option(
    "--extra-lengths",
    "extra",
    default=0,
    show_default=True,
    type=IntExpr(minimum=0),
    help="Further lengths per x beyond the critical one.",
)
@side_option
@limit_option
@csv_option
@plot_options
@force_option
@show_option
@maps_option
@json_option
@latex_tables
def sweep_cmd(
    map_spec,
    odd_range,
    extra,
    side,
    limit,
    csv_path,
    plot_path,
    width,
    force,
    show,
    map_files,
    as_json,
) -> None:
    """Necklaces, denominators, proved bounds and candidates for every x along the critical line.

    Also reports the fitted growth rate of the necklace counts against the
    theoretical rho and the smallest x from which the proved candidate bound
    stays below the necklace count.
    """
    m = resolve_map(map_spec, map_files)
    xs = odd_range
    if limit is None:
        limit = DEFAULT_SWEEP_LIMIT
    if as_json and csv_path == "-":
        raise BadInput("--json and --csv - both write to stdout; give --csv a file name")
    check_distinct(csv_path, plot_path)
    for path, what in ((csv_path, "--csv"), (plot_path, "--plot")):
        check_output(path, what, force)
    check_figure_path(plot_path, "--plot", force)
    if plot_path and side == "both":
        raise BadInput("--plot draws one side; give --side positive or --side negative")
    got = with_progress(sweep, m, xs, extra, side, limit=limit)
    sweeps = list(got) if isinstance(got, PerSide) else [got]
    # Outputs are written only after the whole sweep succeeded.
    if csv_path:
        cols = sweeps[0].columns
        rows = [[r[c] for c in cols] for s in sweeps for r in s.to_dicts()]
        if len(sweeps) > 1:  # one sweep per side: say which
            rows = [
                [s.side] + row
                for s in sweeps
                for row in ([r[c] for c in cols] for r in s.to_dicts())
            ]
            cols = ["sweep_side", *cols]
        if csv_path == "-":
            write_csv(sys.stdout, cols, rows)
        else:
            atomic_write(csv_path, lambda fh: write_csv(fh, cols, rows))
    if plot_path:
        plot_sweep(sweeps[0], plot_path, width=width)
    if as_json:
        emit_json(got.to_dict())
        return
    if csv_path == "-":
        return
    for s in sweeps:
        _print_human(s, show, csv_path, plot_path)


def _pick_rows(n: int, max_rows: int) -> list[int]:
    if n <= max_rows or max_rows <= 0:
        return list(range(n)) if max_rows > 0 else []
    step = (n - 1) / (max_rows - 1)
    return sorted({round(i * step) for i in range(max_rows)})


def _print_human(s, max_rows: int, csv_path, plot_path) -> None:
    con = stdout_console()
    lo, hi = s.odd
    con.print(
        f"[bold]{s.map.label}[/bold], {s.side} side, x = {lo}..{hi}"
        + (f", {s.extra_lengths} extra lengths" if s.extra_lengths else "")
        + f": {len(s.rows)} types in {s.elapsed:.2f} s"
    )
    idx = _pick_rows(len(s.rows), max_rows)
    t = s.table()
    shown = dataclasses.replace(t, rows=tuple(t.rows[i] for i in idx))
    caption = None
    if len(idx) < len(s.rows):
        caption = (
            f"{len(idx)} of {len(s.rows)} rows shown; --csv or --json for all, --show to change"
        )
    con.print(show_table(shown, caption=caption))
    if s.rho:
        con.print(
            f"necklace growth per unit x: fitted {_f(s.fitted_rate)}, with the x^(-3/2) factor "
            f"removed {_f(s.fitted_rate_corrected)} (heuristic, x in {s.fit_range}); "
            f"theory rho = 2^(t H(1/t)) = {s.rho:.6f}"
        )
    else:
        con.print(
            f"necklace growth per unit x: fitted {_f(s.fitted_rate)} (heuristic); "
            "no closed-form rho for this map"
        )
    con.print(
        "proved candidate bound below the necklace count for every row from x = "
        f"{_opt(s.crossover_x)}; using only a linear-forms bound on |Λ| uniform in k (best approximations of the "
        "continued fraction, certified, no recalled constant): from x = "
        f"{_opt(s.crossover_x_linear_forms)} (within x <= {hi})"
    )
    found = [(r.length, c.minimum) for r in s.rows for c in (r.primitive_integer_cycles or ())]
    repeats = [
        (r.length, c.minimum, c.length) for r in s.rows for c in (r.repeated_integer_cycles or ())
    ]
    if found or repeats:
        con.print(
            f"integer cycles found (exact): {len(found)} primitive"
            + (": " if found else "")
            + ", ".join(f"min {mn} (k={k})" for k, mn in found[:12])
            + (" ..." if len(found) > 12 else "")
            + (
                f"; {len(repeats)} repeated traversal(s) of shorter cycles, not new cycles: "
                + ", ".join(f"min {mn} (k={k} = {k // p} x {p})" for k, mn, p in repeats[:8])
                + (" ..." if len(repeats) > 8 else "")
                if repeats
                else ""
            )
        )
    if csv_path and csv_path != "-":
        con.print(f"rows written to {csv_path}")
    if plot_path:
        con.print(f"plot written to {plot_path}")
    con.print(HEURISTIC_CAUTION)


def _f(v) -> str:
    return "-" if v is None else f"{v:.6f}"


def _opt(v) -> str:
    return "never in range" if v is None else str(v)


COMMANDS = [sweep_cmd]
