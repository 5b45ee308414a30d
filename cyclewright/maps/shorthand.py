"""The ``ax+b`` shorthand: ``3x+1``, ``5x-1``, ``181x+1``, ``3x + 7`` ...

Inside
------
- :func:`parse_shorthand` -- text to :class:`~maps.model.Map` (divided form by
  default; ``undivided=True`` gives branch 1 = ``(2a, 2b)``, whose step counts
  are the classic ones).
- :func:`looks_like_shorthand` -- cheap test used when resolving map names.

The divided form sends even ``n`` to ``n/2`` and odd ``n`` to ``(a n + b)/2``;
it needs ``a + b`` even.
"""

from __future__ import annotations

import re

from .model import Map, MapError
from .text import quote

__all__ = ["parse_shorthand", "looks_like_shorthand"]

_PATTERN = re.compile(r"^\s*([+-]?)\s*(\d*)\s*[xn]\s*(?:([+-])\s*(\d+))?\s*$")


def looks_like_shorthand(text: str) -> bool:
    """True when ``text`` has the ``ax+b`` shape (it may still be invalid, e.g. ``3x+2``).

    >>> looks_like_shorthand("3x + 1"), looks_like_shorthand("mod3-4x")
    (True, False)
    """
    return bool(_PATTERN.match(text))


def parse_shorthand(text: str, *, undivided: bool = False) -> Map:
    """Parse ``ax+b`` into a two-branch map.

    Parameters
    ----------
    text : str
        ``a x + b`` with integers ``a != 0`` and ``b``; spaces allowed; ``n``
        may stand for ``x``; ``a`` defaults to 1.
    undivided : bool
        Give the undivided form ``n -> a n + b`` on odd ``n``.

    Returns
    -------
    Map
        Named by its normalised text (``3x+1``; ``3x+1 undivided``).

    Examples
    --------
    >>> parse_shorthand("3x + 1")
    Map(3x+1)
    >>> parse_shorthand("3x+1", undivided=True).branches[1]
    Branch(multiplier=6, offset=2)
    >>> parse_shorthand("3x+2")
    Traceback (most recent call last):
    ...
    cyclewright.maps.model.MapError: 3x+2: a + b = 5 is odd, so (3n+2)/2 is not an integer for odd n; use an odd offset, e.g. 3x+1 or 3x+3
    """
    m = _PATTERN.match(text)
    if not m:
        raise MapError(f"{quote(text)} is not of the form ax+b (for example 3x+1, 5x-1, 181x+1)")
    sign, digits, bsign, bdigits = m.groups()
    a = int(digits) if digits else 1
    if sign == "-":
        a = -a
    b = int(bdigits) if bdigits else 0
    if bsign == "-":
        b = -b
    if a == 0:
        raise MapError(f"{text.strip()}: the multiplier a must not be 0")
    norm = f"{'' if a == 1 else '-' if a == -1 else a}x" + (
        f"{'+' if b > 0 else '-'}{abs(b)}" if b else ""
    )
    if (a + b) % 2:
        lo, hi = b - 1, b + 1

        def fmt(c: int) -> str:
            return f"{'' if a == 1 else a}x{'+' if c >= 0 else '-'}{abs(c)}"

        raise MapError(
            f"{norm}: a + b = {a + b} is odd, so ({a}n{'+' if b >= 0 else '-'}{abs(b)})/2 is not an "
            f"integer for odd n; use an {'odd' if a % 2 else 'even'} offset, e.g. {fmt(lo)} or {fmt(hi)}"
        )
    if undivided:
        return Map(
            2,
            [(1, 0), (2 * a, 2 * b)],
            name=f"{norm} undivided",
            description=f"undivided {norm}: n/2 on even n, {a}n{'+' if b >= 0 else '-'}{abs(b)} on odd n",
            source="shorthand",
            undivided=True,
        )
    return Map(
        2,
        [(1, 0), (a, b)],
        name=norm,
        description=f"n/2 on even n, ({a}n{'+' if b >= 0 else '-'}{abs(b)})/2 on odd n",
        source="shorthand",
    )
