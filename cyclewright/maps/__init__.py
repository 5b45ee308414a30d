"""Maps: the plugin layer of cyclewright.

A map is a divisor ``d >= 2`` and one affine branch ``(a_r, b_r)`` per residue
``r``: ``T(n) = (a_r n + b_r)/d`` for ``n ≡ r (mod d)``. Maps are defined once
-- in the built-in catalog, a plugin package (entry-point group
``cyclewright.maps``), a TOML file, or the ``ax+b`` shorthand -- and every
analysis consumes them unchanged.

>>> from cyclewright import maps
>>> maps.get("3x+1").step(7)
11
"""

from .mapfile import load_map_file, maps_from_toml_data
from .model import Branch, Map, MapError
from .registry import ENTRY_POINT_GROUP, Catalog, as_map, get, load_catalog
from .shorthand import parse_shorthand

__all__ = [
    "Branch",
    "Map",
    "MapError",
    "Catalog",
    "ENTRY_POINT_GROUP",
    "get",
    "as_map",
    "load_catalog",
    "load_map_file",
    "maps_from_toml_data",
    "parse_shorthand",
]
