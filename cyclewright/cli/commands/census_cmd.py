"""``cyclewright census MAP --max-length K``: every integer cycle up to a length, certified."""

from __future__ import annotations

import os
from pathlib import Path

import click

from cyclewright.cycles.census import (
    MAX_SCAN,
    census,
    census_family,
    check_census_length,
    parse_family,
    plan_census,
)
from cyclewright.cycles.certificate import write_certificate

from ..errors import BadInput
from ..files import check_output
from ..options import (
    IntExpr,
    all_offsets_option,
    executor_options,
    json_option,
    latex_tables,
    map_argument,
    maps_option,
    max_length_option,
    max_minutes_option,
    offsets_option,
    plan_option,
    resolve_map,
    resolve_store,
    side_option,
    store_options,
    workers_option,
)
from ..progress import with_progress
from ..render import emit_json, show_table, stderr_console, stdout_console
from .records_cmd import parse_minutes

__all__ = ["COMMANDS"]


@click.command(
    "census",
    epilog=(
        "\b\nExamples:\n"
        "  cyclewright census 3x+1 --max-length 10000 --side both\n"
        "  cyclewright census 3x+1 --max-length 8000000 --side both --plan\n"
        "  cyclewright census 3x+5 --max-length 30 --side both --certificate c.json\n"
        "  cyclewright census mod3-4x --max-length 16 --method itineraries\n"
        '  cyclewright census "3x+k" --offsets 1..200 --max-length 30\n'
        "\b\nMethods: bound-scan (proved bound on cycle minima + exhaustive scan),\n"
        "itineraries (all words by meet in the middle), necklaces (every primitive\n"
        "necklace, small K), both (cross-check), auto."
    ),
)
@map_argument
@max_length_option(required=True)
@side_option
@click.option(
    "--method",
    type=click.Choice(["auto", "bound-scan", "itineraries", "necklaces", "both"]),
    default="auto",
    show_default=True,
    help="How completeness is certified.",
)
@offsets_option
@all_offsets_option
@click.option(
    "--certificate",
    "cert_path",
    type=click.Path(dir_okay=False),
    help="Write a certificate (JSON).",
)
@store_options
@workers_option
@click.option(
    "--max-scan",
    type=IntExpr(minimum=0),
    default=MAX_SCAN,
    show_default=True,
    help="Refuse scans longer than this.",
)
@max_minutes_option
@executor_options
@plan_option
@maps_option
@json_option
@latex_tables
def census_cmd(
    map_spec,
    max_length,
    side,
    method,
    offsets,
    all_offsets,
    cert_path,
    store,
    no_store,
    workers,
    max_scan,
    max_minutes,
    executor,
    scheduler,
    plan_only,
    map_files,
    as_json,
):
    """All integer cycles of MAP with length at most K, certified complete."""
    # The API refuses K beyond the limit of the map, method or family
    # (check_census_length), in the option's name (cli/app.py).
    K = max_length

    kw = {
        "store": resolve_store(store, no_store),
        "workers": workers,
        "max_scan": max_scan,
        "method": method,
    }
    limit = parse_minutes(max_minutes)
    if "k" in map_spec.replace(" ", "").lower().split("x")[-1]:
        check_census_length(None, K)
        kw["max_minutes"] = limit
        _family(map_spec, offsets, K, side, all_offsets, cert_path, kw, as_json)
        return
    if offsets is not None:
        raise BadInput("--offsets applies to a family template such as 3x+k")
    m = resolve_map(map_spec, map_files)
    check_census_length(m, K, method)
    # the certificate's path is checked before the census runs, not after it (census has
    # no --force: an existing certificate is never replaced)
    if cert_path and Path(cert_path).is_file():
        raise BadInput(
            f"--certificate {cert_path} exists; refusing to overwrite a certificate "
            "(choose another name)"
        )
    cert_file = check_output(cert_path, "--certificate")
    store_path = kw["store"]
    if cert_file is not None and isinstance(store_path, (str, os.PathLike)):
        s = Path(store_path)
        if s.resolve() == cert_file.resolve():
            raise BadInput("--certificate and --store name the same file")
    if plan_only:
        _plan(m, K, side, method, workers, max_scan, as_json)
        return

    def show_plan(plan) -> None:
        if plan.seconds < 1.0:
            return  # a short census starts at once; `--plan` shows it anyway
        for line in plan.lines():
            stderr_console().print(f"plan: {line}", highlight=False)

    c = with_progress(
        census,
        m,
        K,
        side=side,
        executor=executor,
        scheduler=scheduler,
        on_plan=show_plan,
        **kw,
    )
    if cert_path:
        write_certificate(c, cert_path)
    if as_json:
        emit_json({**c.to_dict(), "certificate": cert_path})
        return
    con = stdout_console()
    con.print(
        f"[bold]{m.label}[/bold]: cycles of length <= {K}, {' and '.join(c.sides)} side(s) (certified)"
    )
    for s, p in c.plans.items():
        if p.method == "bound-scan":
            ctype = f" at content {list(p.bound_content)}" if p.bound_content else ""
            con.print(
                f"  {s}: proved bound |min| <= {p.bound}{ctype}; scanned 1..{p.scan_to} exhaustively"
                + (f" (sign changes possible from |n| <= {p.crossing})" if p.crossing else "")
            )
        else:
            con.print(f"  {s}: itinerary method ({p.reason})")
    con.print(show_table(c.table()))
    con.print(c.statement())
    con.print(c.store_use.line(), highlight=False)
    if cert_path:
        con.print(f"certificate written to {cert_path}")


def _plan(m, K, side, method, workers, max_scan, as_json) -> None:
    plan = with_progress(plan_census, m, K, side=side, method=method, workers=workers)
    refused = any((p.scan_to or 0) > max_scan for p in plan.plans.values())
    if as_json:
        emit_json({**plan.to_dict(), "max_scan": max_scan, "refused": refused})
        return
    con = stdout_console()
    for line in plan.lines():
        con.print(line, highlight=False)
    if refused:
        con.print(
            f"beyond --max-scan {max_scan:,}: the census would be refused here; raise --max-scan "
            "or use --executor dask --scheduler ADDRESS",
            highlight=False,
        )


def _family(template, ks, K, side, all_offsets, cert_path, kw, as_json):
    try:
        parse_family(template)
    except Exception as exc:
        raise BadInput(str(exc)) from None
    if ks is None:
        raise BadInput("a family needs --offsets, e.g. --offsets 1..200")
    if cert_path:
        raise BadInput(
            "--certificate is for a single map; run the census of one member to certify it"
        )
    fam = with_progress(
        census_family,
        template,
        ks,
        K,
        side=side,
        all_k=all_offsets,
        **kw,
    )
    if as_json:
        emit_json(fam.to_dict())
        return
    con = stdout_console()
    con.print(show_table(fam.table()))
    con.print(fam.store_use.line(), highlight=False)


COMMANDS = [census_cmd]
