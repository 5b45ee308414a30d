"""cycles: the mathematics of cyclewright.

The public API is re-exported here and loaded lazily, so that importing
``cycles`` stays cheap (the compiled kernels load only when a scan runs).

>>> import maps, cycles
>>> cycles.solve(maps.get("3x+1"), "10").integral
True
"""

from __future__ import annotations

import importlib
import sys
import types

# public name -> module that defines it
_EXPORTS = {
    "Label": "labels",
    "EXACT": "labels",
    "CERTIFIED": "labels",
    "PROVED": "labels",
    "HEURISTIC": "labels",
    "HEURISTIC_CAUTION": "labels",
    "parse_itinerary": "itinerary",
    "format_itinerary": "itinerary",
    "composite": "itinerary",
    "ItineraryError": "itinerary",
    "solve": "solver",
    "RationalCycle": "solver",
    "orbit": "orbit",
    "Orbit": "orbit",
    "brent": "orbit",
    "necklace_count": "necklaces",
    "lyndon_count": "necklaces",
    "word_count": "necklaces",
    "lyndon_words": "necklaces",
    "necklace_numerators": "necklaces",
    "type_content": "necklaces",
    "MinimumBound": "bounds",
    "minimum_bound": "bounds",
    "LinearFormBound": "bounds",
    "linear_form_bound": "bounds",
    "LargestBound": "bounds",
    "largest_bound_up_to": "bounds",
    "bound_for_length": "bounds",
    "log_form": "bounds",
    "Interval": "bounds",
    "count": "counting",
    "TypeCount": "counting",
    "IntegerCycle": "counting",
    "sweep": "counting",
    "Sweep": "counting",
    "census": "census",
    "Census": "census",
    "census_family": "census",
    "verify_certificate": "certificate",
    "write_certificate": "certificate",
    "integral_cycles_by_itinerary": "wordsearch",
    "compare": "compare",
    "Comparison": "compare",
    "predictions": "compare",
    "excursions": "excursions",
    "scan": "scan",
    "ScanResult": "scan",
    "FoundCycle": "scan",
    "ScanProgress": "scan",
    "ScanStore": "store",
    "default_store_path": "store",
    "SieveTable": "sieve",
    "sieve_table": "sieve",
    "functional_graph": "graph",
    "FunctionalGraph": "graph",
    "GraphCycle": "graph",
    "floor": "floors",
    "Floor": "floors",
    "Approximant": "floors",
    "continued_fraction_log": "floors",
    "convergents": "floors",
    "semiconvergents": "floors",
    "simplest_fraction": "floors",
}

__all__ = sorted(_EXPORTS)


def __getattr__(name: str):
    module = _EXPORTS.get(name)
    if module is None:
        raise AttributeError(f"module 'cycles' has no attribute {name!r}")
    value = getattr(importlib.import_module(f"cycles.{module}"), name)
    globals()[name] = value
    return value


class _Package(types.ModuleType):
    """Keeps ``cycles.orbit``, ``cycles.scan``, ``cycles.census`` bound to the functions.

    The import system binds a loaded submodule as an attribute of its package;
    where a public function shares its module's name, the function wins (import
    the module's other names with ``from cycles.scan import ...``).
    """

    def __setattr__(self, name: str, value) -> None:
        if isinstance(value, types.ModuleType) and _EXPORTS.get(name) == name:
            return
        super().__setattr__(name, value)


sys.modules[__name__].__class__ = _Package


def __dir__():
    return sorted(set(globals()) | set(_EXPORTS))
