"""Integers written the way researchers write them: ``10^9``, ``2^63-1``, ``3*2^40``, ``1.5e9``.

Inside
------
- :func:`int_expression` -- the one parser for every command option, every
  range and every study file; exact (no float is involved) and guarded
  against absurd sizes.
- :func:`int_range` -- ``"1..10^2"`` (both ends expressions, optional step) -> ``range``.
- :data:`MAX_DIGITS`, :data:`MAX_INPUT_CHARS` -- the limits every integer
  input obeys before any option-specific limit (see docs/limits.md).
- Re-exported from :mod:`cyclewright.cycles.limits` (where every limit of an
  analysis is declared and checked): :func:`quote`, :func:`check_range`,
  :func:`check_memory`, :func:`check_members`, :func:`limit_text` and the
  ``MAX_*`` limits the option types use.
"""

from __future__ import annotations

import math
import re
from fractions import Fraction

# The limits of each analysis are the API's own (declared once, checked there);
# they are re-exported here for the option types and the study files.
from cyclewright.cycles.limits import (
    MAX_CENSUS_LENGTH,
    MAX_CF_CENSUS_LENGTH,
    MAX_CHUNKS,
    MAX_FAMILY_MEMBERS,
    MAX_START_DIGITS,
    MAX_STEP_CAP,
    MAX_TYPE_LENGTH,
    MAX_WORKERS,
    MEMORY_BUDGET,
    check_members,
    check_memory,
    check_range,
    limit_text,
    quote,
)

__all__ = [
    "int_expression",
    "int_range",
    "quote",
    "check_range",
    "check_memory",
    "limit_text",
    "MAX_DIGITS",
    "MAX_INPUT_CHARS",
    "MEMORY_BUDGET",
    "MAX_START_DIGITS",
    "MAX_CENSUS_LENGTH",
    "MAX_CF_CENSUS_LENGTH",
    "MAX_FAMILY_MEMBERS",
    "MAX_WORKERS",
    "MAX_STEP_CAP",
    "MAX_CHUNKS",
    "MAX_TYPE_LENGTH",
    "check_members",
]

#: Refuse integers with more decimal digits than this (a typo, not a request).
MAX_DIGITS = 100_000

#: Refuse integer expressions longer than this many characters.
MAX_INPUT_CHARS = MAX_DIGITS + 200

_FACTOR = re.compile(r"^(\d+)(?:\s*(?:\^|\*\*)\s*(\d+))?$|^(\d+(?:\.\d+)?)[eE]\+?(\d+)$")


def _too_many_digits(text: str) -> OverflowError:
    return OverflowError(text)


def _literal(digits: str) -> int:
    if len(digits.lstrip("0")) > MAX_DIGITS:
        raise _too_many_digits(digits)
    from .render import unlimited_digits

    with unlimited_digits():
        return int(digits)


def _factor(text: str) -> int:
    m = _FACTOR.match(text)
    if not m:
        raise ValueError(text)
    if m.group(1) is not None:
        base = _literal(m.group(1))
        if m.group(2) is None:
            return base
        exp = _literal(m.group(2))
        if base > 1 and exp * math.log10(base) > MAX_DIGITS + 1:
            raise _too_many_digits(text)
        return base**exp
    exp = _literal(m.group(4))
    if exp > MAX_DIGITS:
        raise _too_many_digits(text)
    q = Fraction(_literal(m.group(3).replace(".", ""))) / 10 ** len(
        (m.group(3).split(".") + [""])[1]
    )
    q *= 10**exp
    if q.denominator != 1:
        raise ValueError(text)
    return int(q)


_LIMIT = None


def _check_size(value: int, text: str) -> int:
    # at most MAX_DIGITS decimal digits; decided from the bit length, and by one
    # comparison near the border, never by converting to text
    global _LIMIT
    bits = value.bit_length()
    if bits > MAX_DIGITS * 3.3219280948873626 + 4:
        raise _too_many_digits(text)
    if bits >= MAX_DIGITS * 3.3219280948873626 - 4:
        if _LIMIT is None:
            _LIMIT = 10**MAX_DIGITS
        if abs(value) >= _LIMIT:
            raise _too_many_digits(text)
    return value


def int_expression(text: str | int) -> int:
    """The integer that ``text`` denotes; raises ``ValueError`` with a one-line reason.

    Sums and differences of products of factors; a factor is ``123``,
    ``2^40`` (or ``2**40``) or ``1.5e9``; ``_`` and spaces are ignored.
    Results have at most :data:`MAX_DIGITS` decimal digits and the text at
    most :data:`MAX_INPUT_CHARS` characters; longer input is refused
    before any work.

    >>> int_expression("10^9"), int_expression("2^63-1"), int_expression("3*2^4")
    (1000000000, 9223372036854775807, 48)
    >>> int_expression("1.5e9"), int_expression("-17"), int_expression("10^10+10^8")
    (1500000000, -17, 10100000000)
    """
    if isinstance(text, int) and not isinstance(text, bool):
        return text
    if not isinstance(text, str):
        raise ValueError(f"expected an integer, got {quote(repr(text))}")
    if len(text) > MAX_INPUT_CHARS:
        raise ValueError(
            f"{quote(text)} is too long (at most {MAX_INPUT_CHARS} characters, "
            f"results at most {MAX_DIGITS} digits)"
        )
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
        raise ValueError(
            f"must be an integer (like 1000000, 10^9, 2^63-1, 3*2^40 or 1e9), got {quote(text)}"
        )
    terms.append((sign, cur))
    total = 0
    try:
        for s, term in terms:
            value = 1
            for f in re.split(r"\*(?!\*)", term.replace("**", "^")):
                value = _check_size(value * _factor(f), text)
            total = _check_size(total + s * value, text)
    except OverflowError:
        raise ValueError(f"{quote(text)} is too large (more than {MAX_DIGITS} digits)") from None
    except ValueError:
        raise ValueError(
            f"must be an integer (like 1000000, 10^9, 2^63-1, 3*2^40 or 1e9), got {quote(text)}"
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
        raise ValueError(f"must be a range like 1..200, got {quote(text)}")
    parts = text.split("..")
    if len(parts) > 3 or any(not p.strip() for p in parts):
        raise ValueError(
            f"must be a range like 1..200 or 1..10^3 (end included), got {quote(text)}"
        )
    try:
        nums = [int_expression(p) for p in parts]
    except ValueError as exc:
        raise ValueError(f"in the range {quote(text)}: {exc}") from None
    lo, hi, step = nums[0], nums[-1] if len(nums) > 1 else nums[0], 1
    if len(nums) == 3:
        hi, step = nums[1], nums[2]
    if step <= 0:
        raise ValueError(f"{quote(text)}: the step must be positive")
    if hi < lo:
        raise ValueError(f"{quote(text)}: the range is empty (end before start)")
    return range(lo, hi + 1, step)
