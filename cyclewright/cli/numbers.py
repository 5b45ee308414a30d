"""Integers written the way researchers write them: ``10^9``, ``2^63-1``, ``3*2^40``, ``1.5e9``.

One parser for every command option, every range and every study file;
exact (no float is involved) and guarded against absurd sizes.

- :func:`int_expression` -- ``"5*2^60"`` -> the integer.
- :func:`int_range` -- ``"1..10^2"`` (both ends expressions, optional step) -> ``range``.
"""

from __future__ import annotations

import re
from fractions import Fraction

__all__ = ["int_expression", "int_range", "MAX_DIGITS"]

#: Refuse results with more decimal digits than this (a typo, not a request).
MAX_DIGITS = 100_000

_FACTOR = re.compile(r"^(\d+)(?:\s*(?:\^|\*\*)\s*(\d+))?$|^(\d+(?:\.\d+)?)[eE]\+?(\d+)$")


def _factor(text: str) -> int:
    m = _FACTOR.match(text)
    if not m:
        raise ValueError(text)
    if m.group(1) is not None:
        base = int(m.group(1))
        if m.group(2) is None:
            return base
        exp = int(m.group(2))
        if base > 1 and exp * len(str(base)) > MAX_DIGITS:
            raise OverflowError(text)
        return base**exp
    exp = int(m.group(4))
    if exp > MAX_DIGITS:
        raise OverflowError(text)
    q = Fraction(m.group(3)) * 10**exp
    if q.denominator != 1:
        raise ValueError(text)
    return int(q)


def int_expression(text: str | int) -> int:
    """The integer that ``text`` denotes; raises ``ValueError`` with a one-line reason.

    Sums and differences of products of factors; a factor is ``123``,
    ``2^40`` (or ``2**40``) or ``1.5e9``; ``_`` and spaces are ignored.

    >>> int_expression("10^9"), int_expression("2^63-1"), int_expression("3*2^4")
    (1000000000, 9223372036854775807, 48)
    >>> int_expression("1.5e9"), int_expression("-17"), int_expression("10^10+10^8")
    (1500000000, -17, 10100000000)
    """
    if isinstance(text, int) and not isinstance(text, bool):
        return text
    if not isinstance(text, str):
        raise ValueError(f"expected an integer, got {text!r}")
    t = text.replace("_", "").replace(" ", "")
    if not t:
        raise ValueError("empty")
    # split into signed terms; a sign right after e/E/^ belongs to an exponent (and is rejected there)
    terms, sign, cur = [], 1, ""
    for ch in t:
        if ch in "+-" and cur and cur[-1] not in "eE^*":
            terms.append((sign, cur))
            sign, cur = (1 if ch == "+" else -1), ""
        elif ch in "+-" and not cur:
            sign = sign * (1 if ch == "+" else -1)
        else:
            cur += ch
    if not cur:
        raise ValueError(text)
    terms.append((sign, cur))
    total = 0
    try:
        for s, term in terms:
            value = 1
            for f in re.split(r"\*(?!\*)", term.replace("**", "^")):
                value *= _factor(f)
            total += s * value
    except OverflowError:
        raise ValueError(f"{text!r} is too large (more than {MAX_DIGITS} digits)") from None
    except ValueError:
        raise ValueError(
            f"must be an integer (like 1000000, 10^9, 2^63-1, 3*2^40 or 1e9), got {text!r}"
        ) from None
    return total


def int_range(text: str | int) -> range:
    """The inclusive range ``text`` denotes: ``"1..200"``, ``"1..10^2"``, ``"5"``, ``"1..50..2"``.

    Both ends (and the step) are integer expressions as in :func:`int_expression`;
    the end is included. Raises ``ValueError`` with a one-line reason.

    >>> list(int_range("1..5")), list(int_range("1..9..4")), int_range("2^3")
    ([1, 2, 3, 4, 5], [1, 5, 9], range(8, 9))
    >>> int_range("1..10^2")[-1], int_range("-3..-1")[0]
    (100, -3)
    """
    if isinstance(text, int) and not isinstance(text, bool):
        return range(text, text + 1)
    if not isinstance(text, str):
        raise ValueError(f"must be a range like 1..200, got {text!r}")
    parts = text.split("..")
    if len(parts) > 3 or any(not p.strip() for p in parts):
        raise ValueError(f"must be a range like 1..200 or 1..10^3 (end included), got {text!r}")
    try:
        nums = [int_expression(p) for p in parts]
    except ValueError as exc:
        raise ValueError(f"in the range {text!r}: {exc}") from None
    lo, hi, step = nums[0], nums[-1] if len(nums) > 1 else nums[0], 1
    if len(nums) == 3:
        hi, step = nums[1], nums[2]
    if step <= 0:
        raise ValueError(f"{text!r}: the step must be positive")
    if hi < lo:
        raise ValueError(f"{text!r}: the range is empty (end before start)")
    return range(lo, hi + 1, step)
