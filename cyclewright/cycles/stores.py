"""The results stores on this machine: list them (both kinds) and remove them.

Inside
------
- :func:`stores` -- every results store of a directory (default: the user
  data directory's), or one store file, with the sieve table cache: a
  :class:`StoresListing`.
- :class:`StoresListing` -- the stores (:class:`StoredResults`, one per
  file) with :meth:`~StoresListing.table` (kind, map, what is covered,
  size, age, checks, file), :meth:`~StoresListing.overview` (one row per
  kind) and :meth:`~StoresListing.to_dict` (the ``--json`` view); it shows
  as HTML in Jupyter and converts to pandas (:class:`~.presentation.Presentable`).
- :func:`store_kind` -- ``"scan"`` or ``"records"`` for a file, from its content.
- :func:`remove_results_store` -- delete one store of either kind, refusing a
  file that is not a store and a store another process is using.

Two kinds of store share the directory, one file each per map definition:
the scan's (``<key prefix>.sqlite``, :mod:`cyclewright.cycles.scan.store`)
and the records' (``<key prefix>-records.db``,
:mod:`cyclewright.cycles.records_store`). Listing reads without writing;
the *checks* column says what was checked: a scan store's header and schema,
a records store's checksum of every chunk.
"""

from __future__ import annotations

import os
import sqlite3
import time
from dataclasses import dataclass, field
from pathlib import Path

from .errors import StoreError
from .presentation import Presentable, Table

__all__ = [
    "stores",
    "StoresListing",
    "StoredResults",
    "store_kind",
    "remove_results_store",
    "size_text",
]

KINDS = ("scan", "records")


def size_text(n: float) -> str:
    """Bytes in binary units (the cache limit is given the same way: 512M = 512 MiB).

    >>> size_text(512), size_text(3 * 1024**2)
    ('512 B', '3.0 MiB')
    """
    if n < 1024:
        return f"{n:,.0f} B"
    for unit in ("KiB", "MiB", "GiB", "TiB"):
        n /= 1024
        if n < 1024 or unit == "TiB":
            return f"{n:,.1f} {unit}"
    return f"{n}"  # pragma: no cover


def _age(t: float, now: float) -> str:
    s = max(0.0, now - t)
    for unit, span in (("d", 86400), ("h", 3600), ("min", 60)):
        if s >= span:
            return f"{s / span:.0f} {unit}"
    return f"{s:.0f} s"


def _covered(parts: list[dict], scan: bool) -> str:
    out = []
    for s in parts:
        if not s.get("chunks_done"):
            continue
        if scan:
            cap = (
                f"length <= {s['max_cycle_length']}"
                if s.get("max_cycle_length")
                else f"cap {s['max_steps']}"
            )
        else:
            cap = f"cap {s['max_steps']}"
        out.append(
            f"{s['side']} {s['lowest']}..{s['highest']} ({s['starts_done']:,} starts, {cap})"
        )
    return "; ".join(out) or "-"


@dataclass(frozen=True)
class StoredResults:
    """One store file: its kind and what :func:`store_info`-style reading found.

    Attributes
    ----------
    kind : {"scan", "records"}
    info : dict
        ``path``, ``size``, ``modified`` and, when readable, ``map_label``,
        ``map_key``, ``formula`` and the ranges covered (``scans`` for a
        scan store, ``records`` for a records store); otherwise ``problem``.
    """

    kind: str
    info: dict

    @property
    def path(self) -> Path:
        return Path(self.info["path"])

    @property
    def map_text(self) -> str:
        what = self.info.get("map_label") or "?"
        if self.info.get("formula") and self.info["formula"] != what:
            what += f" = {self.info['formula']}"
        return what

    @property
    def covered(self) -> str:
        """The ranges of starts done, per side and configuration."""
        key = "scans" if self.kind == "scan" else "records"
        return _covered(self.info.get(key, []), self.kind == "scan")

    @property
    def checks(self) -> str:
        """What was checked on reading the store, and how it went."""
        i = self.info
        if self.kind == "scan":
            if i.get("problem"):
                return i["problem"]
            text = f"header and schema {i.get('schema_version')} ok"
            if i.get("runs_marked_running"):
                text += f"; {i['runs_marked_running']} runs marked running"
            return text
        if i.get("problem") and "chunks_checked" not in i:
            return i["problem"]
        n, bad = i.get("chunks_checked", 0), i.get("chunks_damaged", 0)
        text = (
            f"checksums of {n} chunk{'s' if n != 1 else ''} ok"
            if not bad
            else f"{bad} of {n} chunks damaged (recomputed when next used)"
        )
        if i.get("problem"):
            text = f"{i['problem']}; {text}"
        if i.get("users"):
            text += f"; open in {i['users']} process{'es' if i['users'] != 1 else ''}"
        return text

    def to_dict(self) -> dict:
        return {
            "kind": self.kind,
            **self.info,
            "covered": self.covered,
            "checks": self.checks,
        }


@dataclass(frozen=True)
class StoresListing(Presentable):
    """The stores of a directory (or one store file) and the sieve table cache.

    Attributes
    ----------
    entries : tuple of StoredResults
        Scan stores first, then records stores, each by file name.
    cache : dict
        The sieve table cache: ``files``, ``bytes``, ``limit``, ``path``.
    where : str
        The directory (or file) listed.
    now : float
        When it was listed (POSIX time; the ages are counted from it).
    """

    entries: tuple[StoredResults, ...]
    cache: dict = field(default_factory=dict)
    where: str = ""
    now: float = 0.0

    def of_kind(self, kind: str) -> list[StoredResults]:
        return [e for e in self.entries if e.kind == kind]

    def table(self) -> Table:
        """One row per store: kind, map, ranges covered, size, age, checks, file."""
        rows = tuple(
            (
                e.kind,
                e.map_text,
                e.covered,
                size_text(e.info["size"]),
                _age(e.info["modified"], self.now),
                e.checks,
                str(e.path),
            )
            for e in self.entries
        )
        return Table(
            "Results stores",
            ("kind", "map", "covered", "size", "age", "checks", "file"),
            rows,
            note=f"stores in {self.where}" if self.where else "",
        )

    def overview(self) -> Table:
        """One row per kind of store: how many, their size; and the sieve table cache."""
        rows = [
            (k, len(self.of_kind(k)), size_text(sum(e.info["size"] for e in self.of_kind(k))))
            for k in KINDS
        ]
        if self.cache:
            rows.append(("sieve table cache", self.cache["files"], size_text(self.cache["bytes"])))
        return Table("Stores and caches", ("what", "files", "size"), tuple(rows))

    def tables(self) -> list[Table]:
        return [self.overview(), self.table()]

    def cache_line(self) -> str:
        c = self.cache
        return (
            f"sieve table cache: {c['files']} files, {size_text(c['bytes'])} of "
            f"{size_text(c['limit'])} allowed ({c['path']})"
        )

    def to_dict(self) -> dict:
        """``stores`` (every store, its kind, ranges and checks) and ``cache``."""
        return {"stores": [e.to_dict() for e in self.entries], "cache": dict(self.cache)}


def store_kind(path: str | os.PathLike) -> str | None:
    """``"scan"``, ``"records"`` or None (not a cyclewright store), read without writing.

    >>> import tempfile, pathlib
    >>> f = pathlib.Path(tempfile.mkdtemp()) / "x.txt"
    >>> _ = f.write_text("hello")
    >>> store_kind(f) is None
    True
    """
    from .records_store import SUFFIX
    from .scan.store import _APPLICATION_ID

    p = Path(path)
    try:
        with open(p, "rb") as fh:
            if fh.read(16) != b"SQLite format 3\x00":
                return None
        conn = sqlite3.connect(p.resolve().as_uri() + "?mode=ro", uri=True, timeout=0.5)
    except (OSError, sqlite3.Error):
        return None
    try:
        if conn.execute("PRAGMA application_id").fetchone()[0] == _APPLICATION_ID:
            return "scan"
        row = conn.execute("SELECT value FROM meta WHERE key = 'format'").fetchone()
        if row and str(row[0]).startswith("records-"):
            return "records"
    except sqlite3.Error:
        # a damaged file: judged by its name
        return "records" if p.name.endswith(SUFFIX) else "scan" if p.suffix == ".sqlite" else None
    finally:
        conn.close()
    return None


def stores(where: str | os.PathLike | None = None) -> StoresListing:
    """Every results store of a directory, or one store file, with the sieve table cache.

    Parameters
    ----------
    where : path, optional
        A directory of stores (default: the stores' directory in the user
        data directory, ``$CYCLEWRIGHT_DATA_DIR`` overrides) or one store
        file (of either kind).

    Returns
    -------
    StoresListing
        Scan stores (``*.sqlite``) and records stores (``*-records.db``).

    Examples
    --------
    >>> import tempfile
    >>> from cyclewright.cycles.records import records
    >>> d = tempfile.mkdtemp()
    >>> _ = records("3x+1", 500, side="positive", store=d)
    >>> listing = stores(d)
    >>> [(e.kind, e.map_text, e.covered) for e in listing.entries]
    [('records', '3x+1', 'positive 1..500 (500 starts, cap 1000)')]
    >>> listing.entries[0].checks
    'checksums of 1 chunk ok'

    References
    ----------
    The SQLite database file format (sqlite.org/fileformat.html: the header
    and ``application_id`` that tell the kinds apart); the layouts of the two
    kinds in :mod:`cyclewright.cycles.scan.store` and
    :mod:`cyclewright.cycles.records_store`.
    """
    from .files import data_dir
    from .records_store import list_records_stores, records_store_info
    from .scan.sieve import cache_usage
    from .scan.store import list_stores, store_info

    now = time.time()
    if where is not None and not Path(where).is_dir() and not Path(where).is_file():
        if Path(where).exists():
            raise StoreError(f"{where} is not a cyclewright results store (not a regular file)")
        raise StoreError(f"no store and no directory at {where}")
    if where is not None and Path(where).is_file():
        kind = store_kind(where)
        if kind is None:
            raise StoreError(f"{where} is not a cyclewright results store")
        info = store_info(where) if kind == "scan" else records_store_info(where)
        entries: tuple = (StoredResults(kind, info),)
    else:
        entries = tuple(StoredResults("scan", i) for i in list_stores(where)) + tuple(
            StoredResults("records", i) for i in list_records_stores(where)
        )
    shown = str(where) if where is not None else str(data_dir() / "scans")
    return StoresListing(entries, cache_usage(), shown, now)


def remove_results_store(path: str | os.PathLike) -> int:
    """Delete one store of either kind unless a process is using it; the bytes freed.

    Raises
    ------
    StoreError
        The file is not a cyclewright store, or another process is using it
        (nothing is removed then).
    """
    from .records_store import remove_records_store
    from .scan.store import remove_store

    p = Path(path)
    if not p.is_file():
        raise StoreError(f"no store at {p}; nothing was removed")
    kind = store_kind(p)
    if kind == "records":
        return remove_records_store(p)
    if kind == "scan":
        return remove_store(p)
    raise StoreError(f"{p} is not a cyclewright results store; nothing was removed")
