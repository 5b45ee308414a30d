"""The store of :func:`cyclewright.cycles.records.records`: finished chunks, checksummed.

Inside
------
- :class:`RecordsStore` -- one SQLite file per map definition (keyed on the
  map's canonical hash, like the scan's store): every finished chunk of a
  records run, with a SHA-256 checksum, so that an interrupted run resumes
  and a repeated run reuses what is done.
- :func:`default_records_path` -- where a map's records store lives.

Layout
------
``meta``
    ``format``, ``map_key`` (SHA-256 of the canonical definition),
    ``map_label``.
``chunks``
    One row per chunk: the configuration (side and step cap), ``lo``,
    ``hi``, the chunk's figures as compressed JSON, and a SHA-256 checksum of
    the configuration, the range and the figures.

A row is read back only when its checksum matches and its figures add up
(resolved + unresolved = the chunk's starts, the distributions count the
resolved starts, the basins too); any other row is *damaged*: it is counted,
recomputed and overwritten, never reported. A file that is not a records
store of this map is refused untouched (:class:`~cyclewright.cycles.errors.StoreError`).
Each chunk is written in its own transaction, so a process killed at any
moment leaves whole chunks only.

The scan's store (:mod:`cyclewright.cycles.scan.store`) is a separate file;
the records of a map sit beside it (``<key prefix>-records.db``).
"""

from __future__ import annotations

import hashlib
import json
import sqlite3
import zlib
from pathlib import Path

from cyclewright.maps import Map
from cyclewright.maps.registry import as_map

from .errors import Name, StoreError
from .files import data_dir

__all__ = ["RecordsStore", "default_records_path", "FORMAT"]

#: Version of the stored figures; a store of another format is refused.
FORMAT = "records-1"
_TIMEOUT = 60.0


def default_records_path(m: Map | str) -> Path:
    """``<data dir>/scans/<key prefix>-records.db``: beside the map's scan store.

    >>> from cyclewright import maps
    >>> default_records_path(maps.get("3x+1")).name
    'f477e91227842caa-records.db'
    """
    m = as_map(m)
    return data_dir() / "scans" / f"{m.key[:16]}-records.db"


def records_path_for(store, m: Map) -> Path | None:
    """The records store for the ``store`` argument of the API (None, False or a path).

    None: :func:`default_records_path`; False: no store; a directory: the
    file of this map inside it; a file name: the records file beside it.
    """
    if store is False:
        return None
    if store is None:
        return default_records_path(m)
    if not isinstance(store, (str, Path)):
        raise StoreError(f"store must be a path, None (default) or False, got {store!r}")
    p = Path(store)
    if p.is_dir():
        return p / default_records_path(m).name
    if p.name.endswith("-records.db"):
        return p
    return p.with_name(f"{p.stem}-records.db")


class RecordsStore:
    """Finished chunks of records runs of one map (see the module docstring).

    Parameters
    ----------
    path : path
        The SQLite file (created, with its directory, when missing).
    m : Map
        The map; a store of another map definition is refused.
    """

    def __init__(self, path: str | Path, m: Map):
        self.path = Path(path)
        self.map = m
        self.damaged = 0
        existed = self.path.exists()
        try:
            self.path.parent.mkdir(parents=True, exist_ok=True)
            self.conn = sqlite3.connect(str(self.path), timeout=_TIMEOUT, isolation_level=None)
        except (OSError, sqlite3.Error) as exc:
            raise StoreError(f"records store {self.path}: cannot open ({exc})") from None
        try:
            if existed:
                self._validate()
            else:
                self._create()
        except sqlite3.DatabaseError as exc:
            self.conn.close()
            raise StoreError.of(
                f"records store {self.path}: not a records store or corrupt ({exc}); "
                "move it away or give another ",
                Name("store"),
            ) from None
        except StoreError:
            self.conn.close()
            raise

    def _create(self) -> None:
        c = self.conn
        c.execute("BEGIN IMMEDIATE")
        c.execute("CREATE TABLE IF NOT EXISTS meta (key TEXT PRIMARY KEY, value TEXT NOT NULL)")
        c.execute(
            "CREATE TABLE IF NOT EXISTS chunks (config TEXT NOT NULL, lo INTEGER NOT NULL, "
            "hi INTEGER NOT NULL, figures BLOB NOT NULL, checksum TEXT NOT NULL, "
            "PRIMARY KEY (config, lo, hi))"
        )
        for k, v in (("format", FORMAT), ("map_key", self.map.key), ("map_label", self.map.label)):
            c.execute("INSERT OR IGNORE INTO meta VALUES (?, ?)", (k, v))
        c.execute("COMMIT")
        self._validate()

    def _validate(self) -> None:
        meta = dict(self.conn.execute("SELECT key, value FROM meta").fetchall())
        if meta.get("format") != FORMAT:
            raise StoreError.of(
                f"records store {self.path} has format {meta.get('format')!r}, "
                f"this version reads {FORMAT!r}; give another ",
                Name("store"),
            )
        if meta.get("map_key") != self.map.key:
            raise StoreError.of(
                f"records store {self.path} holds records of {meta.get('map_label')}, "
                f"not of {self.map.label}; give another ",
                Name("store"),
            )

    @staticmethod
    def config(side: str, max_steps: int) -> str:
        """The key of a configuration: what a chunk's figures depend on besides its range."""
        return f"side={side};max_steps={max_steps}"

    @staticmethod
    def _digest(config: str, lo: int, hi: int, blob: bytes) -> str:
        h = hashlib.sha256()
        h.update(f"{FORMAT}|{config}|{lo}|{hi}|".encode())
        h.update(blob)
        return h.hexdigest()

    def get(self, config: str, lo: int, hi: int) -> dict | None:
        """The stored figures of a chunk, or None (missing or damaged: then counted)."""
        try:
            row = self.conn.execute(
                "SELECT figures, checksum FROM chunks WHERE config = ? AND lo = ? AND hi = ?",
                (config, lo, hi),
            ).fetchone()
        except sqlite3.DatabaseError as exc:
            raise StoreError(f"records store {self.path}: cannot read ({exc})") from None
        if row is None:
            return None
        blob, checksum = row
        try:
            if not isinstance(blob, bytes) or self._digest(config, lo, hi, blob) != checksum:
                raise ValueError("checksum")
            figures = json.loads(zlib.decompress(blob))
            if not _consistent(figures, lo, hi):
                raise ValueError("figures do not add up")
        except (ValueError, zlib.error, TypeError, KeyError):
            self.damaged += 1
            return None
        return figures

    def put(self, config: str, lo: int, hi: int, figures: dict) -> None:
        """Store a finished chunk (one transaction; an older row of it is replaced)."""
        blob = zlib.compress(json.dumps(figures, separators=(",", ":")).encode(), 6)
        try:
            self.conn.execute(
                "INSERT OR REPLACE INTO chunks VALUES (?, ?, ?, ?, ?)",
                (config, lo, hi, blob, self._digest(config, lo, hi, blob)),
            )
        except sqlite3.Error as exc:
            raise StoreError(f"records store {self.path}: cannot write ({exc})") from None

    def close(self) -> None:
        self.conn.close()

    def __enter__(self) -> RecordsStore:
        return self

    def __exit__(self, *exc) -> None:
        self.close()


def _consistent(f: dict, lo: int, hi: int) -> bool:
    """The checks a stored chunk must pass besides its checksum."""
    sums = f["sums"]
    resolved, unresolved = sums[0], sums[1]
    if min(sums) < 0 or resolved + unresolved != hi - lo + 1:
        return False
    if sum(f["basins"].values()) != resolved:
        return False
    if sum(f["hist"][0].values()) != resolved:
        return False
    if sum(f["hist"][2].values()) + sums[3] != resolved:
        return False
    listed = f["unresolved_first"]
    return len(listed) <= unresolved and all(lo <= s <= hi for s in listed)
