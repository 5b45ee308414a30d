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
"""

from __future__ import annotations

import os
import tempfile
from collections.abc import Callable
from pathlib import Path

__all__ = ["data_dir", "cache_dir", "atomic_write", "file_mode"]


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
