"""``cyclewright compare MAP MAP ...``: maps side by side, and predictions against findings."""

from __future__ import annotations

import sys
from pathlib import Path

import click

from cyclewright.cycles.census import default_family_members, parse_family
from cyclewright.cycles.compare import compare
from cyclewright.cycles.errors import InputError
from cyclewright.cycles.labels import HEURISTIC_CAUTION
from cyclewright.cycles.sweep import sweep
from cyclewright.maps import MapError, parse_int_range, parse_shorthand

from ..errors import BadInput
from ..files import check_output
from ..options import json_option, maps_option, resolve_map
from ..render import emit_json, make_table, short, stderr_console, stdout_console, write_csv
from .count_cmd import parse_count

__all__ = ["COMMANDS", "ROW_COLUMNS", "resolve_maps", "comparison_sweeps"]

ROW_COLUMNS = [
    "map",
    "definition",
    "divisor",
    "drift",
    "drift_exact",
    "critical_ratio",
    "critical_ratio_exact",
    "rho",
    "census_length",
    "census_cycles",
    "census_minima",
    "census_lengths",
    "census_primitive",
    "census_method",
    "scan_to",
    "drop_share",
    "unresolved_share",
    "cycles_met",
    "largest_peak",
    "largest_peak_start",
    "floor_positive_length",
    "floor_negative_length",
    "x",
    "k",
    "necklaces_at_x",
    "candidates_at_x",
    "heuristic_at_x",
    "integer_cycles_at_x",
]


def resolve_maps(specs, k_range, map_files, all_k=False):
    """Map names, shorthands and family templates (``3x+k`` with ``--k``) to maps."""
    out = []
    for spec in specs:
        if spec.replace(" ", "").lower().endswith(("+k", "-k")):
            if k_range is None:
                raise BadInput(f"the family {spec} needs --k, e.g. --k 1..50")
            try:
                a, sign = parse_family(spec)
                ks = list(parse_int_range(k_range))
            except (InputError, MapError) as exc:
                raise BadInput(str(exc)) from None
            members = (
                [k for k in ks if k > 0 and (a + k) % 2 == 0]
                if all_k
                else default_family_members(a, ks)
            )
            if not members:
                raise BadInput(f"{spec}: no member in --k {k_range} gives a valid map")
            out += [parse_shorthand(f"{a}x{'+' if sign > 0 else '-'}{k}") for k in members]
        else:
            out.append(resolve_map(spec, map_files))
    if not out:
        raise BadInput("compare needs at least one map")
    return out


def comparison_sweeps(cmp, limit: int = 2000) -> dict:
    """The positive-side critical-line sweep of every map that has one (for the plot)."""
    sweeps = {}
    for p in cmp.profiles:
        try:
            sweeps[p.map.label] = sweep(p.map, range(1, cmp.odd + 1), limit=limit)
        except InputError:
            continue
    return sweeps


@click.command(
    "compare",
    epilog=(
        "\b\nExamples:\n"
        "  cyclewright compare 3x+1 5x+1 7x+1 --max-length 20 --to 1e5\n"
        "  cyclewright compare 3x+1 mod3-4x --json\n"
        '  cyclewright compare "3x+k" --k 1..50 --max-length 16 --csv fam.csv\n'
        "  cyclewright compare 3x+1 3x+5 181x+1 --plot cmp.png"
    ),
)
@click.argument("map_specs", nargs=-1, required=True, metavar="MAP...")
@click.option(
    "--max-length", "-K", "max_length", default="20", show_default=True, help="Census length K."
)
@click.option(
    "--to", "to", default="10^5", show_default=True, help="Scan starts 1..N on both sides."
)
@click.option(
    "--odd", "-x", "odd", default="20", show_default=True, help="Counting figures at x = X."
)
@click.option("--k", "k_range", default=None, help="Range of k for a family template such as 3x+k.")
@click.option("--all-k", is_flag=True, help="Family: every valid k, not only k prime to 2a.")
@click.option(
    "--csv", "csv_path", default=None, help="Write the comparison table as CSV (- for stdout)."
)
@click.option("--plot", "plot_path", default=None, help="Write the panel plot to FILE.png.")
@click.option(
    "--store", type=click.Path(file_okay=False), help="Directory of scan stores (one per map)."
)
@click.option("--workers", type=int, default=None, help="Scan worker processes.")
@maps_option
@json_option
def compare_cmd(
    map_specs,
    max_length,
    to,
    odd,
    k_range,
    all_k,
    csv_path,
    plot_path,
    store,
    workers,
    map_files,
    as_json,
):
    """Maps side by side: drift, critical ratio, census, scan, floor, counting; predictions vs findings."""
    K = parse_count(max_length, "--max-length")
    N = parse_count(to, "--to")
    X = parse_count(odd, "--odd")
    if K < 1 or N < 1 or X < 1:
        raise BadInput("--max-length, --to and --odd must be at least 1")
    if workers is not None and workers < 1:
        raise BadInput(f"--workers must be at least 1, got {workers}")
    check_output(csv_path, "--csv")
    check_output(plot_path, "--plot")
    ms = resolve_maps(map_specs, k_range, map_files, all_k)
    if store:
        try:
            Path(store).mkdir(parents=True, exist_ok=True)
        except OSError as exc:
            raise BadInput(
                f"--store {store}: cannot create the directory ({exc.strerror or exc})"
            ) from None
    err = stderr_console()
    progress = (lambda msg: err.print(msg)) if sys.stderr.isatty() else None
    cmp = compare(ms, max_length=K, to=N, odd=X, store=store, workers=workers, progress=progress)
    rows = cmp.rows()
    if csv_path:
        target = sys.stdout if csv_path == "-" else csv_path
        write_csv(target, ROW_COLUMNS, [[r.get(c) for c in ROW_COLUMNS] for r in rows])
    if plot_path:
        from ..plots import plot_comparison

        plot_comparison(cmp, comparison_sweeps(cmp), plot_path)
    if as_json:
        emit_json(cmp.to_dict())
        return
    if csv_path == "-":
        return
    con = stdout_console()
    con.print(
        make_table(
            f"Maps side by side (census K = {K}, scan 1..{N} both sides, counting at x = {X})",
            [
                "map",
                "drift/step [exact]",
                "log_d a",
                "rho",
                "cycles <= K [certified]",
                "minima",
                "unresolved <= N [exact]",
                "largest peak [exact]",
                "floor +/- [proved]",
                "necklaces / candidates / heuristic at x",
            ],
            [
                [
                    r["map"],
                    f"{r['drift']:+.4f}",
                    short(r["critical_ratio"]),
                    short(r["rho"]),
                    short(r["census_cycles"]),
                    ", ".join(map(str, r["census_minima"] or [])) or "-",
                    f"{r['unresolved_share']:.4f}" if r["unresolved_share"] is not None else "-",
                    ("> 2^62" if r["peak_passed_2^62"] else short(r["largest_peak"])),
                    f"{short(r['floor_positive_length'])} / {short(r['floor_negative_length'])}",
                    f"{short(r['necklaces_at_x'], 12)} / {short(r['candidates_at_x'])} / {short(r['heuristic_at_x'])}",
                ]
                for r in rows
            ],
        )
    )
    for p in cmp.profiles:
        if p.predictions is None:
            continue
        pr = p.predictions
        body = [
            [
                t.side,
                t.length,
                t.content[1] if len(t.content) == 2 else list(t.content),
                t.found,
                t.necklaces,
                f"{short(t.candidates)} ({t.candidates_label})",
                short(float(t.heuristic)) if t.heuristic is not None else "-",
            ]
            for t in pr.rows
        ]
        for side, tot in pr.totals.items():
            body.append(
                [
                    side,
                    f"all <= {K}",
                    f"{tot['types']} types",
                    tot["found"],
                    tot["necklaces"],
                    f"{tot['candidates']} (proved)"
                    + (
                        f"; {tot['types_without_bound']} types without a bound"
                        if not tot["bound_applies"]
                        else ""
                    ),
                    short(tot["heuristic"]),
                ]
            )
        con.print(
            make_table(
                f"{p.map.label}: predictions against findings",
                [
                    "side",
                    "length",
                    "odd steps" if p.map.divisor == 2 else "content",
                    "found [certified]",
                    "necklaces [exact]",
                    "candidates",
                    "heuristic",
                ],
                body,
            )
        )
    con.print(HEURISTIC_CAUTION)


COMMANDS = [compare_cmd]
