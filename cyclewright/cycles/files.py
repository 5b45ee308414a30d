"""Where cyclewright keeps files on this machine, and how it writes them.

Inside
------
- :func:`data_dir` -- results stores (``$CYCLEWRIGHT_DATA_DIR``, else the
  platform's user data directory).
- :func:`cache_dir` -- files that only save time and can be rebuilt, such as
  sieve tables (``$CYCLEWRIGHT_CACHE_DIR``, else the user cache directory).
- :func:`atomic_write` -- write through a temporary file beside the target,
  then rename it into place: a reader sees the old file or the new one, never
  a part, and a failure leaves any existing file untouched. The file gets the
  permissions any new file gets under the process's umask (``0644`` under the
  usual ``022``), so shared results come out shared.
- :func:`file_mode` -- that mode.
- :func:`open_store_readonly` -- the common start of a store's description:
  path, size with journal files, time modified, and a read-only connection
  (or the problem that kept it closed).
- :func:`remove_sqlite_store` -- delete an SQLite results store (with its
  journal files) unless a live process uses it; one procedure for the scan
  stores and the records stores, which differ only in how they recognise
  their files and their users.
"""

from __future__ import annotations

import os
import sqlite3
import tempfile
from collections.abc import Callable
from pathlib import Path

from .errors import StoreError

__all__ = [
    "data_dir",
    "cache_dir",
    "atomic_write",
    "file_mode",
    "open_store_readonly",
    "remove_sqlite_store",
]


def data_dir() -> Path:
    """``$CYCLEWRIGHT_DATA_DIR`` if set, else the platform's user data directory for cyclewright."""
    env = os.environ.get("CYCLEWRIGHT_DATA_DIR")
    if env:
        return Path(env).expanduser()
    import platformdirs

    return Path(platformdirs.user_data_dir("cyclewright"))


def cache_dir() -> Path:
    """``$CYCLEWRIGHT_CACHE_DIR`` if set, else the platform's user cache directory for cyclewright."""
    env = os.environ.get("CYCLEWRIGHT_CACHE_DIR")
    if env:
        return Path(env).expanduser()
    import platformdirs

    return Path(platformdirs.user_cache_dir("cyclewright"))


def atomic_write(path: str | os.PathLike, writer: Callable[[str], object]) -> Path:
    """Call ``writer(tmp)`` on a temporary path in the target's directory, then rename it to ``path``.

    The temporary name keeps the target's suffix (some writers, such as
    numpy's ``savez``, choose the format by it). Errors propagate; the
    temporary file is removed.

    >>> import tempfile, pathlib
    >>> d = pathlib.Path(tempfile.mkdtemp())
    >>> atomic_write(d / "a.txt", lambda p: pathlib.Path(p).write_text("x")).read_text()
    'x'
    """
    target = Path(path)
    directory = target.parent if str(target.parent) else Path(".")
    fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=target.suffix, dir=directory)
    os.close(fd)
    try:
        writer(tmp)
        os.chmod(tmp, file_mode())  # mkstemp makes 0600; a new file would get 0666 & ~umask
        os.replace(tmp, target)
    except BaseException:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise
    return target


def file_mode() -> int:
    """The mode a new file gets under the current umask (``0o666 & ~umask``).

    >>> old = os.umask(0o022)
    >>> oct(file_mode())
    '0o644'
    >>> _ = os.umask(old)
    """
    mask = os.umask(0)  # reading the umask means setting it: put it back at once
    os.umask(mask)
    return 0o666 & ~mask


def remove_sqlite_store(
    path: str | os.PathLike,
    *,
    kind: str,
    header: bytes,
    is_ours: Callable[[sqlite3.Connection], bool],
    live_users: Callable[[sqlite3.Connection], list[tuple[int, str]]],
    busy: Callable[[sqlite3.Error], bool],
) -> int:
    """Delete an SQLite results store and its journal files; the bytes freed.

    Parameters
    ----------
    path : path-like
    kind : str
        What the store is called in messages (``"scan store"``).
    header : bytes
        The file's first bytes (SQLite's header): anything else is not ours.
    is_ours : callable
        Whether an open connection shows one of our stores of this kind.
    live_users : callable
        The ``(pid, host)`` of live processes using it, read under an
        exclusive lock (nobody else may write while it goes).
    busy : callable
        Whether an SQLite error means another process holds the file.

    Raises
    ------
    StoreError
        No such file, not a store of this kind, or another process uses it;
        nothing is removed then. An unreadable or damaged file that starts
        like a store is still ours to remove.
    """
    p = Path(path)
    if not p.is_file():
        raise StoreError(f"no {kind} at {p}")
    not_ours = f"{p} is not a cyclewright {kind}; nothing was removed"
    with open(p, "rb") as fh:
        if fh.read(len(header)) != header:
            raise StoreError(not_ours)
    try:
        conn = sqlite3.connect(str(p), timeout=0.2, isolation_level=None)
        try:
            if not is_ours(conn):
                raise StoreError(not_ours)
            conn.execute("BEGIN EXCLUSIVE")  # nobody else may hold it while it goes
            live = live_users(conn)
            if live:
                conn.execute("ROLLBACK")
                who = ", ".join(f"process {pid} on {host}" for pid, host in live)
                raise StoreError(f"{kind} {p} is in use by {who}; nothing was removed")
            freed = p.stat().st_size
            p.unlink()
            conn.execute("ROLLBACK")
        finally:
            conn.close()
    except sqlite3.Error as exc:
        if busy(exc):
            raise StoreError(
                f"{kind} {p} is in use by another process; nothing was removed"
            ) from None
        freed = p.stat().st_size  # an unreadable or damaged file: still ours to remove
        p.unlink()
    for extra in ("-journal", "-wal", "-shm"):
        side = p.with_name(p.name + extra)
        try:
            freed += side.stat().st_size
            side.unlink()
        except OSError:
            pass
    return freed


def open_store_readonly(path: Path) -> tuple[dict, sqlite3.Connection | None]:
    """Start a store's description and open it read-only.

    Returns ``(info, conn)``: ``info`` holds ``path``, ``size`` (bytes, the
    journal files included) and ``modified`` (POSIX time); ``conn`` is a
    read-only connection decoding damaged text with replacement characters,
    or None when the file cannot be opened (then ``info["problem"]`` says why).
    """
    st = path.stat()
    info: dict = {"path": str(path), "size": st.st_size, "modified": st.st_mtime}
    for extra in ("-journal", "-wal"):
        side = path.with_name(path.name + extra)
        if side.exists():
            info["size"] += side.stat().st_size
    try:
        conn = sqlite3.connect(path.resolve().as_uri() + "?mode=ro", uri=True, timeout=0.5)
    except sqlite3.Error as exc:
        info["problem"] = f"cannot be opened ({exc})"
        return info, None
    conn.text_factory = lambda b: b.decode("utf-8", "replace")
    return info, conn
