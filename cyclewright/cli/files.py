"""Output files: checked before any work, written atomically, never silently replaced."""

from __future__ import annotations

import os
from collections.abc import Callable
from pathlib import Path

from cyclewright.cycles.figures import FIGURE_FORMATS as _FORMATS
from cyclewright.cycles.files import atomic_write as _atomic_write

from .errors import BadInput

__all__ = ["check_output", "check_figure_path", "atomic_write", "save_figure", "FIGURE_FORMATS"]

#: Figure formats chosen by the file's extension (the API's own list).
FIGURE_FORMATS = _FORMATS


def check_output(path: str | None, option: str, force: bool = False) -> Path | None:
    """Refuse (one-line :class:`BadInput`) an output path that exists (unless ``force``),
    is a directory, or whose directory does not exist. ``None`` and ``-`` (stdout) pass."""
    if path is None or path == "-":
        return None
    p = Path(path)
    if p.exists() and p.is_dir():
        raise BadInput(f"{option} {path} is a directory")
    if p.exists() and not force:
        raise BadInput(f"{option} {path} already exists (use --force to replace it)")
    parent = p.parent if str(p.parent) else Path(".")
    if not parent.is_dir():
        raise BadInput(f"{option} {path}: directory {parent} does not exist")
    return p


def atomic_write(path: str | os.PathLike, writer: Callable, *, binary: bool = False) -> Path:
    """Write through ``writer(fh)`` into a temporary file beside ``path``, then rename it over.

    The one atomic writer of the project (:func:`cyclewright.cycles.files.atomic_write`)
    does the work: the file honours the umask like any new file.
    """
    target = Path(path)
    target.parent.mkdir(parents=True, exist_ok=True)

    def write(tmp: str) -> None:
        with open(tmp, "wb" if binary else "w", **({} if binary else {"newline": ""})) as fh:
            writer(fh)

    return _atomic_write(target, write)


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
