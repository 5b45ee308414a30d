"""Text helpers for messages about maps (and, re-exported, every other message).

Inside
------
- :func:`quote` -- a user's word for a message, shortened in the middle when long.
"""

from __future__ import annotations

__all__ = ["quote"]


def quote(text: object, width: int = 48) -> str:
    """``repr(text)``, shortened in the middle when longer than ``width`` characters.

    >>> quote("10^9")
    "'10^9'"
    >>> quote("1" * 1000)
    "'11111111111111111111…11111111111111111111' (1000 characters)"
    """
    s = text if isinstance(text, str) else str(text)
    if len(s) <= width:
        return repr(s)
    keep = max(width // 2 - 4, 4)
    return f"{s[:keep]!r}"[:-1] + "…" + f"{s[-keep:]!r}"[1:] + f" ({len(s)} characters)"
