"""Errors the CLI reports as one line ``error: ...`` with exit status 2."""

from __future__ import annotations

import click

__all__ = ["BadInput", "USER_ERRORS"]


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
