"""Finding maps by name: entry-point catalogs, TOML files and the shorthand.

Inside
------
- :class:`Catalog` -- the maps known in this session, looked up by name or
  alias; unknown names fall back to the ``ax+b`` shorthand.
- :func:`load_catalog` -- collect the maps from every distribution that
  registers under the entry-point group ``cyclewright.maps`` (the built-in
  catalog included), the user's config directory and explicit map files.
- :func:`get` -- ``maps.get("5x+1")``: one map from the default catalog.

Precedence: explicit map files come after the user's config directory,
which comes after plugins and the built-in catalog. A file's map may take
over a name already known (or a name that reads as ``ax+b`` shorthand with
another meaning) only with ``override = true`` in its table; without it the
file is refused with one line. Two plugins defining the same name
differently is a conflict reported when that name is asked for.
"""

from __future__ import annotations

import os
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field, replace
from importlib import metadata

from .mapfile import load_map_file, user_map_files
from .model import Map, MapError
from .shorthand import looks_like_shorthand, parse_shorthand
from .text import quote

__all__ = ["ENTRY_POINT_GROUP", "Catalog", "load_catalog", "get", "as_map", "discover_plugins"]

ENTRY_POINT_GROUP = "cyclewright.maps"
_OWN_DIST = "cyclewright"


def _norm(name: str) -> str:
    return "".join(name.split()).lower()


_ids = iter(range(1 << 62))


def _next_id() -> int:
    return next(_ids)


@dataclass
class Catalog:
    """Maps known by name. ``catalog.get(spec)`` resolves a name, alias or shorthand.

    Adding a map costs constant time (dictionaries keyed by name), so a
    catalog of ``n`` maps is built in time linear in ``n``.

    Examples
    --------
    >>> cat = load_catalog(include_user=False)
    >>> cat.get("3x + 1").name
    '3x+1'
    >>> cat.get("11x+3").formula()   # not in the catalog: parsed as shorthand
    '11x+3'
    """

    problems: list[str] = field(default_factory=list)
    _entries: dict[int, Map] = field(default_factory=dict, repr=False)
    _by_name: dict[str | None, set[int]] = field(default_factory=dict, repr=False)
    _index: dict[str, Map] = field(default_factory=dict, repr=False)
    _conflicts: dict[str, str] = field(default_factory=dict, repr=False)

    @property
    def maps(self) -> list[Map]:
        """The maps, in the order they were added (shadowed ones left out)."""
        return list(self._entries.values())

    def add(self, m: Map, *, override: bool) -> None:
        """Register ``m`` under its name and aliases.

        With ``override`` (map files) it replaces whatever had those names;
        otherwise a different definition under a taken name becomes a conflict.
        """
        labels = [_norm(x) for x in (m.name, *m.aliases) if x]
        if not override:
            taken = [k for k in labels if k in self._index]
            if taken and all(self._index[k] == m for k in taken) and len(taken) == len(labels):
                return  # the same definition again (e.g. a plugin repeating a built-in)
            for k in taken:
                if self._index[k] != m:
                    old = self._index[k]
                    self._conflicts[k] = f"{k!r} is defined both by {old.source} and by {m.source}"
            labels = [k for k in labels if k not in taken]
        else:
            for k in labels:
                self._conflicts.pop(k, None)
            shadowed = {self._index[k].name for k in labels if k in self._index}
            for name in shadowed:
                for i in self._by_name.pop(name, ()):
                    self._entries.pop(i, None)
        for k in labels:
            self._index[k] = m
        i = _next_id()
        self._entries[i] = m
        self._by_name.setdefault(m.name, set()).add(i)

    def check_file_map(self, m: Map) -> None:
        """Refuse a map file's map that gives a known name or a shorthand another meaning.

        A file may take over such a name only with ``override = true`` in the
        map's table (the explicit, visible opt-in); the same definition again
        is always fine.
        """
        if m.override:
            return
        for label in (m.name, *m.aliases):
            if not label:
                continue
            k = _norm(label)
            old = self._index.get(k)
            if old is not None and old != m:
                raise MapError(
                    f"{m.source[5:] if m.source.startswith('file:') else m.source}: map "
                    f"{label!r} would replace {old.label} ({old.formula()}, from {old.source}) "
                    f"with {m.formula()}; add override = true to its table to do that on purpose"
                )
            if old is None and looks_like_shorthand(label):
                try:
                    meant = parse_shorthand(label)
                except MapError:
                    continue
                if meant != m:
                    raise MapError(
                        f"{m.source[5:] if m.source.startswith('file:') else m.source}: map "
                        f"{label!r} reads as the shorthand {meant.formula()} but is defined as "
                        f"{m.formula()}; rename it, or add override = true to its table"
                    )

    def names(self) -> list[str]:
        """Primary names, in catalog order."""
        return [m.name for m in self.maps if m.name]

    def __iter__(self):
        return iter(self.maps)

    def __len__(self) -> int:
        return len(self.maps)

    def get(self, spec: str | Map) -> Map:
        """Resolve a map name, alias or ``ax+b`` shorthand; raises :class:`MapError`."""
        if isinstance(spec, Map):
            return spec
        if not isinstance(spec, str) or not spec.strip():
            raise MapError("a map name or ax+b shorthand is required")
        k = _norm(spec)
        if k in self._conflicts:
            raise MapError(self._conflicts[k] + "; rename one of them")
        if k in self._index:
            return self._index[k]
        if looks_like_shorthand(spec):
            m = parse_shorthand(spec)
            # Same definition as a catalog map: return that one (it carries metadata).
            return self._index.get(_norm(m.name), m)
        known = ", ".join(self.names()[:12])
        hint = f" (plugin problems: {'; '.join(self.problems)})" if self.problems else ""
        raise MapError(
            f"unknown map {quote(spec)}: not in the catalog ({known}, ...) and not ax+b shorthand{hint}"
        )


def discover_plugins() -> tuple[list[tuple[str, Map]], list[str]]:
    """Load every entry point of group ``cyclewright.maps``.

    Returns
    -------
    (maps, problems)
        ``maps`` is a list of ``(distribution name, Map)``; ``problems`` lists
        entry points that failed to load, one sentence each.
    """
    found: list[tuple[str, Map]] = []
    problems: list[str] = []
    eps = metadata.entry_points(group=ENTRY_POINT_GROUP)
    for ep in sorted(eps, key=lambda e: (e.dist.name if e.dist else "", e.name)):
        dist = ep.dist.name if ep.dist is not None else "unknown"
        try:
            provider = ep.load()
            items = provider() if callable(provider) else provider
            if isinstance(items, Map):
                items = [items]
            for m in items:
                if not isinstance(m, Map):
                    raise TypeError(f"returned {type(m).__name__}, not Map")
                src = "builtin" if dist == _OWN_DIST else f"plugin:{dist}"
                found.append((dist, replace(m, source=src)))
        except Exception as exc:  # a broken plugin must not take the tool down
            problems.append(f"entry point {ep.name!r} of {dist}: {type(exc).__name__}: {exc}")
    return found, problems


def load_catalog(
    map_files: Sequence[str | os.PathLike] | None = None,
    *,
    include_user: bool = True,
    include_plugins: bool = True,
) -> Catalog:
    """Collect all maps known in this session.

    Parameters
    ----------
    map_files : list of paths, optional
        TOML map files given explicitly (``--maps FILE``); they win over
        every other source.
    include_user : bool
        Read the user's config directory (``maps.toml``, ``maps/*.toml``).
    include_plugins : bool
        Load the entry-point group ``cyclewright.maps`` (built-in catalog included).

    Returns
    -------
    Catalog
    """
    cat = Catalog()
    plugin_maps: Iterable[tuple[str, Map]] = []
    if include_plugins:
        plugin_maps, problems = discover_plugins()
        cat.problems.extend(problems)
        if not any(dist == _OWN_DIST for dist, _ in plugin_maps):
            # Running from a source tree without installed metadata: load the
            # built-in catalog directly so the tool still works.
            from .catalog import builtin_maps

            plugin_maps = [
                (_OWN_DIST, replace(m, source="builtin")) for m in builtin_maps()
            ] + list(plugin_maps)
    for _, m in plugin_maps:
        cat.add(m, override=False)
    files = [*(user_map_files() if include_user else ()), *(map_files or ())]
    for path in files:
        for m in load_map_file(path):
            cat.check_file_map(m)
            cat.add(m, override=True)
    return cat


_default: Catalog | None = None


def get(spec: str | Map, map_files: Sequence[str | os.PathLike] | None = None) -> Map:
    """One map by catalog name, alias or ``ax+b`` shorthand.

    Examples
    --------
    >>> get("5x+1").ax_b
    (5, 1)
    >>> get("mod3-4x").divisor
    3
    """
    global _default
    if map_files:
        return load_catalog(map_files).get(spec)
    if _default is None:
        _default = load_catalog()
    return _default.get(spec)


def as_map(spec: str | Map) -> Map:
    """The map itself, or the map a name, alias or shorthand denotes (default catalog).

    Every public function of :mod:`cyclewright.cycles` calls this on its map
    argument, so a notebook may pass ``"3x+1"`` wherever a :class:`Map` is asked for.

    Examples
    --------
    >>> as_map("3x+1") is as_map(as_map("3x+1"))
    True
    >>> as_map(3)
    Traceback (most recent call last):
    ...
    cyclewright.maps.model.MapError: expected a Map or a map name, got 3
    """
    if isinstance(spec, Map):
        return spec
    if not isinstance(spec, str):
        raise MapError(f"expected a Map or a map name, got {spec!r}")
    return get(spec)
