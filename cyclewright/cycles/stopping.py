"""Stop signals: SIGINT, SIGTERM and SIGHUP end a command the same way.

Inside
------
- :data:`STOP_SIGNALS` -- the signals handled.
- :func:`install_stop_handlers` -- make each raise :class:`KeyboardInterrupt`
  (the CLI calls it; a notebook keeps its own handlers).
- :func:`stop_signal` -- which stop signal arrived, if any.
- :func:`check_interrupt` -- raise :class:`KeyboardInterrupt` if one arrived,
  even when a library swallowed the first one (while kernels compile, say).
- :func:`exit_status` -- ``128 + signal number``, the shell's convention.

Long loops (the executors' wait for chunks) call :func:`check_interrupt`, so
an interrupt at any moment ends the work.
"""

from __future__ import annotations

import os
import signal
import threading

__all__ = [
    "STOP_SIGNALS",
    "install_stop_handlers",
    "stop_signal",
    "check_interrupt",
    "exit_status",
]

#: Signals that end a command like Ctrl-C: one message, exit status, consistent store.
STOP_SIGNALS = tuple(
    getattr(signal, n) for n in ("SIGINT", "SIGTERM", "SIGHUP") if hasattr(signal, n)
)
_stop: dict = {"signal": None}


def stop_signal() -> int | None:
    """The stop signal this process received since :func:`install_stop_handlers`, if any."""
    return _stop["signal"]


#: Code that runs Python callbacks from C (the compiler's object cache): an
#: exception raised there is printed and dropped, so the stop waits for the
#: next :func:`check_interrupt` instead.
_CALLBACK_CODE = ("llvmlite", f"{os.sep}numba{os.sep}")


def _inside_callback(frame) -> bool:
    while frame is not None:
        name = frame.f_code.co_filename
        if any(part in name for part in _CALLBACK_CODE):
            return True
        frame = frame.f_back
    return False


def _on_stop(signum, frame) -> None:
    first = _stop["signal"] is None
    _stop["signal"] = signum
    if first and not _inside_callback(frame):
        raise KeyboardInterrupt


def install_stop_handlers() -> None:
    """Make SIGINT, SIGTERM and SIGHUP raise :class:`KeyboardInterrupt` in the main thread.

    A second signal while the first is being handled is only remembered, so
    the clean-up of the first is not itself interrupted; so is a signal that
    arrives while the kernel compiler runs Python callbacks (which would
    drop the exception): the next :func:`check_interrupt` raises it.
    """
    if threading.current_thread() is not threading.main_thread():
        return
    _stop["signal"] = None
    for sig in STOP_SIGNALS:
        signal.signal(sig, _on_stop)


def check_interrupt() -> None:
    """Raise :class:`KeyboardInterrupt` if a stop signal arrived (and was swallowed).

    >>> check_interrupt()  # nothing arrived: returns
    """
    if _stop["signal"] is not None:
        raise KeyboardInterrupt


def exit_status(default: int = 130) -> int:
    """``128 + signal number`` of the stop signal received, else ``default``.

    >>> exit_status()
    130
    """
    sig = _stop["signal"]
    return 128 + int(sig) if sig is not None else default
