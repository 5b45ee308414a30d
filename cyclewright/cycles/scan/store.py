"""The results store of the scan: an SQLite ledger, one file per map definition.

Inside
------
- :class:`ScanStore` -- open (validating first) or create a store; record
  finished chunks atomically, each with a checksum of its content; check
  chunks when they are read back; claim chunks so that concurrent runs share
  the work; wait (with a message) while another process holds the file.
- :class:`ChunkRecord` -- what the store knows about one finished chunk.
- :class:`StoreBusy` -- the store stayed locked by another process too long.
- :func:`default_store_path` -- where a map's store lives by default: keyed
  on the map's canonical definition (``$CYCLEWRIGHT_DATA_DIR``, else the
  platform's user data directory), so every name of the same map shares it.
- :func:`adopt_legacy_store` -- a version-1 default store takes the
  version-2 name (and is migrated when opened).
- :func:`store_info`, :func:`list_stores`, :func:`remove_store` -- the
  stores on this machine (map, ranges, size, age), and removing one that no
  process is using.
- :data:`SCHEMA_VERSION`, :data:`SEMANTICS` -- versions checked on opening.

Layout (schema version 2)
-------------------------
``meta``
    ``schema_version``, ``semantics``, ``map_key`` (SHA-256 of the canonical
    definition), ``map_definition`` (canonical JSON), ``map_label``,
    ``created_by`` (code version), ``created_at``.
``scans``
    One row per scan configuration: ``side``, ``max_steps``,
    ``max_cycle_length`` (NULL when not given), the code version that
    created it.
``runs``
    Each invocation: range, chunk size, process id and host, start, last
    sign of life and end time, status (``running``, ``complete``,
    ``interrupted``). A ``running`` row whose process is gone is marked
    ``interrupted`` by the next process that opens the store.
``chunks``
    One row per chunk ``[lo, hi]`` (absolute values of the starts): status
    ``done`` (or ``damaged``), the counts per classification, how many starts
    the sieve decided, the sieve depth, seconds, code version, and a SHA-256
    checksum of everything the chunk contributes to a result (see below).
``cycles``
    Every cycle found (its minimum is signed; the record is JSON).
``unresolved``
    Per chunk, all unresolved starts (absolute values) as a little-endian
    int64 blob, with a byte per start telling whether the orbit passed 2^63.
``claims``
    Chunks a running process is computing, so that a second run of the same
    range computes other chunks (and waits for these).

Integrity
---------
A chunk's checksum covers the scan configuration, the range, the counts, the
sieve figures, the stored cycle rows whose ``|minimum|`` lies in the range
and the chunk's unresolved starts. :meth:`ScanStore.check` recomputes it and
checks that the counts are non-negative and add up to the range, that the
number of cycle rows equals the ``cycles`` count and that the unresolved
starts lie in the range and match the counts. A chunk failing any of these is
*damaged*: the scan then recomputes it (or refuses), and never reports it.
The cycles themselves are re-proved by exact iteration when read back
(:func:`prove_cycle_rows`, called by :mod:`cyclewright.cycles.scan.run`).

Every chunk is written in one transaction together with its cycles and
unresolved starts, so a process killed at any moment leaves either the whole
chunk or nothing; a re-run recomputes exactly the missing chunks. Opening
never writes before the file has been checked: a file that is not an SQLite
database of this kind, a store of another map definition, a store of another
schema (but 1, see below) or semantics version, or a corrupt file raises
:class:`~cyclewright.cycles.errors.StoreError` and leaves the file as it was.
A store that cannot be written is opened read-only: finished results can be
read, nothing can be added.

A new store is built under a temporary name and linked into place only if no
store exists there yet, so processes creating the same store at once all end
up using one complete file.

Version 1
---------
A store of schema version 1 (no checksums, no claims, runs without process
ids) is migrated when opened with write access, never trusted unchecked:
each finished chunk must pass the checks above that need no checksum
(counts non-negative and adding up to the range, one cycle row per counted
cycle, unresolved starts inside the chunk and matching the counts, a sieve
count within the range), and every stored cycle is re-proved exactly. A
chunk that passes is rewritten with its checksum (its ``code_version`` says
``migrated from schema 1``); any other is left out, so the next scan
recomputes it. What no check short of recomputing can confirm -- how a
chunk's other starts split between dropping below themselves and entering
another cycle, and how many the sieve decided -- is carried over under the
adding-up check, as version 1 recorded it. The run history is not carried
over (version 1 did not record which process ran). The new file replaces
the old one in one rename while the old one is locked against writers, so
processes opening it at once migrate it once; one line says what was kept
and what will be recomputed. A version-1 store that cannot be written is
refused with one line, untouched. Default stores of version 1 (named
``<label>-<key prefix>.sqlite``) take the version-2 name first
(:func:`adopt_legacy_store`).

SQLite integers are signed 64-bit, so starts are limited to ``2^63 - 1``
(:data:`MAX_START`).
"""

from __future__ import annotations

import contextlib
import datetime as _dt
import hashlib
import json
import os
import socket
import sqlite3
import sys
import time
from collections.abc import Callable, Iterator
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from cyclewright.maps import Map, as_map

from ..errors import Name, StoreError
from ..files import data_dir, open_store_readonly, remove_sqlite_store
from ..limits import wait_seconds

__all__ = [
    "ScanStore",
    "ChunkRecord",
    "StoreBusy",
    "default_store_path",
    "data_dir",
    "SCHEMA_VERSION",
    "SEMANTICS",
    "MAX_START",
    "DEFAULT_BUSY_WAIT",
    "code_version",
    "store_info",
    "list_stores",
    "remove_store",
    "prove_cycle_rows",
    "adopt_legacy_store",
]

#: Layout version of the file; a store of another version is refused.
SCHEMA_VERSION = 2
#: Version of the classification rules (kernels.py / reference.py); results of
#: another version are not comparable, so such a store is refused.
SEMANTICS = 1
#: Largest start a store can hold (SQLite INTEGER).
MAX_START = 2**63 - 1
#: Seconds to wait for a store another process holds before giving up.
DEFAULT_BUSY_WAIT = 600.0
#: A claim of another host whose run gave no sign of life for this long is void.
CLAIM_STALE_SECONDS = 900.0
_APPLICATION_ID = 0x43574C53  # "CWLS": cyclewright ledger of scans
_HEADER = b"SQLite format 3\x00"
_COUNT_KEYS = ("drops", "cycles", "other_cycle", "unresolved", "beyond_length")
_BUSY_SLICE = 1.0  # seconds SQLite itself waits for a lock before we look again
_FULL_CHECK_BYTES = 64 * 2**20  # below this size opening runs the full integrity check

_SCHEMA = """
CREATE TABLE meta (key TEXT PRIMARY KEY, value TEXT NOT NULL);
CREATE TABLE scans (
    id INTEGER PRIMARY KEY,
    side TEXT NOT NULL CHECK (side IN ('positive', 'negative')),
    max_steps INTEGER NOT NULL,
    max_cycle_length INTEGER,
    config TEXT NOT NULL UNIQUE,
    created_by TEXT NOT NULL,
    created_at TEXT NOT NULL
);
CREATE TABLE runs (
    id INTEGER PRIMARY KEY,
    scan_id INTEGER NOT NULL REFERENCES scans(id),
    lo INTEGER NOT NULL,
    hi INTEGER NOT NULL,
    chunk_size INTEGER NOT NULL,
    code_version TEXT NOT NULL,
    pid INTEGER NOT NULL,
    host TEXT NOT NULL,
    started_at TEXT NOT NULL,
    heartbeat REAL NOT NULL,
    finished_at TEXT,
    status TEXT NOT NULL
);
CREATE TABLE chunks (
    scan_id INTEGER NOT NULL REFERENCES scans(id),
    lo INTEGER NOT NULL,
    hi INTEGER NOT NULL,
    status TEXT NOT NULL,
    drops INTEGER NOT NULL,
    cycles INTEGER NOT NULL,
    other_cycle INTEGER NOT NULL,
    unresolved INTEGER NOT NULL,
    beyond_length INTEGER NOT NULL,
    sieved INTEGER NOT NULL,
    sieve_depth INTEGER NOT NULL,
    seconds REAL NOT NULL,
    code_version TEXT NOT NULL,
    finished_at TEXT NOT NULL,
    checksum TEXT NOT NULL,
    PRIMARY KEY (scan_id, lo, hi)
);
CREATE TABLE cycles (
    scan_id INTEGER NOT NULL REFERENCES scans(id),
    minimum INTEGER NOT NULL,
    length INTEGER NOT NULL,
    record TEXT NOT NULL,
    PRIMARY KEY (scan_id, minimum)
);
CREATE TABLE unresolved (
    scan_id INTEGER NOT NULL REFERENCES scans(id),
    lo INTEGER NOT NULL,
    hi INTEGER NOT NULL,
    count INTEGER NOT NULL,
    starts BLOB NOT NULL,
    escaped BLOB NOT NULL,
    PRIMARY KEY (scan_id, lo, hi)
);
CREATE TABLE claims (
    scan_id INTEGER NOT NULL REFERENCES scans(id),
    lo INTEGER NOT NULL,
    hi INTEGER NOT NULL,
    run_id INTEGER NOT NULL REFERENCES runs(id),
    PRIMARY KEY (scan_id, lo, hi)
);
"""


_LAYOUT: list = []


def _expected_layout() -> list:
    """The ``sqlite_master`` rows of a fresh store (what every store must show)."""
    if not _LAYOUT:
        conn = sqlite3.connect(":memory:")
        conn.executescript(_SCHEMA)
        _LAYOUT.extend(
            sorted(conn.execute("SELECT type, name, tbl_name, sql FROM sqlite_master").fetchall())
        )
        conn.close()
    return _LAYOUT


def _layout_v1() -> list:
    """The ``sqlite_master`` rows of a schema-1 store: schema 2 without the run's process
    and sign of life, the chunk checksums and the claims."""
    sql = (
        _SCHEMA.replace("    pid INTEGER NOT NULL,\n    host TEXT NOT NULL,\n", "")
        .replace("    heartbeat REAL NOT NULL,\n", "")
        .replace("    checksum TEXT NOT NULL,\n", "")
    )
    sql = sql[: sql.index("CREATE TABLE claims")]
    conn = sqlite3.connect(":memory:")
    conn.executescript(sql)
    rows = sorted(conn.execute("SELECT type, name, tbl_name, sql FROM sqlite_master").fetchall())
    conn.close()
    return rows


class _SchemaOne(Exception):
    """The file is a store of schema version 1 (to be migrated)."""


class StoreBusy(StoreError):
    """Another process held the store longer than the caller was willing to wait."""


def code_version() -> str:
    """``cyclewright <version> (scan semantics N)``."""
    try:
        from importlib.metadata import version

        v = version("cyclewright")
    except Exception:  # pragma: no cover - running from a source tree
        v = "0+unknown"
    return f"cyclewright {v} (scan semantics {SEMANTICS})"


def _now() -> str:
    return _dt.datetime.now(_dt.timezone.utc).isoformat(timespec="seconds")


def _host() -> str:
    return socket.gethostname() or "?"


def _pid_alive(pid: int) -> bool:
    """Whether a process with this id exists on this machine."""
    if pid <= 0:
        return False
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:
        return True
    except OSError:
        return False
    return True


def default_store_path(m: Map | str) -> Path:
    """``<data dir>/scans/<key prefix>.sqlite``: one store per map definition.

    Every name of the same map (catalog name, shorthand, TOML copy) has the
    same canonical key, hence the same store.

    >>> from cyclewright import maps
    >>> default_store_path(maps.get("3x+1")).name
    'f477e91227842caa.sqlite'
    """
    m = as_map(m)
    return data_dir() / "scans" / f"{m.key[:16]}.sqlite"


def adopt_legacy_store(m: Map | str) -> Path | None:
    """Give a version-1 default store of ``m`` the version-2 default name, if there is none yet.

    Version 1 named default stores ``<label>-<key prefix>.sqlite`` (one per
    name of the map); version 2 names them by the key alone. When the new
    name is free, the first such file is linked to it (then unlinked), so
    the next opening migrates it instead of starting afresh. Returns the
    file adopted, or None.
    """
    m = as_map(m)
    target = default_store_path(m)
    if target.exists() or not target.parent.is_dir():
        return None
    for old in sorted(target.parent.glob(f"*-{m.key[:12]}.sqlite")):
        try:
            os.link(old, target)
        except FileExistsError:
            return None  # another process adopted one first
        except OSError:
            continue
        try:
            old.unlink()
        except OSError:  # pragma: no cover - left beside it, listed by `stores list`
            pass
        return old
    return None


def _stderr_notice(text: str) -> None:
    print(text, file=sys.stderr, flush=True)


def _kind(exc: sqlite3.Error) -> str:
    """What an SQLite error means for the user: busy, full, readonly, corrupt or other."""
    msg = str(exc).lower()
    if "locked" in msg or "busy" in msg:
        return "busy"
    if "full" in msg:
        return "full"
    if "readonly" in msg or "read-only" in msg:
        return "readonly"
    if isinstance(exc, sqlite3.DatabaseError) and not isinstance(exc, sqlite3.OperationalError):
        return "corrupt"
    if "malformed" in msg or "not a database" in msg or "corrupt" in msg or "i/o" in msg:
        return "corrupt"
    return "other"


@dataclass(frozen=True)
class ChunkRecord:
    """A finished chunk as stored: its range (absolute values) and counts."""

    lo: int
    hi: int
    counts: dict
    sieved: int
    sieve_depth: int
    seconds: float
    code_version: str


@dataclass(frozen=True)
class ChunkCheck:
    """The outcome of :meth:`ScanStore.check` for a batch of chunks.

    ``good`` maps ``(lo, hi)`` to its record and the raw cycle rows
    ``(minimum, length, record text)`` it holds; ``damaged`` lists
    ``(lo, hi, why)`` for chunks whose stored content fails a check.
    """

    good: dict
    cycles: dict
    damaged: list


class ScanStore:
    """The SQLite ledger of the scans of one map.

    Parameters
    ----------
    path : str or Path
        The store file, or ``":memory:"`` for a store that lives as long as
        the object.
    m : Map
        The map definition; an existing store must have been made for the
        same definition (its canonical hash).
    create_dirs : bool
        Create missing parent directories (used for the default location).
    busy_wait : float, optional
        Seconds to wait, with a message, while another process holds the
        store; then :class:`StoreBusy` is raised. Default:
        ``$CYCLEWRIGHT_STORE_WAIT`` if set, else :data:`DEFAULT_BUSY_WAIT`.
    notice : callable, optional
        Receives one-line messages (waiting for a busy store...); default:
        printed on stderr.

    Raises
    ------
    StoreError
        The file is not a store of this kind, belongs to another map
        definition or another version, or is corrupt; the directory of a new
        store does not exist or cannot be written. The file is not modified.

    Examples
    --------
    >>> from cyclewright import maps
    >>> st = ScanStore(":memory:", maps.get("3x+1"))
    >>> sid = st.scan_id("positive", 1000, None)
    >>> st.finished(sid, [(1, 10)])
    {}
    >>> st.close()
    """

    def __init__(
        self,
        path: str | os.PathLike,
        m: Map,
        *,
        create_dirs: bool = False,
        busy_wait: float | None = None,
        notice: Callable[[str], None] | None = None,
    ) -> None:
        self.map = m
        self.memory = str(path) == ":memory:"
        self.path = None if self.memory else Path(path).expanduser()
        self.readonly = False
        self.busy_wait = wait_seconds(
            "CYCLEWRIGHT_STORE_WAIT", DEFAULT_BUSY_WAIT, StoreError, busy_wait
        )
        self.notice = notice or _stderr_notice
        self._conn = None
        if self.memory:
            self._conn = sqlite3.connect(":memory:")
            self._create(self._conn)
            self._pragmas(self._conn)
            return
        p = self.path
        if p.exists():
            self._conn = self._open_existing(p)
        else:
            self._conn = self._create_new(p, create_dirs)
        if not self.readonly:
            self._tidy()

    # ----------------------------------------------------------------- opening
    def _open_existing(self, p: Path, migrated: bool = False) -> sqlite3.Connection:
        if not p.is_file():
            raise StoreError(f"store {p} is not a regular file")
        if not os.access(p, os.R_OK):
            raise StoreError(f"store {p} cannot be read (permission denied)")
        try:
            with open(p, "rb") as fh:
                head = fh.read(len(_HEADER))
        except OSError as exc:
            raise StoreError(f"store {p} cannot be read: {exc.strerror or exc}") from None
        if head != _HEADER:
            raise StoreError(
                f"store {p} is not a cyclewright scan store (not an SQLite database, or corrupt); "
                "nothing was changed"
            )
        self.readonly = not (os.access(p, os.W_OK) and os.access(p.parent, os.W_OK))
        mode = "ro" if self.readonly else "rw"
        try:
            conn = sqlite3.connect(
                p.resolve().as_uri() + f"?mode={mode}", uri=True, timeout=_BUSY_SLICE
            )
        except sqlite3.Error as exc:
            raise StoreError(f"store {p} cannot be opened: {exc}") from None
        conn.text_factory = lambda b: b.decode("utf-8", "replace")
        try:
            self._retry(lambda: self._validate(conn, p), "open")
        except _SchemaOne:
            conn.close()
            if migrated:  # pragma: no cover - a second version-1 file put in its place
                raise StoreError(f"store {p} changed while it was migrated; try again") from None
            if self.readonly:
                raise StoreError(
                    f"store {p} has schema version 1 and is not writable, so it cannot be "
                    f"migrated to version {SCHEMA_VERSION}; nothing was changed"
                ) from None
            self._migrate_v1(p)
            return self._open_existing(p, migrated=True)
        except BaseException:
            conn.close()
            raise
        self._pragmas(conn)
        return conn

    def _validate(self, conn: sqlite3.Connection, p: Path) -> None:
        try:
            app = conn.execute("PRAGMA application_id").fetchone()[0]
            version = conn.execute("PRAGMA user_version").fetchone()[0]
        except sqlite3.DatabaseError as exc:
            if _kind(exc) == "busy":
                raise
            raise StoreError(f"store {p} is corrupt ({exc}); nothing was changed") from None
        if app != _APPLICATION_ID:
            raise StoreError(
                f"{p} is an SQLite database but not a cyclewright scan store; nothing was changed"
            )
        if version == 1:
            raise _SchemaOne()
        if version != SCHEMA_VERSION:
            raise StoreError(
                f"store {p} has schema version {version}; this cyclewright reads version "
                f"{SCHEMA_VERSION} (incompatible version, nothing was changed; remove it with "
                "`cyclewright stores remove` to start afresh)"
            )
        self._check_file(conn, p, _expected_layout(), SCHEMA_VERSION)

    def _check_file(self, conn: sqlite3.Connection, p: Path, layout: list, version: int) -> None:
        """Integrity check, table layout, semantics and map of a store file (any version)."""
        try:
            full = p.stat().st_size <= _FULL_CHECK_BYTES
            check = conn.execute("PRAGMA integrity_check" if full else "PRAGMA quick_check")
            check = check.fetchone()[0]
        except UnicodeError:
            raise StoreError(
                f"store {p} is corrupt (damaged schema); nothing was changed"
            ) from None
        except sqlite3.DatabaseError as exc:
            if _kind(exc) == "busy":
                raise
            raise StoreError(f"store {p} is corrupt ({exc}); nothing was changed") from None
        if check != "ok":
            raise StoreError(
                f"store {p} is corrupt (integrity check: {check}); nothing was changed"
            )
        try:
            meta = dict(conn.execute("SELECT key, value FROM meta").fetchall())
            found = conn.execute("SELECT type, name, tbl_name, sql FROM sqlite_master").fetchall()
        except (sqlite3.DatabaseError, UnicodeError, ValueError) as exc:
            if isinstance(exc, sqlite3.Error) and _kind(exc) == "busy":
                raise
            raise StoreError(f"store {p} is corrupt ({exc}); nothing was changed") from None
        if sorted(found) != layout:
            raise StoreError(
                f"store {p} is corrupt (its table layout is not the one of schema version "
                f"{version}); nothing was changed"
            )
        if meta.get("semantics") != str(SEMANTICS):
            raise StoreError(
                f"store {p} was written with scan semantics {meta.get('semantics')}; this "
                f"cyclewright uses {SEMANTICS} (incompatible version, nothing was changed)"
            )
        if meta.get("map_key") != self.map.key:
            theirs = meta.get("map_label", "?")
            try:
                d = json.loads(meta.get("map_definition", "{}"))
                theirs = f"{theirs} = {Map(d['divisor'], d['branches']).formula()}"
            except Exception:
                pass
            raise StoreError.of(
                f"store {p} holds scans of {theirs}, not of {self.map.label} = "
                f"{self.map.formula()} (the map definition differs); use another ",
                Name("store"),
            )

    # ----------------------------------------------------------------- version 1
    def _migrate_v1(self, p: Path) -> None:
        """Rewrite a schema-1 store as schema 2, keeping only the chunks that pass every check.

        Each finished chunk must have counts that are non-negative and add up
        to its range, as many cycle rows as counted cycles, unresolved starts
        inside the chunk matching the counts, a sieve count within the range;
        and every stored cycle must equal its exact re-proof. Such a chunk is
        written into the new file with its checksum; any other is left out,
        so the next scan recomputes it. The file is replaced in one rename
        while the old one is locked against writers, so concurrent processes
        migrate it once.
        """
        ino = p.stat().st_ino
        old = sqlite3.connect(p.resolve().as_uri() + "?mode=rw", uri=True, timeout=_BUSY_SLICE)
        old.text_factory = lambda b: b.decode("utf-8", "replace")
        tmp = p.parent / f".{p.name}.{os.getpid()}.tmp"
        try:
            self._retry(lambda: old.execute("BEGIN IMMEDIATE"), "migrate")
            try:
                st = p.stat()
            except FileNotFoundError:  # pragma: no cover - removed meanwhile
                return
            if st.st_ino != ino:
                return  # another process migrated it while we waited
            self._check_file(old, p, _layout_v1(), 1)
            tmp.unlink(missing_ok=True)  # a leftover of a process with the same id
            kept, left = self._copy_v1(old, tmp)
            os.chmod(tmp, st.st_mode & 0o7777)
            os.replace(tmp, p)
        except (OSError, sqlite3.Error) as exc:
            if isinstance(exc, sqlite3.Error):
                raise self._as_store_error(exc) from None
            raise StoreError(
                f"store {p} has schema version 1 and could not be migrated "
                f"({exc.strerror or exc}); nothing was changed"
            ) from None
        finally:
            try:
                old.rollback()
            finally:
                old.close()
            for f in (tmp, tmp.with_name(tmp.name + "-journal")):
                try:
                    f.unlink()
                except OSError:
                    pass
        self.notice(
            f"store {p} had schema version 1: migrated to version {SCHEMA_VERSION}; "
            f"{kept} chunk{'s' if kept != 1 else ''} passed the checks (counts add up, cycles "
            f"re-proved exactly) and were kept with checksums"
            + (f", {left} failed a check and will be recomputed" if left else "")
            + "; the run history of version 1 was not carried over"
        )

    def _copy_v1(self, old: sqlite3.Connection, tmp: Path) -> tuple[int, int]:
        """Copy the checked chunks of a schema-1 connection into a new store at ``tmp``."""
        new = ScanStore(tmp, self.map, busy_wait=self.busy_wait, notice=self.notice)
        kept = left = 0
        try:
            scans = old.execute(
                "SELECT id, side, max_steps, max_cycle_length FROM scans ORDER BY id"
            ).fetchall()
            for sid, side, steps, K in scans:
                nsid = new.scan_id(side, int(steps), None if K is None else int(K))
                rows = old.execute(
                    "SELECT lo, hi, drops, cycles, other_cycle, unresolved, beyond_length, sieved,"
                    " sieve_depth, seconds, code_version FROM chunks"
                    " WHERE scan_id = ? AND status = 'done' ORDER BY lo, hi",
                    (sid,),
                ).fetchall()
                for r in rows:
                    lo, hi = r[0], r[1]
                    if not _sane_chunk(r):
                        left += 1
                        continue
                    cyc, unres = _chunk_rows(old, sid, lo, hi)
                    why = _chunk_problem(lo, hi, r[2:7], cyc, unres)
                    if why is None:
                        why = prove_cycle_rows(self.map, side, cyc)
                    if why is not None:
                        left += 1
                        continue
                    new.record_chunk(
                        nsid,
                        lo,
                        hi,
                        dict(zip(_COUNT_KEYS, (int(x) for x in r[2:7]))),
                        [json.loads(bytes(c[2]).decode("utf-8")) for c in cyc],
                        np.frombuffer(unres[1], dtype="<i8"),
                        np.frombuffer(unres[2], dtype=np.uint8),
                        sieved=int(r[7]),
                        sieve_depth=int(r[8]),
                        seconds=float(r[9]),
                        version=f"{r[10]}; migrated from schema 1 by {code_version()}",
                    )
                    kept += 1
        finally:
            new.close()
        return kept, left

    def _create_new(self, p: Path, create_dirs: bool) -> sqlite3.Connection:
        parent = p.parent
        if not parent.exists():
            if not create_dirs:
                raise StoreError(f"cannot create store {p}: directory {parent} does not exist")
            try:
                parent.mkdir(parents=True, exist_ok=True)
            except OSError as exc:
                raise StoreError(
                    f"cannot create store {p}: {exc.strerror or exc} ({parent})"
                ) from None
        if not parent.is_dir() or not os.access(parent, os.W_OK | os.X_OK):
            raise StoreError(f"cannot create store {p}: directory {parent} is not writable")
        # Build the file under a temporary name and link it into place only if
        # no store is there yet: a store exists complete or not at all, and
        # processes creating it at once all end up with the same file.
        tmp = parent / f".{p.name}.{os.getpid()}.tmp"
        try:
            conn = sqlite3.connect(str(tmp))
            try:
                # nobody sees the temporary file: no journal and no sync per statement,
                # one fsync of the finished file below before it is linked into place
                conn.execute("PRAGMA journal_mode = OFF")
                conn.execute("PRAGMA synchronous = OFF")
                self._create(conn)
            finally:
                conn.close()
            fd = os.open(tmp, os.O_RDONLY)
            try:
                os.fsync(fd)
            finally:
                os.close(fd)
            try:
                os.link(tmp, p)
            except FileExistsError:
                pass  # another process made it first: use theirs
            except OSError:
                # a file system without hard links: claim the name exclusively
                try:
                    fd = os.open(p, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o666)
                except FileExistsError:
                    pass
                else:
                    os.close(fd)
                    os.replace(tmp, p)
        except (OSError, sqlite3.Error) as exc:
            why = "the disk is full" if "full" in str(exc).lower() else str(exc)
            raise StoreError(f"cannot create store {p}: {why}") from None
        finally:
            try:
                tmp.unlink()
            except OSError:
                pass
        return self._open_existing(p)

    def _create(self, conn: sqlite3.Connection) -> None:
        m = self.map
        with conn:
            conn.executescript(_SCHEMA)
            conn.execute(f"PRAGMA application_id = {_APPLICATION_ID}")
            conn.execute(f"PRAGMA user_version = {SCHEMA_VERSION}")
            meta = {
                "schema_version": str(SCHEMA_VERSION),
                "semantics": str(SEMANTICS),
                "map_key": m.key,
                "map_definition": m.canonical_json(),
                "map_label": m.label,
                "created_by": code_version(),
                "created_at": _now(),
            }
            conn.executemany("INSERT INTO meta VALUES (?, ?)", sorted(meta.items()))

    @staticmethod
    def _pragmas(conn: sqlite3.Connection) -> None:
        # damaged text never raises while read: it just fails its checksum
        conn.text_factory = lambda b: b.decode("utf-8", "replace")
        conn.execute("PRAGMA synchronous = NORMAL")
        conn.execute("PRAGMA foreign_keys = ON")

    def _tidy(self) -> None:
        """Mark runs whose process is gone ``interrupted``, drop their claims and stale temporaries."""
        me = _host()

        def work():
            rows = self._conn.execute(
                "SELECT id, pid FROM runs WHERE status = 'running' AND host = ?", (me,)
            ).fetchall()
            dead = [rid for rid, pid in rows if not _pid_alive(int(pid))]
            if dead:
                with self._conn:
                    for rid in dead:
                        self._conn.execute(
                            "UPDATE runs SET status = 'interrupted', finished_at = ? WHERE id = ?",
                            (_now(), rid),
                        )
                        self._conn.execute("DELETE FROM claims WHERE run_id = ?", (rid,))

        self._retry(work, "tidy")
        if self.path is not None:
            for f in self.path.parent.glob(f".{self.path.name}.*.tmp"):
                try:
                    pid = int(f.name[len(self.path.name) + 2 : -4])
                except ValueError:
                    continue
                if not _pid_alive(pid):
                    try:
                        f.unlink()
                    except OSError:
                        pass

    # ----------------------------------------------------------------- waiting
    def holders(self) -> str:
        """Who is working on the store, as far as it says (for messages)."""
        try:
            probe = sqlite3.connect(
                self.path.resolve().as_uri() + "?mode=ro", uri=True, timeout=0.2
            )
            try:
                rows = probe.execute(
                    "SELECT pid, host, started_at FROM runs WHERE status = 'running'"
                    " ORDER BY id DESC LIMIT 3"
                ).fetchall()
            finally:
                probe.close()
        except (sqlite3.Error, OSError, AttributeError):
            return "another process"
        if not rows:
            return "another process"
        return ", ".join(f"a scan by process {pid} on {host} since {at}" for pid, host, at in rows)

    def _retry(self, fn, what: str):
        """Run ``fn()``; while the store is locked by another process, wait (with a message)."""
        deadline = None
        while True:
            try:
                return fn()
            except UnicodeError:
                raise StoreError(
                    f"store {self.path} is corrupt (damaged text); nothing was reported from it"
                ) from None
            except sqlite3.Error as exc:
                kind = _kind(exc)
                if kind != "busy":
                    raise self._as_store_error(exc) from None
                now = time.monotonic()
                if deadline is None:
                    deadline = now + self.busy_wait
                    if self.busy_wait > 0:
                        self.notice(
                            f"store {self.path} is busy (in use by {self.holders()}); "
                            f"waiting up to {self.busy_wait:g} s"
                        )
                if now >= deadline:
                    raise StoreBusy.of(
                        f"store {self.path} is busy: {self.holders()} kept it locked for over "
                        f"{self.busy_wait:g} s; nothing was changed (try again later, or use "
                        "another ",
                        Name("store"),
                        ")",
                    ) from None
                time.sleep(min(0.2, max(0.0, deadline - now)))

    def _as_store_error(self, exc: sqlite3.Error) -> Exception:
        kind = _kind(exc)
        where = self.path or ":memory:"
        if kind == "full":
            return StoreError(
                f"store {where}: the disk is full ({exc}); every chunk finished before is kept, "
                "re-run after freeing space to resume"
            )
        if kind == "readonly":
            return StoreError(f"store {where} cannot be written ({exc}); nothing was changed")
        if kind == "corrupt":
            return StoreError(f"store {where} is corrupt ({exc}); nothing was reported from it")
        return exc

    @contextlib.contextmanager
    def _immediate(self):
        """A write transaction that takes the write lock first (read-then-write stays atomic)."""
        self._conn.execute("BEGIN IMMEDIATE")
        try:
            yield
        except BaseException:
            self._conn.rollback()
            raise
        else:
            self._conn.commit()

    def _writable(self, what: str) -> None:
        if self.readonly:
            raise StoreError(
                f"store {self.path} is not writable (permission denied) and does not hold {what}; "
                "nothing was changed"
            )

    # ----------------------------------------------------------------- scans
    def scan_id(
        self, side: str, max_steps: int, max_cycle_length: int | None, *, create: bool = True
    ) -> int | None:
        """The id of a scan configuration, created on first use (None if absent and not ``create``)."""
        config = f"{side}|steps={max_steps}|length={max_cycle_length if max_cycle_length else '-'}"

        def work():
            row = self._conn.execute(
                "SELECT id, side FROM scans WHERE config = ?", (config,)
            ).fetchone()
            if row and row[1] == side:
                return int(row[0])
            if not create:
                return None
            self._writable(f"the {side} scan asked for")
            with self._immediate():
                if row:  # a damaged row: the configuration is recorded again, fresh
                    self._conn.execute("DELETE FROM scans WHERE id = ?", (row[0],))
                # OR IGNORE: another process may record the same configuration at once
                self._conn.execute(
                    "INSERT OR IGNORE INTO scans (side, max_steps, max_cycle_length, config,"
                    " created_by, created_at) VALUES (?, ?, ?, ?, ?, ?)",
                    (side, max_steps, max_cycle_length, config, code_version(), _now()),
                )
                row = self._conn.execute(
                    "SELECT id FROM scans WHERE config = ?", (config,)
                ).fetchone()
            return int(row[0])

        try:
            return self._retry(work, "scan")
        except sqlite3.IntegrityError:  # pragma: no cover - damaged rows referencing the scan
            raise StoreError(
                f"store {self.path} is damaged (scan configuration table); nothing was reported"
            ) from None

    def side_of(self, scan_id: int) -> str:
        return self._retry(
            lambda: self._conn.execute(
                "SELECT side FROM scans WHERE id = ?", (scan_id,)
            ).fetchone()[0],
            "read",
        )

    def _config(self, scan_id: int) -> str:
        row = self._conn.execute(
            "SELECT side, max_steps, max_cycle_length, config FROM scans WHERE id = ?", (scan_id,)
        ).fetchone()
        return "|".join(str(x) for x in row) if row else "?"

    def begin_run(self, scan_id: int, lo: int, hi: int, chunk_size: int) -> int:
        self._writable("every chunk of this scan")

        def work():
            with self._conn:
                cur = self._conn.execute(
                    "INSERT INTO runs (scan_id, lo, hi, chunk_size, code_version, pid, host,"
                    " started_at, heartbeat, status) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, 'running')",
                    (
                        scan_id,
                        lo,
                        hi,
                        chunk_size,
                        code_version(),
                        os.getpid(),
                        _host(),
                        _now(),
                        time.time(),
                    ),
                )
            return int(cur.lastrowid)

        return self._retry(work, "run")

    def end_run(self, run_id: int, status: str) -> None:
        def work():
            with self._conn:
                self._conn.execute(
                    "UPDATE runs SET status = ?, finished_at = ? WHERE id = ?",
                    (status, _now(), run_id),
                )
                self._conn.execute("DELETE FROM claims WHERE run_id = ?", (run_id,))

        self._retry(work, "run")

    # ----------------------------------------------------------------- claims
    def claim(self, scan_id: int, run_id: int, chunks) -> tuple[list, dict]:
        """Claim the unfinished chunks among ``chunks`` for ``run_id``.

        Returns ``(mine, others)``: the chunks now claimed by this run, and
        the chunks a live run of another process is computing, with who.
        Finished chunks are in neither. A claim of a process that is gone
        (same host) or silent for :data:`CLAIM_STALE_SECONDS` is taken over.
        """
        chunks = list(chunks)
        me = _host()

        def work():
            mine, others = [], {}
            with self._immediate():
                for lo, hi in chunks:
                    done = self._conn.execute(
                        "SELECT 1 FROM chunks WHERE scan_id = ? AND lo = ? AND hi = ?"
                        " AND status = 'done'",
                        (scan_id, lo, hi),
                    ).fetchone()
                    if done:
                        continue
                    row = self._conn.execute(
                        "SELECT c.run_id, r.pid, r.host, r.status, r.heartbeat FROM claims c"
                        " LEFT JOIN runs r ON r.id = c.run_id"
                        " WHERE c.scan_id = ? AND c.lo = ? AND c.hi = ?",
                        (scan_id, lo, hi),
                    ).fetchone()
                    if row and row[0] != run_id and row[3] == "running":
                        if row[2] == me:
                            live = _pid_alive(int(row[1])) and int(row[1]) != os.getpid()
                        else:
                            live = time.time() - float(row[4] or 0) < CLAIM_STALE_SECONDS
                        if live:
                            others[(lo, hi)] = f"process {row[1]} on {row[2]}"
                            continue
                    self._conn.execute(
                        "INSERT OR REPLACE INTO claims VALUES (?, ?, ?, ?)",
                        (scan_id, lo, hi, run_id),
                    )
                    mine.append((lo, hi))
            return mine, others

        return self._retry(work, "claim")

    # ----------------------------------------------------------------- chunks
    def finished(self, scan_id: int, chunks) -> dict[tuple[int, int], ChunkRecord]:
        """The finished chunks among ``chunks`` (pairs ``(lo, hi)``), by range (not checked)."""
        wanted = set(chunks)
        if not wanted:
            return {}
        lo = min(c[0] for c in wanted)
        hi = max(c[1] for c in wanted)

        def work():
            return self._conn.execute(
                "SELECT lo, hi, drops, cycles, other_cycle, unresolved, beyond_length, sieved,"
                " sieve_depth, seconds, code_version FROM chunks"
                " WHERE scan_id = ? AND status = 'done' AND lo >= ? AND hi <= ?",
                (scan_id, lo, hi),
            ).fetchall()

        out = {}
        for r in self._retry(work, "read"):
            key = (int(r[0]), int(r[1]))
            if key in wanted:
                counts = dict(zip(_COUNT_KEYS, (int(x) for x in r[2:7])))
                out[key] = ChunkRecord(key[0], key[1], counts, int(r[7]), int(r[8]), r[9], r[10])
        return out

    def _digest(self, config: str, lo, hi, counts, sieved, depth, cycle_rows, unres) -> str:
        h = hashlib.sha256()
        head = [self.map.key, config, lo, hi, *counts, sieved, depth]
        h.update(repr(head).encode())
        for minimum, length, record in cycle_rows:
            h.update(repr((minimum, length)).encode())
            h.update(
                record if isinstance(record, bytes) else str(record).encode("utf-8", "replace")
            )
            h.update(b"\x00")
        if unres is None:
            h.update(b"no unresolved row")
        else:
            count, starts, esc = unres
            h.update(repr(count).encode())
            h.update(bytes(starts))
            h.update(b"\x00")
            h.update(bytes(esc))
        return h.hexdigest()

    def _chunk_parts(self, scan_id: int, lo: int, hi: int):
        return _chunk_rows(self._conn, scan_id, lo, hi)

    def check(self, scan_id: int, chunks) -> ChunkCheck:
        """Check the finished chunks among ``chunks`` against their checksums and counts.

        Returns a :class:`ChunkCheck`: the good chunks (with their raw cycle
        rows, to be re-proved by the caller) and the damaged ones with why.
        Chunks not in the store are in neither.
        """
        wanted = set(chunks)
        if not wanted:
            return ChunkCheck({}, {}, [])
        lo_all = min(c[0] for c in wanted)
        hi_all = max(c[1] for c in wanted)

        def work():
            config = self._config(scan_id)
            rows = self._conn.execute(
                "SELECT lo, hi, drops, cycles, other_cycle, unresolved, beyond_length, sieved,"
                " sieve_depth, seconds, code_version, checksum FROM chunks"
                " WHERE scan_id = ? AND status = 'done' AND lo >= ? AND hi <= ?",
                (scan_id, lo_all, hi_all),
            ).fetchall()
            good, cycles, damaged = {}, {}, []
            for r in rows:
                key = (r[0], r[1])
                if key not in wanted:
                    continue
                lo, hi = key
                cyc, unres = self._chunk_parts(scan_id, lo, hi)
                why = _chunk_problem(lo, hi, r[2:7], cyc, unres)
                if why is None:
                    digest = self._digest(config, lo, hi, r[2:7], r[7], r[8], cyc, unres)
                    if digest != r[11]:
                        why = "checksum mismatch"
                if why is not None:
                    damaged.append((lo, hi, why))
                    continue
                counts = dict(zip(_COUNT_KEYS, (int(x) for x in r[2:7])))
                good[key] = ChunkRecord(lo, hi, counts, int(r[7]), int(r[8]), r[9], str(r[10]))
                cycles[key] = [(int(a), int(b), bytes(c)) for a, b, c in cyc]
            return ChunkCheck(good, cycles, damaged)

        return self._retry(work, "read")

    def mark_damaged(self, scan_id: int, damaged) -> None:
        """Mark chunks ``(lo, hi, ...)`` damaged and drop their cycles and unresolved starts."""
        self._writable("intact copies of its damaged chunks")

        def work():
            with self._conn:
                for lo, hi, *_ in damaged:
                    self._conn.execute(
                        "UPDATE chunks SET status = 'damaged' WHERE scan_id = ? AND lo = ? AND hi = ?",
                        (scan_id, lo, hi),
                    )
                    self._conn.execute(
                        "DELETE FROM cycles WHERE scan_id = ? AND abs(minimum) BETWEEN ? AND ?",
                        (scan_id, lo, hi),
                    )
                    self._conn.execute(
                        "DELETE FROM unresolved WHERE scan_id = ? AND lo = ? AND hi = ?",
                        (scan_id, lo, hi),
                    )

        self._retry(work, "write")

    def record_chunk(
        self,
        scan_id: int,
        lo: int,
        hi: int,
        counts: dict,
        cycles: list[dict],
        unresolved: np.ndarray,
        escaped: np.ndarray,
        *,
        sieved: int,
        sieve_depth: int,
        seconds: float,
        version: str,
        run_id: int | None = None,
    ) -> None:
        """Store one finished chunk with its cycles and unresolved starts, atomically."""
        self._writable("the chunks of this scan")
        starts = np.ascontiguousarray(unresolved, dtype="<i8")
        esc = np.ascontiguousarray(escaped, dtype=np.uint8)
        values = [int(counts.get(k, 0)) for k in _COUNT_KEYS]

        def work():
            with self._conn:
                self._conn.execute(
                    "DELETE FROM cycles WHERE scan_id = ? AND abs(minimum) BETWEEN ? AND ?",
                    (scan_id, lo, hi),
                )
                for rec in cycles:
                    self._conn.execute(
                        "INSERT OR REPLACE INTO cycles VALUES (?, ?, ?, ?)",
                        (scan_id, rec["minimum"], rec["length"], json.dumps(rec, sort_keys=True)),
                    )
                self._conn.execute(
                    "INSERT OR REPLACE INTO unresolved VALUES (?, ?, ?, ?, ?, ?)",
                    (scan_id, lo, hi, int(starts.shape[0]), starts.tobytes(), esc.tobytes()),
                )
                # the checksum is taken over what the file now holds
                cyc, unres = self._chunk_parts(scan_id, lo, hi)
                digest = self._digest(
                    self._config(scan_id),
                    lo,
                    hi,
                    values,
                    int(sieved),
                    int(sieve_depth),
                    cyc,
                    unres,
                )
                self._conn.execute(
                    "INSERT OR REPLACE INTO chunks VALUES"
                    " (?, ?, ?, 'done', ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)",
                    (
                        scan_id,
                        lo,
                        hi,
                        *values,
                        int(sieved),
                        int(sieve_depth),
                        float(seconds),
                        version,
                        _now(),
                        digest,
                    ),
                )
                self._conn.execute(
                    "DELETE FROM claims WHERE scan_id = ? AND lo = ? AND hi = ?",
                    (scan_id, lo, hi),
                )
                if run_id is not None:
                    self._conn.execute(
                        "UPDATE runs SET heartbeat = ? WHERE id = ?", (time.time(), run_id)
                    )

        self._retry(work, "write")

    # ----------------------------------------------------------------- reading
    def cycles(self, scan_id: int, lo: int, hi: int) -> list[dict]:
        """Cycle records with ``lo <= |minimum| <= hi``, by ``|minimum|``."""
        rows = self._retry(
            lambda: self._conn.execute(
                "SELECT record FROM cycles WHERE scan_id = ? AND abs(minimum) BETWEEN ? AND ?"
                " ORDER BY abs(minimum)",
                (scan_id, lo, hi),
            ).fetchall(),
            "read",
        )
        return [json.loads(r[0]) for r in rows]

    def unresolved(self, scan_id: int, chunks=None) -> Iterator[tuple[int, bool]]:
        """``(start, escaped)`` for every unresolved start (signed by side), chunk by chunk.

        ``escaped`` tells whether the orbit passed 2^63 in absolute value.
        """
        sign = 1 if self.side_of(scan_id) == "positive" else -1
        if chunks is None:
            blobs = self._retry(
                lambda: self._conn.execute(
                    "SELECT starts, escaped FROM unresolved WHERE scan_id = ? ORDER BY lo",
                    (scan_id,),
                ).fetchall(),
                "read",
            )
        else:
            blobs = []
            for lo, hi in sorted(chunks):
                row = self._unresolved_row(scan_id, lo, hi)
                if row:
                    blobs.append(row)
        for starts, esc in blobs:
            arr = np.frombuffer(starts, dtype="<i8")
            flags = np.frombuffer(esc, dtype=np.uint8)
            for s, e in zip(arr.tolist(), flags.tolist()):
                yield sign * s, bool(e)

    def _unresolved_row(self, scan_id: int, lo: int, hi: int):
        return self._retry(
            lambda: self._conn.execute(
                "SELECT starts, escaped FROM unresolved WHERE scan_id = ? AND lo = ? AND hi = ?",
                (scan_id, lo, hi),
            ).fetchone(),
            "read",
        )

    def unresolved_summary(
        self, scan_id: int, chunks, first: int = 20
    ) -> tuple[int, int, list[int]]:
        """``(count, escaped, first starts)`` over the given chunks, without listing them all."""
        sign = 1 if self.side_of(scan_id) == "positive" else -1
        count = escaped = 0
        listed: list[int] = []
        for lo, hi in sorted(chunks):
            row = self._unresolved_row(scan_id, lo, hi)
            if not row:
                continue
            arr = np.frombuffer(row[0], dtype="<i8")
            count += int(arr.shape[0])
            escaped += int(np.frombuffer(row[1], dtype=np.uint8).sum())
            if len(listed) < first:
                listed.extend(sign * int(x) for x in arr[: first - len(listed)])
        return count, escaped, listed

    def summary(self) -> dict:
        """What the store holds: the map and, per scan configuration, chunks and starts done."""

        def work():
            meta = dict(self._conn.execute("SELECT key, value FROM meta").fetchall())
            return meta, _scan_summaries(self._conn)

        meta, scans = self._retry(work, "read")
        return {
            "path": str(self.path) if self.path else ":memory:",
            "map_key": meta.get("map_key"),
            "map_label": meta.get("map_label"),
            "map_definition": meta.get("map_definition"),
            "schema_version": int(meta.get("schema_version", 0)),
            "created_by": meta.get("created_by"),
            "created_at": meta.get("created_at"),
            "scans": scans,
        }

    # ----------------------------------------------------------------- lifetime
    def close(self) -> None:
        if self._conn is not None:
            self._conn.close()
            self._conn = None

    def __enter__(self) -> ScanStore:
        return self

    def __exit__(self, *exc) -> None:
        self.close()

    def __repr__(self) -> str:
        where = ":memory:" if self.memory else str(self.path)
        return f"ScanStore({where}, {self.map.label})"


def _chunk_rows(conn: sqlite3.Connection, scan_id: int, lo: int, hi: int):
    """A chunk's cycle rows ``(minimum, length, record bytes)`` and its unresolved row."""
    cyc = conn.execute(
        "SELECT minimum, length, CAST(record AS BLOB) FROM cycles"
        " WHERE scan_id = ? AND abs(minimum) BETWEEN ? AND ? ORDER BY minimum",
        (scan_id, lo, hi),
    ).fetchall()
    unres = conn.execute(
        "SELECT count, starts, escaped FROM unresolved WHERE scan_id = ? AND lo = ? AND hi = ?",
        (scan_id, lo, hi),
    ).fetchone()
    return cyc, unres


def _sane_chunk(row) -> bool:
    """A version-1 chunk row's range, sieve figures and time have sane types and values."""
    lo, hi, *_, sieved, depth, seconds, version = row
    ints = (lo, hi, *row[2:7], sieved, depth)
    if not all(isinstance(x, int) and not isinstance(x, bool) for x in ints):
        return False
    if not (1 <= lo <= hi <= MAX_START) or not (0 <= sieved <= hi - lo + 1) or depth < 0:
        return False
    return isinstance(seconds, (int, float)) and isinstance(version, str)


def _chunk_problem(lo: int, hi: int, counts, cycle_rows, unres) -> str | None:
    """Why a chunk's stored parts cannot be right, or None (checksums aside)."""
    try:
        values = [int(x) for x in counts]
    except (TypeError, ValueError):
        return "counts are not integers"
    if any(v < 0 for v in values):
        return "a negative count"
    if sum(values) != hi - lo + 1:
        return f"counts add up to {sum(values)}, not to the {hi - lo + 1} starts of the range"
    if values[1] != len(cycle_rows):
        return f"{len(cycle_rows)} cycles stored, {values[1]} counted"
    if unres is None:
        return "its unresolved starts are missing"
    count, starts, esc = unres
    if not isinstance(starts, bytes) or not isinstance(esc, bytes):
        return "unresolved starts are not stored as bytes"
    n_open = values[3] + values[4]
    if count != n_open or len(starts) != 8 * n_open or len(esc) != n_open:
        return "unresolved starts do not match the counts"
    arr = np.frombuffer(starts, dtype="<i8")
    if n_open and (int(arr.min()) < lo or int(arr.max()) > hi):
        return "an unresolved start lies outside the chunk"
    if n_open and int(np.frombuffer(esc, dtype=np.uint8).max()) > 1:
        return "an escape flag is not 0 or 1"
    return None


def prove_cycle_rows(m: Map, side: str, rows) -> str | None:
    """Re-prove stored cycle rows ``(minimum, length, record bytes)`` exactly; why one is wrong, or None.

    Each row must be on its side, and its record must equal the record of
    the cycle re-built and verified by exact iteration from its minimum.
    """
    from ..integer_cycle import verified_cycle

    for minimum, length, text in rows:
        try:
            rec = json.loads(text.decode("utf-8") if isinstance(text, bytes) else text)
            if (side == "positive") != (minimum > 0) or rec.get("minimum") != minimum:
                return f"stored cycle {minimum} is on the wrong side or mislabelled"
            if rec.get("length") != length or length < 1:
                return f"stored cycle {minimum} has a wrong length"
            fresh = verified_cycle(m, side, abs(minimum), length).to_record()
        except (ValueError, TypeError, AttributeError, RuntimeError, ArithmeticError):
            return f"stored cycle {minimum} does not re-prove"
        if json.loads(json.dumps(fresh, sort_keys=True)) != rec:
            return f"stored cycle {minimum} differs from its exact re-proof"
    return None


def _scan_summaries(conn: sqlite3.Connection) -> list[dict]:
    """Per scan configuration: side, step cap, length bound, chunks and starts done, extent."""
    scans = []
    for sid, side, steps, K in conn.execute(
        "SELECT id, side, max_steps, max_cycle_length FROM scans ORDER BY id"
    ).fetchall():
        n, starts, lo, hi = conn.execute(
            "SELECT count(*), coalesce(sum(hi - lo + 1), 0), min(lo), max(hi) FROM chunks"
            " WHERE scan_id = ? AND status = 'done'",
            (sid,),
        ).fetchone()
        scans.append(
            {
                "side": side,
                "max_steps": steps,
                "max_cycle_length": K,
                "chunks_done": n,
                "starts_done": starts,
                "lowest": lo,
                "highest": hi,
            }
        )
    return scans


# --------------------------------------------------------------------------- stores on disk
def store_info(path: str | os.PathLike) -> dict:
    """What a store file holds, read without writing and without knowing its map.

    Returns a dict with ``path``, ``size`` (bytes), ``modified`` (POSIX
    time), and when readable ``map_label``, ``map_key``, ``formula``,
    ``schema_version`` and ``scans`` (side, step cap, length bound, chunks,
    starts done, lowest and highest start); otherwise ``problem``.
    """
    p = Path(path)
    info, conn = open_store_readonly(p)
    if conn is None:
        return info
    try:
        if conn.execute("PRAGMA application_id").fetchone()[0] != _APPLICATION_ID:
            info["problem"] = "not a cyclewright scan store"
            return info
        meta = dict(conn.execute("SELECT key, value FROM meta").fetchall())
        info["schema_version"] = conn.execute("PRAGMA user_version").fetchone()[0]
        info["map_label"] = meta.get("map_label")
        info["map_key"] = meta.get("map_key")
        try:
            d = json.loads(meta.get("map_definition", "{}"))
            info["formula"] = Map(d["divisor"], d["branches"]).formula()
        except Exception:
            info["formula"] = None
        info["scans"] = _scan_summaries(conn)
        running = conn.execute("SELECT count(*) FROM runs WHERE status = 'running'").fetchone()[0]
        info["runs_marked_running"] = running
        if info["schema_version"] == 1:
            info["problem"] = (
                f"schema version 1: migrated to {SCHEMA_VERSION} (its chunks re-checked) "
                "when next used"
            )
        elif info["schema_version"] != SCHEMA_VERSION:
            info["problem"] = (
                f"schema version {info['schema_version']}, this cyclewright reads {SCHEMA_VERSION}"
            )
    except sqlite3.Error as exc:
        info["problem"] = ("busy" if _kind(exc) == "busy" else "unreadable") + f" ({exc})"
    finally:
        conn.close()
    return info


def list_stores(directory: str | os.PathLike | None = None) -> list[dict]:
    """:func:`store_info` of every ``*.sqlite`` file in ``directory`` (default: the stores' directory).

    >>> import tempfile
    >>> list_stores(tempfile.mkdtemp())
    []
    """
    root = Path(directory) if directory is not None else data_dir() / "scans"
    if not root.is_dir():
        return []
    return [store_info(p) for p in sorted(root.glob("*.sqlite")) if p.is_file()]


def remove_store(path: str | os.PathLike) -> int:
    """Delete a store file (with its journal) unless a process is using it; the bytes freed.

    Raises
    ------
    StoreError
        The file is not a scan store, or another process is using it.
    """

    def live(conn: sqlite3.Connection) -> list[tuple[int, str]]:
        rows = conn.execute("SELECT pid, host FROM runs WHERE status = 'running'").fetchall()
        return [(pid, host) for pid, host in rows if host != _host() or _pid_alive(int(pid))]

    return remove_sqlite_store(
        path,
        kind="scan store",
        header=_HEADER,
        is_ours=lambda conn: conn.execute("PRAGMA application_id").fetchone()[0] == _APPLICATION_ID,
        live_users=live,
        busy=lambda exc: _kind(exc) == "busy",
    )
