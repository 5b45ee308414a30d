"""The one progress display of the CLI, fed with :class:`~cyclewright.cycles.progress.ProgressEvent`.

On a terminal (stderr is a tty) it draws a ``rich.progress`` bar per phase
that disappears when the command ends; otherwise (a log file, a pipe, a
test) it writes a plain line ``progress: scan: 1,000/10,000 starts`` at most
once every few seconds, and nothing at all for work that ends sooner.

Every command passes ``progress=display`` (a :class:`ProgressDisplay`) to the
API; :func:`messages` turns the study runner's text messages into events.
"""

from __future__ import annotations

import sys
import time
from collections.abc import Callable
from typing import TypeVar

from cyclewright.cycles.progress import ProgressEvent

T = TypeVar("T")

__all__ = ["ProgressDisplay", "progress_display", "with_progress", "messages", "PLAIN_INTERVAL"]

#: Seconds between two plain progress lines (and before the first one).
PLAIN_INTERVAL = 5.0


class ProgressDisplay:
    """A callable taking :class:`ProgressEvent`; use as a context manager.

    Parameters
    ----------
    stream : file, optional
        Where progress goes (default: ``sys.stderr``).
    tty : bool, optional
        Draw a bar (default: whether ``stream`` is a terminal).
    interval : float
        Seconds between plain lines.
    clock : callable
        Monotonic clock (tests pass their own).

    Examples
    --------
    >>> import io
    >>> out = io.StringIO()
    >>> t = iter([0.0, 1.0, 6.0, 7.0])
    >>> with ProgressDisplay(out, tty=False, clock=lambda: next(t)) as show:
    ...     show(ProgressEvent("scan", 10, 100, "starts"))
    ...     show(ProgressEvent("scan", 50, 100, "starts"))
    >>> out.getvalue()
    'progress: scan: 50/100 starts\\n'
    """

    def __init__(
        self,
        stream=None,
        *,
        tty: bool | None = None,
        interval: float = PLAIN_INTERVAL,
        clock: Callable[[], float] = time.monotonic,
    ) -> None:
        self.stream = stream if stream is not None else sys.stderr
        try:
            self.tty = self.stream.isatty() if tty is None else tty
        except (AttributeError, ValueError):
            self.tty = False
        self.interval = interval
        self.clock = clock
        self.started = clock()
        self.last = self.started
        self._bar = None
        self._tasks: dict[str, int] = {}

    # --------------------------------------------------------------- events
    def __call__(self, event: ProgressEvent) -> None:
        if self.tty:
            self._draw(event)
            return
        now = self.clock()
        if now - self.last >= self.interval:
            self.last = now
            self.stream.write(f"progress: {event}\n")
            self.stream.flush()

    def _draw(self, event: ProgressEvent) -> None:
        if self._bar is None:
            from rich.console import Console
            from rich.progress import (
                BarColumn,
                MofNCompleteColumn,
                Progress,
                TextColumn,
                TimeElapsedColumn,
                TimeRemainingColumn,
            )

            self._bar = Progress(
                TextColumn("{task.description}"),
                BarColumn(),
                MofNCompleteColumn(),
                TextColumn("{task.fields[unit]}"),
                TimeElapsedColumn(),
                TimeRemainingColumn(),
                console=Console(file=self.stream),
                transient=True,
            )
            self._bar.start()
        label = event.phase + (f" ({event.detail})" if event.detail else "")
        task = self._tasks.get(label)
        if task is None:
            task = self._bar.add_task(label, total=event.total, unit=event.unit)
            self._tasks[label] = task
        self._bar.update(
            task, completed=event.done, total=event.total, description=label, unit=event.unit
        )

    def notice(self, text: str) -> None:
        """One line of news (a damaged chunk recomputed, a busy store...), above any bar."""
        if self._bar is not None:
            self._bar.console.print(text, markup=False, highlight=False, soft_wrap=True)
        else:
            self.stream.write(text + "\n")
            self.stream.flush()

    # --------------------------------------------------------------- lifetime
    def close(self) -> None:
        """Remove the bar (a terminal) and end the display."""
        if self._bar is not None:
            self._bar.stop()
            self._bar = None
            self._tasks.clear()

    def __enter__(self) -> ProgressDisplay:
        return self

    def __exit__(self, *exc) -> None:
        self.close()


def progress_display() -> ProgressDisplay:
    """The display on stderr (a bar on a terminal, plain periodic lines otherwise)."""
    return ProgressDisplay()


def with_progress(fn: Callable[..., T], *args, **kwargs) -> T:
    """``fn(*args, progress=display, **kwargs)`` inside the one progress display.

    >>> with_progress(lambda n, progress: n + 1, 41)
    42
    """
    with progress_display() as show:
        return fn(*args, progress=show, **kwargs)


def messages(show: Callable[[ProgressEvent], None], phase: str, unit: str = ""):
    """A ``say(text)`` callback (the study runner's) that reports numbered events.

    >>> seen = []
    >>> say = messages(seen.append, "study", "analyses")
    >>> say("sweep 3x+1"); say("scan 3x+1"); str(seen[1])
    'study: 1 analyses (scan 3x+1)'
    """
    count = [0]

    def say(text: str) -> None:
        show(ProgressEvent(phase, count[0], None, unit, text))
        count[0] += 1

    return say
