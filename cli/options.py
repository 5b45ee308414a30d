"""Options shared by commands, and map resolution for the CLI."""

from __future__ import annotations

import functools

import click

from maps import Map, MapError, load_catalog

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
