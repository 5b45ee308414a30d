"""The console entry point: stop signals are handled from its first line on.

Inside
------
- :func:`run` -- what the ``cyclewright`` command and ``python -m
  cyclewright`` run: the stop signals are handled before anything heavy is
  imported, then :func:`cyclewright.cli.app.run` does the work.

This module imports only the standard library's ``os``, ``signal`` and
``sys`` (already loaded by the interpreter), so its handlers are in place
a few microseconds after the interpreter reaches the entry point. From then
on SIGINT, SIGTERM and SIGHUP raise :class:`KeyboardInterrupt`, and any
:class:`KeyboardInterrupt` that reaches :func:`run` -- while click, numba or
a command module is still being imported, or while the exit handlers run --
ends the process with the one line ``error: interrupted`` and exit status
``128 + signal`` (130 for Ctrl-C), the same as an interrupt during a
command (:mod:`cyclewright.cycles.stopping`). A signal that arrives before
the interpreter has reached the entry point (its own start-up and
``site``) gets Python's default handling: this is the one window no code of
the project can cover.
"""

from __future__ import annotations

import os
import signal
import sys

__all__ = ["run"]

_STOP_NAMES = ("SIGINT", "SIGTERM", "SIGHUP")
_received: list[int] = []


def _early_stop(signum, frame) -> None:
    """The first stop signal raises :class:`KeyboardInterrupt`; later ones are only noted."""
    _received.append(signum)
    if len(_received) == 1:
        raise KeyboardInterrupt


def _install() -> None:
    for name in _STOP_NAMES:
        sig = getattr(signal, name, None)
        if sig is None:  # pragma: no cover - a platform without it
            continue
        try:
            signal.signal(sig, _early_stop)
        except (ValueError, OSError):  # pragma: no cover - not the main thread
            pass


def _status() -> int:
    """``128 + signal`` of the stop signal received (the command's record first), else 130."""
    stopping = sys.modules.get("cyclewright.cycles.stopping")
    sig = stopping.stop_signal() if stopping is not None else None
    if sig is None and _received:
        sig = _received[0]
    return 128 + int(sig) if sig is not None else 130


def _stopped() -> None:
    """One line, the exit status, and an immediate end (nothing more can interrupt it)."""
    for name in _STOP_NAMES:
        sig = getattr(signal, name, None)
        if sig is not None:
            try:
                signal.signal(sig, signal.SIG_IGN)
            except (ValueError, OSError):  # pragma: no cover
                pass
    for stream in (sys.stdout, sys.stderr):
        try:
            stream.flush()
        except (OSError, ValueError):
            pass
    try:
        os.write(2, b"error: interrupted\n")
    except OSError:  # pragma: no cover - stderr closed
        pass
    os._exit(_status())


def run() -> None:
    """Console entry point: handle stop signals at once, then run the command.

    :func:`cyclewright.cli.app.run` ends the process itself; an interrupt
    that escapes it (or arrives while it is being imported) ends it here.
    """
    _install()
    try:
        from cyclewright.cli.app import run as run_command

        run_command()
    except KeyboardInterrupt:
        _stopped()
