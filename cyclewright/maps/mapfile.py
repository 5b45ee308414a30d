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

    [my-3x+1]
    name = "3x+1"             # a name the catalog already has ...
    shorthand = "3x+3"
    override = true           # ... is taken over only with this opt-in

Errors name the file, the map and the key.

Limits
------
A map file has at most :data:`MAX_MAP_FILE_BYTES` bytes and
:data:`MAX_MAPS_PER_FILE` maps; integers in it have at most 4300 digits
(Python's own limit on reading integers from text, kept while a file is
parsed, see :func:`parsing_digit_limit`); nesting deeper than Python can
follow is refused. Loading takes time linear in the number of maps.
"""

from __future__ import annotations

import contextlib
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

__all__ = [
    "load_map_file",
    "maps_from_toml_data",
    "user_map_files",
    "user_config_dir",
    "parsing_digit_limit",
    "read_limited",
    "MAX_MAP_FILE_BYTES",
    "MAX_MAPS_PER_FILE",
    "PARSE_DIGIT_LIMIT",
    "digits_problem",
    "parse_toml",
]

#: Largest map file read (bytes); a file of 10^5 maps in shorthand form is about 4 MB.
MAX_MAP_FILE_BYTES = 16 * 2**20

#: Most maps one file may define.
MAX_MAPS_PER_FILE = 100_000

#: Integers read from files have at most this many digits (Python's default limit).
PARSE_DIGIT_LIMIT = 4300


@contextlib.contextmanager
def parsing_digit_limit(limit: int = PARSE_DIGIT_LIMIT):
    """Parse text from a file with Python's limit on integer digits in place.

    Reading a decimal integer of ``n`` digits takes time quadratic in ``n``; the
    command line lifts the limit for its own output, so every reader of
    untrusted files (map files, studies, certificates) parses inside this.
    """
    get = getattr(sys, "get_int_max_str_digits", None)
    if get is None:  # pragma: no cover - Python without the limit
        yield
        return
    old = get()
    sys.set_int_max_str_digits(limit)
    try:
        yield
    finally:
        sys.set_int_max_str_digits(old)


def read_limited(
    path: str | os.PathLike, max_bytes: int, what: str, error: type[Exception] = ValueError
) -> bytes:
    """The bytes of the file ``path`` (a ``what``), refused beyond ``max_bytes``.

    The size is checked before reading, so a huge file costs nothing. A
    directory, an unreadable file or one too large raises ``error`` with one
    line naming the file (the map files, study files and certificates alike).
    """
    p = Path(path)
    if p.is_dir():
        raise error(f"{p}: is a directory, not a {what}")
    if p.exists() and not p.is_file():  # a pipe or a device: opening may wait forever
        raise error(f"{p}: is not a regular file, not a {what}")
    try:
        with open(p, "rb") as fh:
            size = os.fstat(fh.fileno()).st_size
            if size > max_bytes:
                raise error(f"{p}: the {what} has {size} bytes; at most {max_bytes} are read")
            data = fh.read(max_bytes + 1)
    except OSError as exc:
        raise error(f"{p}: cannot read {what} ({exc.strerror or exc})") from None
    if len(data) > max_bytes:
        raise error(f"{p}: the {what} is larger than {max_bytes} bytes")
    return data


_MAP_KEYS = {
    "name",
    "description",
    "aliases",
    "divisor",
    "branches",
    "shorthand",
    "undivided",
    "reference",
    "override",
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
    raw = read_limited(p, MAX_MAP_FILE_BYTES, "map file", MapError)
    data = parse_toml(raw, str(p), "map file", MapError)
    return maps_from_toml_data(data, origin=str(p), source=f"file:{p}")


def parse_toml(raw: bytes, origin: str, what: str, error: type[Exception]) -> dict:
    """Parse TOML from an untrusted file; every failure is one ``error(...)`` line."""
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError:
        raise error(f"{origin}: not a UTF-8 text file") from None
    try:
        with parsing_digit_limit():
            return tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise error(f"{origin}: not valid TOML: {exc}") from None
    except RecursionError:
        raise error(f"{origin}: the {what} is nested too deeply to read") from None
    except ValueError as exc:  # an integer beyond the digit limit
        raise error(f"{origin}: not a usable {what}: {digits_problem(exc)}") from None


def digits_problem(exc: ValueError) -> str:
    """Python's complaint about a too-long integer, said in one short sentence.

    >>> digits_problem(ValueError("Exceeds the limit (4300 digits) for integer string "
    ...                           "conversion: value has 5000 digits; use sys.set_int_max_str_digits()"))
    'an integer has 5000 digits; at most 4300 are read'
    """
    import re

    m = re.search(r"value has (\d+) digits", str(exc))
    has = f"has {m.group(1)} digits" if m else "is too long"
    return f"an integer {has}; at most {PARSE_DIGIT_LIMIT} are read"


def maps_from_toml_data(data: Mapping, *, origin: str, source: str) -> list[Map]:
    """Build maps from parsed TOML: ``{map_key: {divisor, branches, ...}, ...}``."""
    if not isinstance(data, Mapping):
        raise MapError(f"{origin}: must be a table of maps, got {type(data).__name__}")
    if not data:
        raise MapError(f"{origin}: no map tables found")
    if len(data) > MAX_MAPS_PER_FILE:
        raise MapError(
            f"{origin}: {len(data)} maps; a file defines at most {MAX_MAPS_PER_FILE} "
            "(split it into several files)"
        )
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
    override = table.get("override", False)
    if not isinstance(override, bool):
        raise MapError(f"{where}: key 'override': must be true or false")
    if not isinstance(key, str) or len(key) > 200 or len(name) > 200:
        raise MapError(f"{where}: names have at most 200 characters")
    meta = {"override": True} if override else {}

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
            **meta,
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
    if divisor > len(branches_t):
        given = {str(k).strip() for k in branches_t}
        scan_to = min(divisor, len(branches_t) + 10)
        missing = [str(r) for r in range(scan_to) if str(r) not in given][:10]
        more = ", ..." if divisor > scan_to or len(missing) == 10 else ""
        raise MapError(
            f"{where}: key 'branches': divisor {divisor} needs a branch for every residue; "
            f"missing: {', '.join(missing)}{more}"
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
            **meta,
        )
    except MapError as exc:
        msg = str(exc)
        field = "branches"
        if msg.startswith("branch "):
            field = "branches." + msg.split(":")[0].split()[1]
        raise MapError(f"{where}: key {field!r}: {msg}") from None
