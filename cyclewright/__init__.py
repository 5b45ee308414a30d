"""cyclewright: a workbench for research on Collatz-type maps.

One import gives the whole API a notebook needs; every function takes a map
as a :class:`Map` or by name (catalog name, alias or ``ax+b`` shorthand)::

    >>> import cyclewright as cw
    >>> c = cw.solve("3x+5", "11100")
    >>> c.integral, c.minimum
    (True, Fraction(19, 1))
    >>> cw.count("3x+1", 13, 8).candidates
    8

The names below are loaded on first use, so ``import cyclewright`` stays
cheap (the compiled kernels load only when a scan runs). The subpackages
hold the rest: :mod:`cyclewright.maps` (the plugin layer: map model, catalog,
map files), :mod:`cyclewright.cycles` (the mathematics, one concept per
module) and :mod:`cyclewright.cli` (the ``cyclewright`` command). The module
map is in docs/design.md.
"""

from __future__ import annotations

import importlib

# public name -> module (relative to this package) that defines it
_EXPORTS = {
    # maps
    "Map": "maps.model",
    "Branch": "maps.model",
    "MapError": "maps.model",
    "get_map": "maps.registry",
    "load_catalog": "maps.registry",
    "load_map_file": "maps.mapfile",
    # labels and errors
    "Label": "cycles.labels",
    "EXACT": "cycles.labels",
    "CERTIFIED": "cycles.labels",
    "PROVED": "cycles.labels",
    "HEURISTIC": "cycles.labels",
    "InputError": "cycles.errors",
    # the shared vocabulary: sides, step cap and ceiling, progress events
    "Side": "cycles.sides",
    "SIDES": "cycles.sides",
    "DEFAULT_SIDE": "cycles.sides",
    "PerSide": "cycles.sides",
    "DEFAULT_MAX_STEPS": "cycles.limits",
    "DEFAULT_CEILING": "cycles.limits",
    "lift_limits": "cycles.limits",
    "ProgressEvent": "cycles.progress",
    # itineraries and exact cycles
    "parse_itinerary": "cycles.itinerary",
    "format_itinerary": "cycles.itinerary",
    "composite": "cycles.itinerary",
    "solve": "cycles.solver",
    "RationalCycle": "cycles.solver",
    "orbit": "cycles.orbit",
    "Orbit": "cycles.orbit",
    "IntegerCycle": "cycles.integer_cycle",
    # counting
    "word_count": "cycles.necklaces",
    "necklace_count": "cycles.necklaces",
    "lyndon_count": "cycles.necklaces",
    "lyndon_words": "cycles.necklaces",
    "followed_word_count": "cycles.realizable",
    "realizable_necklace_counts": "cycles.realizable",
    "realizable_rho": "cycles.realizable",
    "count": "cycles.counting",
    "TypeCount": "cycles.counting",
    "sweep": "cycles.sweep",
    "Sweep": "cycles.sweep",
    # bounds
    "Interval": "cycles.intervals",
    "log_form": "cycles.intervals",
    "minimum_bound": "cycles.minimum_bound",
    "MinimumBound": "cycles.minimum_bound",
    "linear_form_bound": "cycles.linear_forms",
    "certified_linear_form_bound": "cycles.linear_forms",
    "LinearFormBound": "cycles.linear_forms",
    "largest_bound_up_to": "cycles.largest_bound",
    "bound_for_length": "cycles.largest_bound",
    "LargestBound": "cycles.largest_bound",
    # continued fractions and floors
    "continued_fraction_log": "cycles.continued_fractions",
    "convergents": "cycles.continued_fractions",
    "semiconvergents": "cycles.continued_fractions",
    "simplest_fraction": "cycles.continued_fractions",
    "floor": "cycles.floors",
    "Floor": "cycles.floors",
    # searches
    "scan": "cycles.scan.run",
    "ScanResult": "cycles.scan.result",
    "functional_graph": "cycles.graph",
    "FunctionalGraph": "cycles.graph",
    "integral_cycles_by_itinerary": "cycles.wordsearch",
    "census": "cycles.census",
    "Census": "cycles.census",
    "census_family": "cycles.census",
    "write_certificate": "cycles.certificate",
    "verify_certificate": "cycles.certificate",
    "excursions": "cycles.excursions",
    "Excursions": "cycles.excursions",
    "compare": "cycles.compare",
    "Comparison": "cycles.compare",
    "records": "cycles.records",
    "RangeRecords": "cycles.records",
    # the results stores on this machine
    "stores": "cycles.stores",
    "StoresListing": "cycles.stores",
}

_SUBPACKAGES = ("maps", "cycles", "cli")

# names whose module calls them differently
_RENAMED = {"get_map": "get"}

__all__ = sorted(_EXPORTS)


def __getattr__(name: str):
    if name in _SUBPACKAGES:
        return importlib.import_module(f"{__name__}.{name}")
    module = _EXPORTS.get(name)
    if module is None:
        raise AttributeError(f"module 'cyclewright' has no attribute {name!r}")
    value = getattr(importlib.import_module(f"{__name__}.{module}"), _RENAMED.get(name, name))
    globals()[name] = value
    return value


def __dir__():
    return sorted(set(globals()) | set(_EXPORTS))
