"""Output files: checked before any work, written atomically, never silently replaced."""

from __future__ import annotations

import os
import tempfile
from collections.abc import Callable
from pathlib import Path

import click

from cyclewright.cycles.figures import FIGURE_FORMATS as _FORMATS
from cyclewright.cycles.files import atomic_write as _atomic_write

from .errors import BadInput

__all__ = [
    "check_output",
    "check_distinct",
    "check_figure_path",
    "atomic_write",
    "save_figure",
    "FIGURE_FORMATS",
]

#: Figure formats chosen by the file's extension (the API's own list).
FIGURE_FORMATS = _FORMATS


def check_output(path: str | None, option: str, force: bool = False) -> Path | None:
    """Refuse (one-line :class:`BadInput`) an output path that exists (unless ``force``),
    is a directory or not a regular file (a device, a pipe: never replaced, even with
    ``force``), whose directory does not exist, or where no file can be created.
    ``None`` and ``-`` (stdout) pass."""
    if path is None or path == "-":
        return None
    if not str(path):
        raise BadInput(f"{option}: the file name is empty")
    p = Path(path)
    if p.exists() and p.is_dir():
        raise BadInput(f"{option} {path} is a directory")
    _refuse_an_input(p, option)
    if p.exists() and not force:
        raise BadInput(f"{option} {path} already exists (use --force to replace it)")
    if p.exists() and not p.is_file():
        raise BadInput(f"{option} {path} is not a regular file; it is never replaced")
    parent = p.parent if str(p.parent) else Path(".")
    if not parent.is_dir():
        raise BadInput(f"{option} {path}: directory {parent} does not exist")
    _check_writable(parent, f"{option} {path}")
    return p


#: The command's parameters that name files it reads (map files, a results store).
_INPUT_PARAMS = ("map_files", "store")


def _refuse_an_input(p: Path, option: str) -> None:
    """Refuse an output that is one of the command's input files (even with ``--force``)."""
    ctx = click.get_current_context(silent=True)
    if ctx is None or not p.exists():
        return
    for name in _INPUT_PARAMS:
        value = ctx.params.get(name)
        for given in value if isinstance(value, (tuple, list)) else [value]:
            if isinstance(given, (str, os.PathLike)) and str(given):
                try:
                    same = Path(given).exists() and os.path.samefile(given, p)
                except OSError:
                    same = False
                if same:
                    raise BadInput(
                        f"{option} {p} is an input of this command ({given}); choose another file"
                    )


def check_distinct(*paths: str | None) -> None:
    """Refuse two outputs naming the same file (one would silently replace the other).

    ``None`` and ``-`` (stdout) are skipped.
    """
    named = [Path(p).resolve() for p in paths if p is not None and p != "-"]
    if len(set(named)) != len(named):
        raise BadInput("two outputs name the same file")


def _check_writable(directory: Path, what: str) -> None:
    """Refuse a directory where no file can be created (tried with a file removed at once).

    Permission bits alone do not tell (root passes them; /proc refuses anyway)."""
    try:
        fd, probe = tempfile.mkstemp(prefix=".cyclewright-probe.", dir=directory)
    except OSError as exc:
        raise BadInput(f"{what}: cannot write in {directory} ({exc.strerror or exc})") from None
    os.close(fd)
    os.unlink(probe)


def atomic_write(path: str | os.PathLike, writer: Callable, *, binary: bool = False) -> Path:
    """Write through ``writer(fh)`` into a temporary file beside ``path``, then rename it over.

    The one atomic writer of the project (:func:`cyclewright.cycles.files.atomic_write`)
    does the work: the file honours the umask like any new file.
    """
    target = Path(path)

    def write(tmp: str) -> None:
        with open(tmp, "wb" if binary else "w", **({} if binary else {"newline": ""})) as fh:
            writer(fh)

    try:
        target.parent.mkdir(parents=True, exist_ok=True)
        return _atomic_write(target, write)
    except OSError as exc:  # a disk that filled up, a directory removed meanwhile
        raise BadInput(f"cannot write {path} ({exc.strerror or exc})") from None


def figure_format(path: str | os.PathLike) -> str:
    """``png``, ``svg`` or ``pdf`` from the file's extension (a one-line error otherwise).

    >>> figure_format("a/b.SVG")
    'svg'
    """
    ext = Path(path).suffix.lower().lstrip(".")
    if ext not in FIGURE_FORMATS:
        raise BadInput(
            f"plot file {path}: the extension must be .png, .svg or .pdf (it chooses the format)"
        )
    return ext


def check_figure_path(path: str | None, option: str, force: bool = False) -> Path | None:
    """:func:`check_output` for a figure, whose extension must name a format."""
    if path is None:
        return None
    figure_format(path)
    return check_output(path, option, force)


def save_figure(fig, path: str | os.PathLike) -> Path:
    """Save a matplotlib figure atomically, in the format its extension names (PNG, SVG or PDF),
    at exactly its size, without run-dependent metadata
    (:func:`cyclewright.cycles.figures.save_figure`)."""
    from cyclewright.cycles.figures import save_figure as _save

    figure_format(path)  # an unknown format: the command line's one-line error
    return _save(fig, path)
