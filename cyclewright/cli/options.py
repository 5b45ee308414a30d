"""Options shared by commands, and map resolution for the CLI."""

from __future__ import annotations

import functools

import click

from cyclewright.maps import Map, MapError, load_catalog

from .errors import BadInput

__all__ = ["maps_option", "json_option", "resolve_map", "catalog_for"]


def maps_option(f):
    """``--maps FILE`` (repeatable): TOML map files that extend the catalog."""
    return click.option(
        "--maps",
        "map_files",
        multiple=True,
        type=click.Path(dir_okay=False),
        help="TOML file of map definitions (repeatable); its names win over the catalog.",
    )(f)


def json_option(f):
    """``--json``: one JSON document on stdout instead of a table."""
    return click.option(
        "--json", "as_json", is_flag=True, help="Print one JSON document instead of tables."
    )(f)


@functools.lru_cache(maxsize=16)
def _catalog(files: tuple[str, ...]):
    return load_catalog(list(files))


def catalog_for(map_files) -> object:
    """The catalog with the given extra map files (errors become exit-2 one-liners)."""
    try:
        return _catalog(tuple(map_files or ()))
    except MapError as exc:
        raise BadInput(str(exc)) from None


def resolve_map(spec: str, map_files=()) -> Map:
    """A map by name, alias or shorthand, or a one-line error."""
    try:
        return catalog_for(map_files).get(spec)
    except MapError as exc:
        raise BadInput(str(exc)) from None


def parse_int(text, what: str, *, minimum: int | None = None, maximum: int | None = None) -> int:
    """An integer option written as ``1000000``, ``10^9``, ``2^63-1``, ``3*2^40`` or ``1e9``.

    Bad input becomes a one-line :class:`BadInput` naming the option.

    >>> parse_int("2^40", "--verified-to")
    1099511627776
    """
    from .numbers import int_expression

    try:
        value = int_expression(text)
    except ValueError as exc:
        raise BadInput(f"{what} {exc}") from None
    if minimum is not None and value < minimum:
        raise BadInput(f"{what} must be at least {minimum}, got {text!r}")
    if maximum is not None and value > maximum:
        raise BadInput(f"{what} must be at most {maximum}, got {text!r}")
    return value
