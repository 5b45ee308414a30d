"""``cyclewright stores``: list and remove results stores and cached sieve tables."""

from __future__ import annotations

import time
from pathlib import Path

import click

from ..errors import BadInput
from ..options import json_option, latex_tables, maps_option, resolve_map, store_option
from ..render import emit_json, make_table, stdout_console

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
one file per map definition; every name of a map shares its store. Cached
sieve tables live in the user cache directory ($CYCLEWRIGHT_CACHE_DIR), bounded
by $CYCLEWRIGHT_CACHE_LIMIT.
"""


def _size(n: float) -> str:
    """Bytes in binary units (the cache limit is given the same way: 512M = 512 MiB)."""
    if n < 1024:
        return f"{n:,.0f} B"
    for unit in ("KiB", "MiB", "GiB", "TiB"):
        n /= 1024
        if n < 1024 or unit == "TiB":
            return f"{n:,.1f} {unit}"
    return f"{n}"  # pragma: no cover


def _age(t: float) -> str:
    s = max(0.0, time.time() - t)
    for unit, span in (("d", 86400), ("h", 3600), ("min", 60)):
        if s >= span:
            return f"{s / span:.0f} {unit}"
    return f"{s:.0f} s"


def _ranges(info: dict) -> str:
    parts = []
    for s in info.get("scans", ()):
        if not s["chunks_done"]:
            continue
        cap = (
            f"length <= {s['max_cycle_length']}"
            if s["max_cycle_length"]
            else f"cap {s['max_steps']}"
        )
        parts.append(
            f"{s['side']} {s['lowest']}..{s['highest']} ({s['starts_done']:,} starts, {cap})"
        )
    return "; ".join(parts) or "-"


@click.group("stores", epilog=_EPILOG)
def stores_group() -> None:
    """Results stores and cached tables on this machine: list them, remove them."""


@stores_group.command("list", epilog=_EPILOG)
@store_option
@json_option
@latex_tables
def list_cmd(store, as_json: bool) -> None:
    """Every store (map, ranges scanned, size, age) and the sieve table cache."""
    from cyclewright.cycles.scan.sieve import cache_usage
    from cyclewright.cycles.scan.store import list_stores, store_info

    if store is not None and Path(store).is_file():
        infos = [store_info(store)]
    else:
        infos = list_stores(store)
    cache = cache_usage()
    if as_json:
        emit_json({"stores": infos, "cache": cache})
        return
    con = stdout_console()
    rows = []
    for i in infos:
        what = i.get("map_label") or "?"
        if i.get("formula") and i["formula"] != what:
            what += f" = {i['formula']}"
        rows.append(
            [
                what,
                i.get("problem") or _ranges(i),
                _size(i["size"]),
                _age(i["modified"]),
                i["path"],
            ]
        )
    if rows:
        con.print(make_table("Results stores", ["map", "scanned", "size", "age", "file"], rows))
    else:
        con.print("No results stores.")
    con.print(
        f"sieve table cache: {cache['files']} files, {_size(cache['bytes'])} of "
        f"{_size(cache['limit'])} allowed ({cache['path']})"
    )


@stores_group.command("remove", epilog=_EPILOG)
@click.argument("map_specs", metavar="[MAP]...", nargs=-1)
@store_option
@click.option("--all", "everything", is_flag=True, help="Every store in the user data directory.")
@click.option("--caches", is_flag=True, help="Also empty the sieve table cache.")
@maps_option
@json_option
def remove_cmd(map_specs, store, everything: bool, caches: bool, map_files, as_json: bool) -> None:
    """Remove the default store of each MAP (or --store PATH, or --all); never a store in use."""
    from cyclewright.cycles.scan.sieve import clear_cache
    from cyclewright.cycles.scan.store import default_store_path, list_stores, remove_store

    paths = []
    if everything:
        paths.extend(Path(i["path"]) for i in list_stores())
    for spec in map_specs:
        p = default_store_path(resolve_map(spec, map_files))
        if not p.exists():
            raise BadInput(f"{spec} has no store ({p} does not exist); nothing was removed")
        paths.append(p)
    if store is not None:
        if Path(store).is_dir():  # a directory of stores: every store in it
            paths.extend(Path(i["path"]) for i in list_stores(store))
        elif Path(store).is_file():
            paths.append(Path(store))
        else:
            raise BadInput(f"no store at {store}; nothing was removed")
    if not paths and not caches:
        raise BadInput("say what to remove: MAP..., --store PATH, --all or --caches")
    removed, freed = [], 0
    for p in dict.fromkeys(paths):
        freed += remove_store(p)
        removed.append(str(p))
    cache_freed = clear_cache() if caches else 0
    if as_json:
        emit_json({"removed": removed, "bytes_freed": freed, "cache_bytes_freed": cache_freed})
        return
    con = stdout_console()
    for p in removed:
        con.print(f"removed {p}", markup=False, highlight=False)
    if caches:
        con.print(f"sieve table cache emptied ({_size(cache_freed)} freed)")
    con.print(
        f"{len(removed)} store{'s' if len(removed) != 1 else ''} removed, {_size(freed)} freed"
    )


COMMANDS = [stores_group]
# the group's own arguments are subcommand names: click parses the options of
# each subcommand itself (a map starting with "-" goes after "--")
stores_group._minus_ok = True
