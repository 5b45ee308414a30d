"""TOML map files: user-defined maps, one table per map.

Inside
------
- :func:`load_map_file` -- read a file into a list of :class:`~maps.model.Map`.
- :func:`maps_from_toml_data` -- the same from already-parsed data (studies
  use it for inline definitions).
- :func:`user_map_files` -- the files found in the user's config directory.

Schema
------
Each top-level table is a map; its key is the default name::

    [tri]
    description = "n/3, (4n-1)/3, (4n+1)/3"
    aliases = ["t3"]
    divisor = 3
    branches.0 = { multiplier = 1, offset = 0 }
    branches.1 = { multiplier = 4, offset = -1 }
    branches.2 = { multiplier = 4, offset = 1 }

    [seven]
    shorthand = "7x+1"        # instead of divisor/branches
    undivided = false         # optional, shorthand only

Errors name the file, the map and the key.
"""

from __future__ import annotations

import os
import sys
from collections.abc import Mapping
from pathlib import Path

from .model import Map, MapError
from .shorthand import parse_shorthand

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover
    import tomli as tomllib

__all__ = ["load_map_file", "maps_from_toml_data", "user_map_files", "user_config_dir"]

_MAP_KEYS = {
    "name",
    "description",
    "aliases",
    "divisor",
    "branches",
    "shorthand",
    "undivided",
    "reference",
}


def user_config_dir() -> Path:
    """``$CYCLEWRIGHT_CONFIG_DIR`` if set, else the platform's config directory for cyclewright."""
    env = os.environ.get("CYCLEWRIGHT_CONFIG_DIR")
    if env:
        return Path(env)
    import platformdirs

    return Path(platformdirs.user_config_dir("cyclewright"))


def user_map_files() -> list[Path]:
    """``maps.toml`` and every ``maps/*.toml`` in the user's config directory, sorted."""
    base = user_config_dir()
    found = []
    if (base / "maps.toml").is_file():
        found.append(base / "maps.toml")
    if (base / "maps").is_dir():
        found.extend(sorted(p for p in (base / "maps").glob("*.toml") if p.is_file()))
    return found


def load_map_file(path: str | os.PathLike) -> list[Map]:
    """Read a TOML map file.

    Parameters
    ----------
    path : path-like
        The file.

    Returns
    -------
    list of Map
        In file order, with ``source = "file:PATH"``.

    Raises
    ------
    MapError
        Unreadable file, invalid TOML, or an invalid map (the message names
        the file, the map and the key).
    """
    p = Path(path)
    try:
        raw = p.read_bytes()
    except OSError as exc:
        raise MapError(f"{p}: cannot read map file ({exc.strerror or exc})") from None
    try:
        data = tomllib.loads(raw.decode("utf-8"))
    except UnicodeDecodeError:
        raise MapError(f"{p}: not a UTF-8 text file") from None
    except tomllib.TOMLDecodeError as exc:
        raise MapError(f"{p}: not valid TOML: {exc}") from None
    return maps_from_toml_data(data, origin=str(p), source=f"file:{p}")


def maps_from_toml_data(data: Mapping, *, origin: str, source: str) -> list[Map]:
    """Build maps from parsed TOML: ``{map_key: {divisor, branches, ...}, ...}``."""
    if not data:
        raise MapError(f"{origin}: no map tables found")
    result = []
    for key, table in data.items():
        result.append(map_from_table(key, table, origin=origin, source=source))
    return result


def map_from_table(key: str, table: object, *, origin: str, source: str) -> Map:
    """One map from its table; errors read ``FILE: map 'KEY': key 'FIELD': problem``."""
    where = f"{origin}: map {key!r}"
    if not isinstance(table, Mapping):
        raise MapError(f"{where}: must be a table with divisor and branches (or shorthand)")
    unknown = sorted(set(table) - _MAP_KEYS)
    if unknown:
        raise MapError(
            f"{where}: key {unknown[0]!r}: unknown key (allowed: {', '.join(sorted(_MAP_KEYS))})"
        )
    name = table.get("name", key)
    if not isinstance(name, str) or not name.strip():
        raise MapError(f"{where}: key 'name': must be a non-empty string")
    description = table.get("description", "")
    if not isinstance(description, str):
        raise MapError(f"{where}: key 'description': must be a string")
    reference = table.get("reference", "")
    if not isinstance(reference, str):
        raise MapError(f"{where}: key 'reference': must be a string")
    aliases = table.get("aliases", [])
    if not isinstance(aliases, list) or not all(isinstance(a, str) and a.strip() for a in aliases):
        raise MapError(f"{where}: key 'aliases': must be a list of non-empty strings")
    undivided = table.get("undivided", False)
    if not isinstance(undivided, bool):
        raise MapError(f"{where}: key 'undivided': must be true or false")

    if "shorthand" in table:
        if "divisor" in table or "branches" in table:
            raise MapError(
                f"{where}: key 'shorthand': give either shorthand or divisor/branches, not both"
            )
        text = table["shorthand"]
        if not isinstance(text, str):
            raise MapError(f"{where}: key 'shorthand': must be a string like \"3x+1\"")
        try:
            base = parse_shorthand(text, undivided=undivided)
        except MapError as exc:
            raise MapError(f"{where}: key 'shorthand': {exc}") from None
        return Map(
            base.divisor,
            base.branches,
            name=name,
            description=description or base.description,
            aliases=tuple(aliases),
            source=source,
            reference=reference,
            undivided=undivided,
        )

    if undivided:
        raise MapError(f"{where}: key 'undivided': only applies together with shorthand")
    if "divisor" not in table:
        raise MapError(f"{where}: key 'divisor': missing")
    divisor = table["divisor"]
    if isinstance(divisor, bool) or not isinstance(divisor, int):
        raise MapError(f"{where}: key 'divisor': must be an integer, got {divisor!r}")
    if divisor < 2:
        raise MapError(f"{where}: key 'divisor': must be at least 2, got {divisor}")
    branches_t = table.get("branches")
    if branches_t is None:
        raise MapError(f"{where}: key 'branches': missing")
    if not isinstance(branches_t, Mapping):
        raise MapError(
            f"{where}: key 'branches': must be a table keyed by residue 0..{divisor - 1}"
        )
    branches = {}
    for rkey, br in branches_t.items():
        try:
            r = int(rkey)
        except ValueError:
            raise MapError(
                f"{where}: key 'branches.{rkey}': residues are integers 0..{divisor - 1}"
            ) from None
        if not 0 <= r < divisor:
            raise MapError(f"{where}: key 'branches.{rkey}': residue out of range 0..{divisor - 1}")
        if not isinstance(br, Mapping):
            raise MapError(
                f"{where}: key 'branches.{rkey}': must be a table with multiplier and offset"
            )
        extra = sorted(set(br) - {"multiplier", "offset"})
        if extra:
            raise MapError(
                f"{where}: key 'branches.{rkey}.{extra[0]}': unknown key (allowed: multiplier, offset)"
            )
        vals = []
        for field in ("multiplier", "offset"):
            if field not in br:
                raise MapError(f"{where}: key 'branches.{rkey}.{field}': missing")
            v = br[field]
            if isinstance(v, bool) or not isinstance(v, int):
                raise MapError(
                    f"{where}: key 'branches.{rkey}.{field}': must be an integer, got {v!r}"
                )
            vals.append(v)
        branches[r] = tuple(vals)
    missing = [r for r in range(divisor) if r not in branches]
    if missing:
        raise MapError(
            f"{where}: key 'branches': divisor {divisor} needs a branch for every residue; "
            f"missing: {', '.join(map(str, missing))}"
        )
    try:
        return Map(
            divisor,
            [branches[r] for r in range(divisor)],
            name=name,
            description=description,
            aliases=tuple(aliases),
            source=source,
            reference=reference,
        )
    except MapError as exc:
        msg = str(exc)
        field = "branches"
        if msg.startswith("branch "):
            field = "branches." + msg.split(":")[0].split()[1]
        raise MapError(f"{where}: key {field!r}: {msg}") from None
