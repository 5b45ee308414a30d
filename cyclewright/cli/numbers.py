"""Integers written the way researchers write them: ``10^9``, ``2^63-1``, ``3*2^40``, ``1.5e9``.

Inside
------
- :func:`int_expression` -- the one parser for every command option, every
  range and every study file; exact (no float is involved) and guarded
  against absurd sizes.
- :func:`int_range` -- ``"1..10^2"`` (both ends expressions, optional step) -> ``range``.
- :func:`quote` -- a user's input quoted for an error message, shortened
  when long (``'1000000000…0000000000' (1001 characters)``).
- :func:`check_range` -- the one-line refusal of a value outside an
  option's documented limits (used by every option's type).
- :data:`MAX_DIGITS`, :data:`MAX_INPUT_CHARS` -- the limits every integer
  input obeys before any option-specific limit (see docs/limits.md).
"""

from __future__ import annotations

import math
import re
from fractions import Fraction

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

#: Work whose estimated peak memory exceeds this many bytes is refused before it starts.
MEMORY_BUDGET = 2 * 2**30

#: Largest cycle length K a census (or compare's census) accepts; planning
#: alone takes seconds at this size, and the scan it asks for is refused
#: by --max-scan long before.
MAX_CENSUS_LENGTH = 10**6

#: Largest K for a census whose largest bound comes from the continued
#: fraction of log_2 a (planning in constant time); the plan then refuses
#: any scan beyond --max-scan with its estimate.
MAX_CF_CENSUS_LENGTH = 10**9

#: Most members of a family (``3x+k --k A..B``) one run takes.
MAX_FAMILY_MEMBERS = 10_000

#: Most worker processes a run starts (each holds its own interpreter and kernels).
MAX_WORKERS = 64

#: Largest step cap per start (scan, graph) and cycle-length cap; the store and the
#: kernels hold these as 64-bit integers, and a cap beyond this never finishes anyway.
MAX_STEP_CAP = 10**9

#: Most chunks one scan is cut into (--chunk-size): each chunk costs about a
#: millisecond of bookkeeping and one store row.
MAX_CHUNKS = 10_000

#: Largest type length k (count) and odd-step range end (sweep, compare --odd).
MAX_TYPE_LENGTH = 100_000

#: Single starting values (``orbit N``) have at most this many digits.
MAX_START_DIGITS = 1000

_FACTOR = re.compile(r"^(\d+)(?:\s*(?:\^|\*\*)\s*(\d+))?$|^(\d+(?:\.\d+)?)[eE]\+?(\d+)$")


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


def check_range(
    value: int,
    what: str,
    *,
    text: object = None,
    minimum: int | None = None,
    maximum: int | None = None,
    why: str = "",
) -> int:
    """``value`` if ``minimum <= value <= maximum``, else ``ValueError`` with one line.

    The message names the option, the limit (as ``10^x`` or ``2^x`` when
    that is how it reads best) and the input, shortened when long; ``why``
    adds the reason for a limit (``"memory"``, ``"the store holds 64-bit integers"``).

    >>> check_range(5, "--show", minimum=0)
    5
    >>> check_range(-1, "--show", minimum=0)
    Traceback (most recent call last):
    ...
    ValueError: --show must be at least 0, got -1
    >>> check_range(10**30, "--max-steps", maximum=10**9, text="10^30")
    Traceback (most recent call last):
    ...
    ValueError: --max-steps must be at most 10^9, got '10^30'
    """
    got = quote(text) if isinstance(text, str) else _short_int(value)
    if minimum is not None and value < minimum:
        raise ValueError(f"{what} must be at least {limit_text(minimum)}, got {got}")
    if maximum is not None and value > maximum:
        tail = f" ({why})" if why else ""
        raise ValueError(f"{what} must be at most {limit_text(maximum)}, got {got}{tail}")
    return value


def _short_int(value: int) -> str:
    from .render import short

    return short(value, digits=20)


def limit_text(value: int) -> str:
    """A limit as people write it: ``10^9``, ``2^63-1``, ``2^20`` or plain digits.

    >>> limit_text(10**9), limit_text(2**63 - 1), limit_text(1 << 20), limit_text(4096), limit_text(500)
    ('10^9', '2^63-1', '2^20', '4096', '500')
    """
    if value >= 10**6:
        for base in (10, 2):
            e = round(math.log(value, base))
            if base**e == value:
                return f"{base}^{e}"
            if base**e - 1 == value:
                return f"{base}^{e}-1"
    return str(value)


def _bytes_text(n: int) -> str:
    for unit, size in (("GB", 10**9), ("MB", 10**6), ("kB", 10**3)):
        if n >= size:
            return f"{n / size:.1f} {unit}"
    return f"{n} bytes"


def check_memory(estimate: int, what: str, *, hint: str = "") -> int:
    """Refuse work whose estimated memory exceeds :data:`MEMORY_BUDGET` (``ValueError``).

    >>> check_memory(10**6, "the orbit")
    1000000
    >>> check_memory(10**10, "the orbit", hint="lower --max-steps")
    Traceback (most recent call last):
    ...
    ValueError: the orbit could need about 10.0 GB of memory, more than the 2.1 GB allowed; lower --max-steps
    """
    if estimate > MEMORY_BUDGET:
        tail = f"; {hint}" if hint else ""
        raise ValueError(
            f"{what} could need about {_bytes_text(estimate)} of memory, "
            f"more than the {_bytes_text(MEMORY_BUDGET)} allowed{tail}"
        )
    return estimate


def check_members(r: range, what: str, limit: int = MAX_FAMILY_MEMBERS) -> range:
    """``r`` if it has at most ``limit`` members, else ``ValueError`` (one line, no listing).

    >>> check_members(range(1, 11), "--k")
    range(1, 11)
    >>> check_members(range(1, 10**30 + 1), "--k")
    Traceback (most recent call last):
    ...
    ValueError: --k has 10^30 members; at most 10000 are taken in one run
    """
    size = max(0, (r.stop - r.start + r.step - (1 if r.step > 0 else -1)) // r.step)
    if size > limit:
        raise ValueError(
            f"{what} has {limit_text(size)} members; at most {limit} are taken in one run"
        )
    return r


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
