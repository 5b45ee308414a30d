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
    ``map_label``, ``map_definition`` (canonical JSON; stores written
    before it was added lack it).
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

``users``
    One row per process that has the store open (process id and host), so
    that :func:`remove_records_store` never deletes a store in use; a row
    of a process that died is ignored.

The scan's store (:mod:`cyclewright.cycles.scan.store`) is a separate file;
the records of a map sit beside it (``<key prefix>-records.db``).
:func:`records_store_info` and :func:`list_records_stores` read stores
without writing (for ``cyclewright stores list``, through
:func:`cyclewright.cycles.stores.stores`); :func:`remove_records_store`
deletes one.
"""

from __future__ import annotations

import hashlib
import json
import os
import socket
import sqlite3
import zlib
from pathlib import Path

from cyclewright.maps import Map
from cyclewright.maps.registry import as_map

from .errors import Name, StoreError
from .files import data_dir, open_store_readonly, remove_sqlite_store

__all__ = [
    "RecordsStore",
    "default_records_path",
    "records_store_info",
    "list_records_stores",
    "remove_records_store",
    "FORMAT",
    "SUFFIX",
]

#: Version of the stored figures; a store of another format is refused.
FORMAT = "records-1"
_TIMEOUT = 60.0
#: The end of a records store's file name (``<key prefix>-records.db``).
SUFFIX = "-records.db"
_HEADER = b"SQLite format 3\x00"


def default_records_path(m: Map | str) -> Path:
    """``<data dir>/scans/<key prefix>-records.db``: beside the map's scan store.

    >>> from cyclewright import maps
    >>> default_records_path(maps.get("3x+1")).name
    'f477e91227842caa-records.db'
    """
    m = as_map(m)
    return data_dir() / "scans" / f"{m.key[:16]}{SUFFIX}"


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
    if p.name.endswith(SUFFIX):
        return p  # an existing one is checked when opened (RecordsStore)
    if p.exists() or p.is_symlink():
        _check_scan_store(p, m)
    return p.with_name(f"{p.stem}{SUFFIX}")


def _named(m: Map) -> str:
    f = m.formula()
    return m.label if f == m.label else f"{m.label} = {f}"


def _check_scan_store(p: Path, m: Map) -> None:
    """Refuse an existing ``store`` file that is not a scan store of ``m``.

    The records store is named after the file, so a file that is no store
    (a map file, a picture) or a scan store of another map would otherwise
    be taken silently. Read only: nothing is written.
    """
    from .scan.store import store_info

    def refuse(why: str) -> StoreError:
        return StoreError.of(
            f"store {p}: {why}; nothing was changed; use another ",
            Name("store"),
            " (a directory, a scan store of this map or a records store)",
        )

    if not p.is_file():
        raise refuse("not a regular file")
    try:
        with open(p, "rb") as fh:
            head = fh.read(len(_HEADER))
    except OSError as exc:
        raise refuse(f"cannot be read ({exc.strerror or exc})") from None
    if head != _HEADER:
        raise refuse("not a cyclewright store")
    try:
        info = store_info(p)
    except (OSError, sqlite3.Error) as exc:
        raise refuse(f"cannot be read ({exc})") from None
    problem = info.get("problem") or ""
    if problem.startswith("busy"):
        return  # a scan is writing it: a scan store, checked again when opened
    if info.get("map_key") is None:
        raise refuse(problem or "not a cyclewright scan store")
    if info["map_key"] != m.key:
        theirs = info.get("map_label") or "?"
        if info.get("formula") and info["formula"] != theirs:
            theirs = f"{theirs} = {info['formula']}"
        raise refuse(f"holds scans of {theirs}, not of {_named(m)} (the map definition differs)")


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
        self._user: int | None = None
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
        self._user = self._register()

    def _register(self) -> int | None:
        """Note this process among the store's users (a read-only file: not noted)."""
        try:
            self.conn.execute(
                "CREATE TABLE IF NOT EXISTS users (pid INTEGER NOT NULL, host TEXT NOT NULL)"
            )
            for rowid, pid, host in self.conn.execute("SELECT rowid, pid, host FROM users"):
                if not _alive(int(pid), str(host)):  # a process that died with it open
                    self.conn.execute("DELETE FROM users WHERE rowid = ?", (rowid,))
            cur = self.conn.execute(
                "INSERT INTO users VALUES (?, ?)", (os.getpid(), socket.gethostname() or "?")
            )
            return cur.lastrowid
        except sqlite3.Error:
            return None

    def _create(self) -> None:
        c = self.conn
        c.execute("BEGIN IMMEDIATE")
        c.execute("CREATE TABLE IF NOT EXISTS meta (key TEXT PRIMARY KEY, value TEXT NOT NULL)")
        c.execute(
            "CREATE TABLE IF NOT EXISTS chunks (config TEXT NOT NULL, lo INTEGER NOT NULL, "
            "hi INTEGER NOT NULL, figures BLOB NOT NULL, checksum TEXT NOT NULL, "
            "PRIMARY KEY (config, lo, hi))"
        )
        for k, v in (
            ("format", FORMAT),
            ("map_key", self.map.key),
            ("map_label", self.map.label),
            ("map_definition", self.map.canonical_json()),
        ):
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
        if self._user is not None:
            try:
                self.conn.execute("DELETE FROM users WHERE rowid = ?", (self._user,))
            except sqlite3.Error:
                pass
            self._user = None
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


# --------------------------------------------------------------------------- stores on disk
def _parse_config(config: str) -> tuple[str, int | None]:
    parts = dict(p.split("=", 1) for p in config.split(";") if "=" in p)
    try:
        return parts.get("side", "?"), int(parts["max_steps"])
    except (KeyError, ValueError):
        return parts.get("side", "?"), None


def _alive(pid: int, host: str) -> bool:
    """Whether a process noted in ``users`` may still use the store."""
    if host != (socket.gethostname() or "?"):
        return True  # another machine's process: assume it is alive
    if pid <= 0:
        return False
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except OSError:
        return True
    return True


def records_store_info(path: str | os.PathLike) -> dict:
    """What a records store holds, read without writing and without knowing its map.

    Returns a dict with ``path``, ``size`` (bytes), ``modified`` (POSIX
    time) and, when readable, ``map_label``, ``map_key``, ``formula`` (None
    for a store written before the definition was kept), ``format``,
    ``records`` (per configuration: side, step cap, chunks, starts, lowest
    and highest start), ``chunks_checked`` and ``chunks_damaged`` (every
    chunk's checksum is checked), ``users`` (processes with the store open);
    otherwise ``problem``.

    Examples
    --------
    >>> import tempfile, pathlib
    >>> from cyclewright.cycles.records import records
    >>> d = pathlib.Path(tempfile.mkdtemp())
    >>> _ = records("3x+1", 100, side="positive", store=d)
    >>> info = records_store_info(d / default_records_path("3x+1").name)
    >>> info["map_label"], info["records"][0]["highest"], info["chunks_damaged"]
    ('3x+1', 100, 0)
    """
    p = Path(path)
    info, conn = open_store_readonly(p)
    if conn is None:
        return info
    try:
        tables = {r[0] for r in conn.execute("SELECT name FROM sqlite_master WHERE type='table'")}
        if not {"meta", "chunks"} <= tables:
            info["problem"] = "not a cyclewright records store"
            return info
        meta = dict(conn.execute("SELECT key, value FROM meta").fetchall())
        info["format"] = meta.get("format")
        info["map_label"] = meta.get("map_label")
        info["map_key"] = meta.get("map_key")
        try:
            d = json.loads(meta["map_definition"])
            info["formula"] = Map(d["divisor"], d["branches"]).formula()
        except Exception:
            info["formula"] = None
        by_config: dict[str, dict] = {}
        checked = damaged = 0
        for config, lo, hi, blob, checksum in conn.execute(
            "SELECT config, lo, hi, figures, checksum FROM chunks ORDER BY config, lo"
        ):
            checked += 1
            ok = isinstance(blob, bytes) and RecordsStore._digest(config, lo, hi, blob) == checksum
            if not ok:
                damaged += 1
                continue
            side, cap = _parse_config(config)
            s = by_config.setdefault(
                config,
                {
                    "side": side,
                    "max_steps": cap,
                    "chunks_done": 0,
                    "starts_done": 0,
                    "lowest": lo,
                    "highest": hi,
                },
            )
            s["chunks_done"] += 1
            s["starts_done"] += hi - lo + 1
            s["lowest"] = min(s["lowest"], lo)
            s["highest"] = max(s["highest"], hi)
        order = {"positive": 0, "negative": 1}
        info["records"] = sorted(
            by_config.values(), key=lambda c: (order.get(c["side"], 2), c["max_steps"] or 0)
        )
        info["chunks_checked"] = checked
        info["chunks_damaged"] = damaged
        users = []
        if "users" in tables:
            users = [
                (int(pid), str(host))
                for pid, host in conn.execute("SELECT pid, host FROM users").fetchall()
                if _alive(int(pid), str(host))
            ]
        info["users"] = len(users)
        if info["format"] != FORMAT:
            info["problem"] = f"format {info['format']!r}, this cyclewright reads {FORMAT!r}"
    except sqlite3.Error as exc:
        info["problem"] = f"unreadable ({exc})"
    finally:
        conn.close()
    return info


def list_records_stores(directory: str | os.PathLike | None = None) -> list[dict]:
    """:func:`records_store_info` of every ``*-records.db`` file in ``directory``.

    The default directory is the stores' one in the user data directory.

    >>> import tempfile
    >>> list_records_stores(tempfile.mkdtemp())
    []
    """
    root = Path(directory) if directory is not None else data_dir() / "scans"
    if not root.is_dir():
        return []
    return [records_store_info(p) for p in sorted(root.glob(f"*{SUFFIX}")) if p.is_file()]


def remove_records_store(path: str | os.PathLike) -> int:
    """Delete a records store (with its journal) unless a process is using it; the bytes freed.

    Raises
    ------
    StoreError
        The file is not a records store, or another process has it open.
    """

    def tables(conn: sqlite3.Connection) -> set[str]:
        return {r[0] for r in conn.execute("SELECT name FROM sqlite_master WHERE type='table'")}

    def is_ours(conn: sqlite3.Connection) -> bool:
        names = tables(conn)
        fmt = None
        if "meta" in names:
            row = conn.execute("SELECT value FROM meta WHERE key = 'format'").fetchone()
            fmt = row[0] if row else None
        return "chunks" in names and str(fmt or "").startswith("records-")

    def live(conn: sqlite3.Connection) -> list[tuple[int, str]]:
        if "users" not in tables(conn):
            return []
        rows = conn.execute("SELECT pid, host FROM users").fetchall()
        return [(int(pid), str(host)) for pid, host in rows if _alive(int(pid), str(host))]

    return remove_sqlite_store(
        path,
        kind="records store",
        header=_HEADER,
        is_ours=is_ours,
        live_users=live,
        busy=lambda exc: "locked" in str(exc) or "busy" in str(exc),
    )
