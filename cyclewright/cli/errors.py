"""Errors the CLI reports as one line ``error: ...`` with exit status 2.

Inside
------
- :class:`BadInput` -- raised by commands for bad input.
- :data:`USER_ERRORS` -- the API's error types that mean "the input was wrong".
- :func:`one_line` -- an error message as one line, long words shortened.
"""

from __future__ import annotations

import re

import click

__all__ = ["BadInput", "USER_ERRORS", "one_line", "MAX_WORD", "MAX_DIGIT_RUN"]

#: Runs of digits longer than this are shortened in error messages.
MAX_DIGIT_RUN = 60

#: Any other word longer than this is shortened (file paths up to it stay whole).
MAX_WORD = 300

_LONG = re.compile(r"\d{" + str(MAX_DIGIT_RUN + 1) + r",}|\S{" + str(MAX_WORD + 1) + ",}")


def _shorten_word(m: re.Match) -> str:
    w = m.group(0)
    unit = "digits" if w.isdigit() else "characters"
    return f"{w[:20]}…{w[-20:]} ({len(w)} {unit})"


def one_line(message: object) -> str:
    """``message`` on one line; long numbers and very long words shortened.

    >>> one_line("bad  value\\n  here")
    'bad value here'
    >>> one_line("to = " + "1" * 1001 + " is too large")
    'to = 11111111111111111111…11111111111111111111 (1001 digits) is too large'
    """
    try:
        text = str(message)
    except Exception as exc:  # a message that cannot even be rendered
        text = f"{type(message).__name__} ({type(exc).__name__} while rendering the message)"
    return _LONG.sub(_shorten_word, " ".join(text.split()))


class BadInput(click.ClickException):
    """Bad input from the user: one line on stderr, exit status 2."""

    exit_code = 2


def _user_errors() -> tuple[type[BaseException], ...]:
    # Error types of the API that mean "the input was wrong", not "we failed".
    from cyclewright.cycles.itinerary import ItineraryError
    from cyclewright.maps import MapError

    found: list[type[BaseException]] = [MapError, ItineraryError]
    try:  # modules that arrive later register their own input errors here
        from cyclewright.cycles.errors import InputError

        found.append(InputError)
    except ImportError:
        pass
    return tuple(found)


USER_ERRORS = _user_errors
