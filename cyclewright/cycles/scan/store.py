"""The results store of the scan: an SQLite ledger, one file per map definition.

Inside
------
- :class:`ScanStore` -- open (validating first) or create a store; record
  finished chunks atomically; read back counts, cycles and unresolved starts.
- :class:`ChunkRecord` -- what the store knows about one finished chunk.
- :func:`default_store_path` -- where a map's store lives by default
  (``$CYCLEWRIGHT_DATA_DIR``, else the platform's user data directory).
- :data:`SCHEMA_VERSION`, :data:`SEMANTICS` -- versions checked on opening.

Layout (schema version 1)
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
    Each invocation: range, chunk size, start and end time, status
    (``running``, ``complete``, ``interrupted``).
``chunks``
    One row per finished chunk ``[lo, hi]`` (absolute values of the starts):
    status ``done``, the counts per classification, how many starts the sieve
    decided, the sieve depth, seconds, code version.
``cycles``
    Every cycle found (its minimum is signed; the record is JSON).
``unresolved``
    Per chunk, all unresolved starts (absolute values) as a little-endian
    int64 blob, with a byte per start telling whether the orbit passed 2^63.

Every chunk is written in one transaction together with its cycles and
unresolved starts, so a process killed at any moment leaves either the whole
chunk or nothing; a re-run recomputes exactly the missing chunks. Opening
never writes before the file has been checked: a file that is not an SQLite
database of this kind, a store of another map definition, a store of another
schema or semantics version, or a path that cannot be written raises
:class:`~cyclewright.cycles.errors.StoreError` and leaves the file as it was.

SQLite integers are signed 64-bit, so starts are limited to ``2^63 - 1``
(:data:`MAX_START`).
"""

from __future__ import annotations

import datetime as _dt
import json
import os
import sqlite3
from collections.abc import Iterator
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from cyclewright.maps import Map, as_map

from ..errors import StoreError
from ..files import data_dir

__all__ = [
    "ScanStore",
    "ChunkRecord",
    "default_store_path",
    "data_dir",
    "SCHEMA_VERSION",
    "SEMANTICS",
    "MAX_START",
    "code_version",
]

#: Layout version of the file; a store of another version is refused.
SCHEMA_VERSION = 1
#: Version of the classification rules (kernels.py / reference.py); results of
#: another version are not comparable, so such a store is refused.
SEMANTICS = 1
#: Largest start a store can hold (SQLite INTEGER).
MAX_START = 2**63 - 1
_APPLICATION_ID = 0x43574C53  # "CWLS": cyclewright ledger of scans
_HEADER = b"SQLite format 3\x00"
_COUNT_KEYS = ("drops", "cycles", "other_cycle", "unresolved", "beyond_length")

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
    started_at TEXT NOT NULL,
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
"""


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


def default_store_path(m: Map | str) -> Path:
    """``<data dir>/scans/<label>-<key prefix>.sqlite``: one store per map definition.

    >>> from cyclewright import maps
    >>> default_store_path(maps.get("3x+1")).name
    '3x+1-f477e9122784.sqlite'
    """
    m = as_map(m)
    safe = "".join(c if c.isalnum() or c in "+-_." else "_" for c in m.label)[:40]
    return data_dir() / "scans" / f"{safe}-{m.key[:12]}.sqlite"


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

    Raises
    ------
    StoreError
        The file is not a store of this kind, belongs to another map
        definition or another version, is corrupt, or cannot be written. The
        file is not modified.

    Examples
    --------
    >>> from cyclewright import maps
    >>> st = ScanStore(":memory:", maps.get("3x+1"))
    >>> sid = st.scan_id("positive", 1000, None)
    >>> st.finished(sid, [(1, 10)])
    {}
    >>> st.close()
    """

    def __init__(self, path: str | os.PathLike, m: Map, *, create_dirs: bool = False) -> None:
        self.map = m
        self.memory = str(path) == ":memory:"
        self.path = None if self.memory else Path(path).expanduser()
        if self.memory:
            self._conn = sqlite3.connect(":memory:")
            self._create(self._conn)
            return
        p = self.path
        if p.exists():
            self._conn = self._open_existing(p)
        else:
            self._conn = self._create_new(p, create_dirs)

    # ----------------------------------------------------------------- opening
    def _open_existing(self, p: Path) -> sqlite3.Connection:
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
        if not os.access(p, os.W_OK) or not os.access(p.parent, os.W_OK):
            raise StoreError(f"store {p} is not writable (permission denied); nothing was changed")
        try:
            conn = sqlite3.connect(p.resolve().as_uri() + "?mode=rw", uri=True, timeout=30)
        except sqlite3.Error as exc:
            raise StoreError(f"store {p} cannot be opened: {exc}") from None
        try:
            self._validate(conn, p)
        except BaseException:
            conn.close()
            raise
        self._pragmas(conn)
        return conn

    def _validate(self, conn: sqlite3.Connection, p: Path) -> None:
        try:
            app = conn.execute("PRAGMA application_id").fetchone()[0]
            version = conn.execute("PRAGMA user_version").fetchone()[0]
            check = conn.execute("PRAGMA quick_check").fetchone()[0]
        except sqlite3.DatabaseError as exc:
            raise StoreError(f"store {p} is corrupt ({exc}); nothing was changed") from None
        if check != "ok":
            raise StoreError(
                f"store {p} is corrupt (integrity check: {check}); nothing was changed"
            )
        if app != _APPLICATION_ID:
            raise StoreError(
                f"{p} is an SQLite database but not a cyclewright scan store; nothing was changed"
            )
        if version != SCHEMA_VERSION:
            raise StoreError(
                f"store {p} has schema version {version}; this cyclewright reads version "
                f"{SCHEMA_VERSION} (incompatible version, nothing was changed)"
            )
        try:
            meta = dict(conn.execute("SELECT key, value FROM meta").fetchall())
        except sqlite3.DatabaseError as exc:
            raise StoreError(f"store {p} is corrupt ({exc}); nothing was changed") from None
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
            raise StoreError(
                f"store {p} holds scans of {theirs}, not of {self.map.label} = "
                f"{self.map.formula()} (the map definition differs); use another --store"
            )

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
        # Build the file under a temporary name and move it into place, so a
        # store either exists complete or not at all.
        tmp = parent / f".{p.name}.{os.getpid()}.tmp"
        try:
            conn = sqlite3.connect(str(tmp))
            self._create(conn)
            conn.close()
            os.replace(tmp, p)
        except (OSError, sqlite3.Error) as exc:
            try:
                tmp.unlink()
            except OSError:
                pass
            raise StoreError(f"cannot create store {p}: {exc}") from None
        conn = sqlite3.connect(str(p), timeout=30)
        self._pragmas(conn)
        return conn

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
        conn.execute("PRAGMA synchronous = NORMAL")
        conn.execute("PRAGMA foreign_keys = ON")

    # ----------------------------------------------------------------- scans
    def scan_id(self, side: str, max_steps: int, max_cycle_length: int | None) -> int:
        """The id of a scan configuration, created on first use."""
        config = f"{side}|steps={max_steps}|length={max_cycle_length if max_cycle_length else '-'}"
        row = self._conn.execute("SELECT id FROM scans WHERE config = ?", (config,)).fetchone()
        if row:
            return int(row[0])
        with self._conn:
            cur = self._conn.execute(
                "INSERT INTO scans (side, max_steps, max_cycle_length, config, created_by, created_at)"
                " VALUES (?, ?, ?, ?, ?, ?)",
                (side, max_steps, max_cycle_length, config, code_version(), _now()),
            )
        return int(cur.lastrowid)

    def side_of(self, scan_id: int) -> str:
        return self._conn.execute("SELECT side FROM scans WHERE id = ?", (scan_id,)).fetchone()[0]

    def begin_run(self, scan_id: int, lo: int, hi: int, chunk_size: int) -> int:
        with self._conn:
            cur = self._conn.execute(
                "INSERT INTO runs (scan_id, lo, hi, chunk_size, code_version, started_at, status)"
                " VALUES (?, ?, ?, ?, ?, ?, 'running')",
                (scan_id, lo, hi, chunk_size, code_version(), _now()),
            )
        return int(cur.lastrowid)

    def end_run(self, run_id: int, status: str) -> None:
        with self._conn:
            self._conn.execute(
                "UPDATE runs SET status = ?, finished_at = ? WHERE id = ?", (status, _now(), run_id)
            )

    # ----------------------------------------------------------------- chunks
    def finished(self, scan_id: int, chunks) -> dict[tuple[int, int], ChunkRecord]:
        """The finished chunks among ``chunks`` (pairs ``(lo, hi)``), by range."""
        wanted = set(chunks)
        if not wanted:
            return {}
        lo = min(c[0] for c in wanted)
        hi = max(c[1] for c in wanted)
        rows = self._conn.execute(
            "SELECT lo, hi, drops, cycles, other_cycle, unresolved, beyond_length, sieved,"
            " sieve_depth, seconds, code_version FROM chunks"
            " WHERE scan_id = ? AND status = 'done' AND lo >= ? AND hi <= ?",
            (scan_id, lo, hi),
        ).fetchall()
        out = {}
        for r in rows:
            key = (int(r[0]), int(r[1]))
            if key in wanted:
                counts = dict(zip(_COUNT_KEYS, (int(x) for x in r[2:7])))
                out[key] = ChunkRecord(key[0], key[1], counts, int(r[7]), int(r[8]), r[9], r[10])
        return out

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
    ) -> None:
        """Store one finished chunk with its cycles and unresolved starts, atomically."""
        starts = np.ascontiguousarray(unresolved, dtype="<i8")
        esc = np.ascontiguousarray(escaped, dtype=np.uint8)
        with self._conn:
            self._conn.execute(
                "INSERT OR REPLACE INTO chunks VALUES (?, ?, ?, 'done', ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)",
                (
                    scan_id,
                    lo,
                    hi,
                    *(int(counts.get(k, 0)) for k in _COUNT_KEYS),
                    int(sieved),
                    int(sieve_depth),
                    float(seconds),
                    version,
                    _now(),
                ),
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

    # ----------------------------------------------------------------- reading
    def cycles(self, scan_id: int, lo: int, hi: int) -> list[dict]:
        """Cycle records with ``lo <= |minimum| <= hi``, by ``|minimum|``."""
        rows = self._conn.execute(
            "SELECT record FROM cycles WHERE scan_id = ? AND abs(minimum) BETWEEN ? AND ?"
            " ORDER BY abs(minimum)",
            (scan_id, lo, hi),
        ).fetchall()
        return [json.loads(r[0]) for r in rows]

    def unresolved(self, scan_id: int, chunks=None) -> Iterator[tuple[int, bool]]:
        """``(start, escaped)`` for every unresolved start (signed by side), chunk by chunk.

        ``escaped`` tells whether the orbit passed 2^63 in absolute value.
        """
        sign = 1 if self.side_of(scan_id) == "positive" else -1
        if chunks is None:
            rows = self._conn.execute(
                "SELECT starts, escaped FROM unresolved WHERE scan_id = ? ORDER BY lo", (scan_id,)
            )
            blobs = list(rows)
        else:
            blobs = []
            for lo, hi in sorted(chunks):
                row = self._conn.execute(
                    "SELECT starts, escaped FROM unresolved WHERE scan_id = ? AND lo = ? AND hi = ?",
                    (scan_id, lo, hi),
                ).fetchone()
                if row:
                    blobs.append(row)
        for starts, esc in blobs:
            arr = np.frombuffer(starts, dtype="<i8")
            flags = np.frombuffer(esc, dtype=np.uint8)
            for s, e in zip(arr.tolist(), flags.tolist()):
                yield sign * s, bool(e)

    def unresolved_summary(
        self, scan_id: int, chunks, first: int = 20
    ) -> tuple[int, int, list[int]]:
        """``(count, escaped, first starts)`` over the given chunks, without listing them all."""
        sign = 1 if self.side_of(scan_id) == "positive" else -1
        count = escaped = 0
        listed: list[int] = []
        for lo, hi in sorted(chunks):
            row = self._conn.execute(
                "SELECT starts, escaped FROM unresolved WHERE scan_id = ? AND lo = ? AND hi = ?",
                (scan_id, lo, hi),
            ).fetchone()
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
        meta = dict(self._conn.execute("SELECT key, value FROM meta").fetchall())
        scans = []
        for sid, side, steps, K in self._conn.execute(
            "SELECT id, side, max_steps, max_cycle_length FROM scans ORDER BY id"
        ).fetchall():
            n, starts = self._conn.execute(
                "SELECT count(*), coalesce(sum(hi - lo + 1), 0) FROM chunks WHERE scan_id = ?",
                (sid,),
            ).fetchone()
            scans.append(
                {
                    "side": side,
                    "max_steps": steps,
                    "max_cycle_length": K,
                    "chunks_done": n,
                    "starts_done": starts,
                }
            )
        return {
            "path": str(self.path) if self.path else ":memory:",
            "map_key": meta.get("map_key"),
            "map_label": meta.get("map_label"),
            "schema_version": int(meta.get("schema_version", 0)),
            "created_by": meta.get("created_by"),
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
