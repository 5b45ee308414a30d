"""Itineraries (parity vectors and their d-ary generalisation) as words.

Inside
------
- :func:`parse_itinerary` -- text to a tuple of residues: digit strings
  (``"11100"``), run-length tokens (``"1^3 0^2"``), or comma-separated
  residues for divisors above 10 (``"11,0,3^2"``).
- :func:`format_itinerary` -- the inverse (plain digits, or comma-separated for d > 10).
- :func:`primitive_root` / :func:`is_primitive` -- the shortest word whose power is the word.
- :func:`rotations`, :func:`least_rotation` -- necklace representatives.
- :func:`composite` -- ``(A, B)`` with ``T_w(n) = (A n + B) / d^k``.
- :func:`content` -- how many times each residue occurs (the type).
- :class:`OfContent` -- ``length`` and ``odd`` of a result that holds a type's
  ``content`` (the counting figures, the minimum bound, the predictions).
- :data:`MAX_ITINERARY_LENGTH` -- the longest itinerary accepted.

References
----------
.. [1] R. Terras, "A stopping time problem on the positive integers",
   Acta Arithmetica 30 (1976), 241-252 (parity vectors).
.. [2] C. Böhm and G. Sontacchi, "On the existence of cycles of given length
   in integer sequences like x_{n+1} = x_n/2 if x_n even, and x_{n+1} = 3x_n+1
   otherwise", Atti Accad. Naz. Lincei 64 (1978), 260-264.
"""

from __future__ import annotations

import re
from collections.abc import Sequence

from .errors import InputError

__all__ = [
    "ItineraryError",
    "parse_itinerary",
    "format_itinerary",
    "primitive_root",
    "is_primitive",
    "rotations",
    "least_rotation",
    "composite",
    "content",
    "OfContent",
    "MAX_ITINERARY_LENGTH",
]

#: Longest itinerary accepted: its exact cycle has that many elements of about
#: as many digits each, so work and memory grow with the square of the length
#: (3x+1 at this length: about 2 s; ten times longer: minutes).
MAX_ITINERARY_LENGTH = 100_000


class ItineraryError(InputError):
    """A malformed or too long itinerary (one-sentence message; an :class:`InputError`)."""


_TOKEN = re.compile(r"^(\d+)(?:\^(\d+))?$")


def parse_itinerary(text: str | Sequence[int], divisor: int) -> tuple[int, ...]:
    """Parse an itinerary for a map with the given divisor.

    Parameters
    ----------
    text : str or sequence of int
        For ``divisor <= 10``: words of digits, each optionally followed by
        ``^count`` (the word repeated), separated by spaces or commas:
        ``"11100"``, ``"1^3 0^2"``, ``"10^3 0"``. For ``divisor > 10``:
        residues separated by commas or spaces, each optionally ``^count``.
        A sequence of ints is taken as the residues themselves.
    divisor : int
        The map's ``d``; every residue must be in ``0 .. d-1``.

    Returns
    -------
    tuple of int

    Examples
    --------
    >>> parse_itinerary("1^3 0^2", 2)
    (1, 1, 1, 0, 0)
    >>> parse_itinerary("10^2 0", 2)
    (1, 0, 1, 0, 0)
    >>> parse_itinerary("12", 2)
    Traceback (most recent call last):
    ...
    cyclewright.cycles.itinerary.ItineraryError: digit 2 is not a residue mod 2 (use 0..1)

    References
    ----------
    Terras 1976 (the parity vector); see the module docstring.
    """
    if not isinstance(text, str):
        word = tuple(int(r) for r in text)
        if len(word) > MAX_ITINERARY_LENGTH:
            raise ItineraryError(f"the itinerary has more than {MAX_ITINERARY_LENGTH} letters")
    else:
        tokens = [t for t in re.split(r"[\s,]+", text.strip()) if t]
        if not tokens:
            raise ItineraryError("the itinerary is empty")
        word_list: list[int] = []
        for tok in tokens:
            m = _TOKEN.match(tok)
            if not m:
                raise ItineraryError(
                    f"cannot read {tok!r}: use digits, optionally with ^count (e.g. 11100 or 1^3 0^2)"
                )
            body, count = m.group(1), m.group(2)
            if divisor <= 10:
                piece = [int(c) for c in body]
            else:
                piece = [int(body)]
            if count is not None and len(count.lstrip("0")) > 12:
                raise ItineraryError(
                    f"{tok[:40]!r}: the itinerary would be longer than {MAX_ITINERARY_LENGTH} letters"
                )
            reps = int(count) if count is not None else 1
            if reps < 1:
                raise ItineraryError(f"{tok[:40]!r}: the repeat count must be at least 1")
            if len(word_list) + len(piece) * reps > MAX_ITINERARY_LENGTH:
                raise ItineraryError(
                    f"the itinerary has more than {MAX_ITINERARY_LENGTH} letters "
                    f"(at least {len(word_list) + len(piece) * reps}); the exact cycle of a "
                    "longer one takes minutes and gigabytes"
                )
            for r in piece:
                if r >= divisor:
                    raise ItineraryError(
                        f"{'digit' if divisor <= 10 else 'residue'} {r} is not a residue mod {divisor} "
                        f"(use 0..{divisor - 1})"
                    )
            word_list.extend(piece * reps)
        word = tuple(word_list)
    if not word:
        raise ItineraryError("the itinerary is empty")
    for r in word:
        if not 0 <= r < divisor:
            raise ItineraryError(f"residue {r} is not in 0..{divisor - 1}")
    return word


def format_itinerary(word: Sequence[int], divisor: int) -> str:
    """Digits for ``divisor <= 10``, comma-separated residues otherwise.

    Parameters
    ----------
    word : sequence of int
        Residues.
    divisor : int
        The map's ``d``.

    Returns
    -------
    str
        The form :func:`parse_itinerary` reads back.

    Examples
    --------
    >>> format_itinerary((1, 1, 0), 2)
    '110'
    >>> format_itinerary((11, 0), 12)
    '11,0'

    References
    ----------
    Terras 1976 (the parity vector); see the module docstring.
    """
    if divisor <= 10:
        return "".join(str(r) for r in word)
    return ",".join(str(r) for r in word)


def primitive_root(word: Sequence[int]) -> tuple[int, ...]:
    """The shortest ``u`` with ``word = u^m``.

    >>> primitive_root((1, 0, 1, 0))
    (1, 0)
    """
    w = tuple(word)
    k = len(w)
    for p in range(1, k + 1):
        if k % p == 0 and w[:p] * (k // p) == w:
            return w[:p]
    return w  # pragma: no cover - p = k always matches


def is_primitive(word: Sequence[int]) -> bool:
    """True when ``word`` is not a proper power of a shorter word."""
    return len(primitive_root(word)) == len(word)


def rotations(word: Sequence[int]) -> list[tuple[int, ...]]:
    """All ``k`` cyclic rotations (with repeats for non-primitive words)."""
    w = tuple(word)
    return [w[i:] + w[:i] for i in range(len(w))]


def least_rotation(word: Sequence[int]) -> tuple[int, ...]:
    """The lexicographically least rotation (the necklace representative).

    >>> least_rotation((1, 1, 0, 1, 0))
    (0, 1, 0, 1, 1)
    """
    return min(rotations(word))


def content(word: Sequence[int], divisor: int) -> tuple[int, ...]:
    """How many times each residue ``0 .. d-1`` occurs.

    >>> content((1, 1, 0), 2)
    (1, 2)
    """
    counts = [0] * divisor
    for r in word:
        counts[r] += 1
    return tuple(counts)


class OfContent:
    """``length`` and ``odd`` of a type held as ``content`` (steps per residue ``0 .. d-1``).

    >>> from dataclasses import dataclass
    >>> @dataclass(frozen=True)
    ... class T(OfContent):
    ...     content: tuple[int, ...]
    >>> T((3, 2)).length, T((3, 2)).odd, T((1, 1, 1)).odd
    (5, 2, None)
    """

    content: tuple[int, ...]

    @property
    def length(self) -> int:
        """``k``, the number of steps."""
        return sum(self.content)

    @property
    def odd(self) -> int | None:
        """For two-branch maps, ``x`` (steps on residue 1); None otherwise."""
        return self.content[1] if len(self.content) == 2 else None


def composite(
    branches: Sequence[tuple[int, int]], divisor: int, word: Sequence[int]
) -> tuple[int, int]:
    """``(A, B)`` such that reading ``word`` maps ``n`` to ``(A n + B) / d^k``.

    The recursion is ``A <- a_r A`` and ``B <- a_r B + b_r d^i`` at step
    ``i = 0, 1, ...``, from ``(A, B) = (1, 0)`` (Böhm and Sontacchi 1978 for 3x+1).

    Parameters
    ----------
    branches : sequence of (int, int)
        ``(a_r, b_r)`` for each residue ``r``.
    divisor : int
        ``d``.
    word : sequence of int
        The residues read, first letter first.

    Returns
    -------
    tuple of int
        ``(A, B)``, exact.

    Examples
    --------
    >>> composite([(1, 0), (3, 1)], 2, (1, 1, 0))   # 3x+1: (9n + 5)/8
    (9, 5)

    References
    ----------
    Böhm and Sontacchi 1978; see the module docstring.
    """
    A, B, dk = 1, 0, 1
    for r in word:
        a, b = branches[r]
        A, B = a * A, a * B + b * dk
        dk *= divisor
    return A, B
