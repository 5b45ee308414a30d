"""Where cyclewright keeps files on this machine, and how it writes them.

Inside
------
- :func:`data_dir` -- results stores (``$CYCLEWRIGHT_DATA_DIR``, else the
  platform's user data directory).
- :func:`cache_dir` -- files that only save time and can be rebuilt, such as
  sieve tables (``$CYCLEWRIGHT_CACHE_DIR``, else the user cache directory).
- :func:`atomic_write` -- write through a temporary file beside the target,
  then rename it into place: a reader sees the old file or the new one, never
  a part, and a failure leaves any existing file untouched.
"""

from __future__ import annotations

import os
import tempfile
from collections.abc import Callable
from pathlib import Path

__all__ = ["data_dir", "cache_dir", "atomic_write"]


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
        os.replace(tmp, target)
    except BaseException:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise
    return target
