"""The one progress protocol of the API.

Every long-running API function takes ``progress: ProgressCallback | None``
and calls it with :class:`ProgressEvent` values. The CLI turns these events
into a progress bar on a terminal and plain periodic lines otherwise; a
notebook user may pass any callable (``print`` works).

An event says which phase is running (``"plan"``, ``"bound"``, ``"scan"``,
``"enumerate"``...), how much of it is done and, when known, its total, in a
named unit (``"starts"``, ``"types"``, ``"lengths"``, ``"maps"``...).
Events of one phase have non-decreasing ``done``; a phase ends with an event
where ``done == total`` when the total is known.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

__all__ = ["ProgressEvent", "ProgressCallback", "report"]


@dataclass(frozen=True)
class ProgressEvent:
    """One report of progress.

    Attributes
    ----------
    phase : str
        Short name of the running phase.
    done : int
        Units finished in this phase.
    total : int or None
        Units in the whole phase, or None when not known in advance.
    unit : str
        What is counted.
    detail : str
        Free text shown beside the figures (e.g. the current map or side).
    """

    phase: str
    done: int
    total: int | None = None
    unit: str = ""
    detail: str = ""

    def __str__(self) -> str:
        tot = f"/{self.total:,}" if self.total is not None else ""
        extra = f" ({self.detail})" if self.detail else ""
        return f"{self.phase}: {self.done:,}{tot} {self.unit}{extra}".rstrip()


ProgressCallback = Callable[[ProgressEvent], None]


def report(
    progress: ProgressCallback | None,
    phase: str,
    done: int,
    total: int | None = None,
    unit: str = "",
    detail: str = "",
) -> None:
    """Send one event to ``progress`` when it is given (a no-op otherwise).

    Examples
    --------
    >>> report(print, "scan", 5, 10, "starts")
    scan: 5/10 starts
    >>> report(None, "scan", 5)
    """
    if progress is not None:
        progress(ProgressEvent(phase, done, total, unit, detail))
