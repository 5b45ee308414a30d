"""``cyclewright stores``: list and remove results stores and cached sieve tables."""

from __future__ import annotations

from pathlib import Path

import click

from ..errors import BadInput
from ..options import json_option, latex_tables, maps_option, resolve_map, store_option
from ..render import emit_json, show_table, stdout_console

_EPILOG = """\b
Examples:
  cyclewright stores list
  cyclewright stores list --json
  cyclewright stores list --latex
  cyclewright stores remove 3x+7
  cyclewright stores remove --store five.sqlite
  cyclewright stores list --store out/stores
  cyclewright stores remove --all --caches
\b
Stores live in the user data directory ($CYCLEWRIGHT_DATA_DIR overrides),
two kinds per map definition: the scan's (<key>.sqlite) and the records'
(<key>-records.db); every name of a map shares them, and remove MAP removes
both. Cached
sieve tables live in the user cache directory ($CYCLEWRIGHT_CACHE_DIR), bounded
by $CYCLEWRIGHT_CACHE_LIMIT.
"""


@click.group("stores", epilog=_EPILOG)
def stores_group() -> None:
    """Results stores and cached tables on this machine: list them, remove them."""


@stores_group.command("list", epilog=_EPILOG)
@store_option
@json_option
@latex_tables
def list_cmd(store, as_json: bool) -> None:
    """Every store (kind, map, ranges covered, size, age, checks) and the sieve table cache."""
    from cyclewright.cycles.errors import StoreError
    from cyclewright.cycles.stores import stores

    try:
        listing = stores(store)
    except StoreError as exc:
        raise BadInput(str(exc)) from None
    if as_json:
        emit_json(listing.to_dict())
        return
    con = stdout_console()
    if listing.entries:
        con.print(show_table(listing.table()))
    else:
        con.print("No results stores.")
    con.print(listing.cache_line())


@stores_group.command("remove", epilog=_EPILOG)
@click.argument("map_specs", metavar="[MAP]...", nargs=-1)
@store_option
@click.option("--all", "everything", is_flag=True, help="Every store in the user data directory.")
@click.option("--caches", is_flag=True, help="Also empty the sieve table cache.")
@maps_option
@json_option
def remove_cmd(map_specs, store, everything: bool, caches: bool, map_files, as_json: bool) -> None:
    """Remove the stores (scan and records) of each MAP, or --store PATH, or --all; never one in use."""
    from cyclewright.cycles.errors import StoreError
    from cyclewright.cycles.records_store import default_records_path
    from cyclewright.cycles.scan.sieve import clear_cache
    from cyclewright.cycles.scan.store import default_store_path
    from cyclewright.cycles.stores import remove_results_store, store_kind, stores

    paths, skipped = [], []

    def every_store(where=None) -> list[Path]:
        """The stores of a directory; other files there (not stores) are left alone."""
        found = [e.path for e in stores(where).entries]
        skipped.extend(p for p in found if store_kind(p) is None)
        return [p for p in found if store_kind(p) is not None]

    if everything:
        paths.extend(every_store())
    for spec in map_specs:
        m = resolve_map(spec, map_files)
        found = [p for p in (default_store_path(m), default_records_path(m)) if p.exists()]
        if not found:
            raise BadInput(
                f"{spec} has no store ({default_store_path(m)} and its records store "
                f"{default_records_path(m).name} do not exist); nothing was removed"
            )
        paths.extend(found)
    if store is not None:
        if Path(store).is_dir():  # a directory of stores: every store in it
            paths.extend(every_store(store))
        elif Path(store).is_file():
            paths.append(Path(store))
        else:
            raise BadInput(f"no store at {store}; nothing was removed")
    if not paths and not caches and not skipped:
        raise BadInput("say what to remove: MAP..., --store PATH, --all or --caches")
    paths = list(dict.fromkeys(paths))
    # every file is checked before any is removed: a wrong path removes nothing
    for p in paths:
        if store_kind(p) is None:
            raise BadInput(f"{p} is not a cyclewright results store; nothing was removed")
    removed, freed = [], 0
    for p in paths:
        try:
            freed += remove_results_store(p)
        except StoreError as exc:
            if removed:
                raise BadInput(f"{exc} (removed before it: {', '.join(removed)})") from None
            raise
        removed.append(str(p))
    cache_freed = clear_cache() if caches else 0
    if as_json:
        emit_json(
            {
                "removed": removed,
                "bytes_freed": freed,
                "cache_bytes_freed": cache_freed,
                "skipped_not_stores": [str(p) for p in skipped],
            }
        )
        return
    con = stdout_console()
    from cyclewright.cycles.stores import size_text

    for p in removed:
        con.print(f"removed {p}", markup=False, highlight=False)
    for p in skipped:
        con.print(f"left {p}: not a cyclewright results store", markup=False, highlight=False)
    if caches:
        con.print(f"sieve table cache emptied ({size_text(cache_freed)} freed)")
    con.print(
        f"{len(removed)} store{'s' if len(removed) != 1 else ''} removed, {size_text(freed)} freed"
    )


COMMANDS = [stores_group]
# the group's own arguments are subcommand names: click parses the options of
# each subcommand itself (the subcommands read a map such as -3x+1, see app.py)
stores_group._minus_ok = True
