"""One vocabulary across the API: maps by name or as Map, one side type, one step-cap name.

Every public function that takes a map (the exports of :mod:`cyclewright`
and every function in a ``cyclewright.cycles`` module's ``__all__`` whose
first parameter is the map) is called once with a map name and once with the
:class:`Map` itself; both calls must give the same result. A new public
function that takes a map and has no recipe below fails the walk.
"""

from __future__ import annotations

import dataclasses
import importlib
import inspect
import pkgutil

import pytest

import cyclewright
import cyclewright.cycles
from cyclewright import maps
from cyclewright.cycles.errors import InputError
from cyclewright.cycles.progress import ProgressEvent
from cyclewright.cycles.sides import DEFAULT_SIDE, SIDES, PerSide, parse_side

NAME = "3x+1"
MAP = maps.get(NAME)

# name -> (positional arguments after the map, keyword arguments), small and fast
RECIPES: dict[str, tuple[tuple, dict]] = {
    "solve": (("11100",), {}),
    "orbit": ((27,), {}),
    "count": ((13, 8), {}),
    "sweep": ((range(1, 8),), {"side": "both"}),
    "rho": ((), {}),
    "rho_exact": ((), {}),
    "following_class": (((1, 0),), {}),
    "followed_word_count": (((3, 2),), {}),
    "realizable_necklace_counts": (((3, 2),), {}),
    "realizable_rho": ((), {}),
    "necklace_realized": (((1, 0),), {}),
    "critical_lengths": (((8,), 1), {}),
    "log_form": (((13, 8),), {}),
    "resolve_content": (((13, 8),), {}),
    "minimum_bound": (((13, 8),), {"side": "both"}),
    "linear_form_bound": (((13, 8),), {}),
    "certified_linear_form_bound": (((13, 8),), {}),
    "candidates_from_linear_form": (((13, 8),), {}),
    "largest_bound_up_to": ((30,), {"side": "both"}),
    "bound_for_length": ((13,), {}),
    "continued_fraction_applies": ((), {}),
    "floor": ((100,), {"side": "both"}),
    "scan": ((300,), {"store": False, "workers": 1, "side": "both"}),
    "functional_graph": ((40,), {"side": "both"}),
    "check_graph_plot": ((40,), {"side": "both"}),
    "integral_cycles_by_itinerary": ((10,), {}),
    "words_table": ((3,), {}),
    "census": ((12,), {"store": False, "workers": 1, "side": "both"}),
    "plan_census": ((12,), {"side": "both", "rate": 1e9, "workers": 2}),
    "check_census_length": ((12,), {}),
    "estimate_scan": ((1000,), {"max_cycle_length": 100, "budget": 0.0}),
    "itinerary_work": ((20,), {}),
    "excursions": ((50,), {"side": "both"}),
    "critical_ratio": ((), {}),
    "lagarias_primitive": (((1, 2),), {}),
    "verified_cycle": (("negative", 17, 11), {}),
    "cycle_from_element": ((-5, 3), {}),
    "classify": ((27, 100), {}),
    "classify_range": ((1, 20, 100), {}),
    "cycle_minima": ((1, 100, 200, "negative"), {}),
    "default_chunk_size": ((), {}),
    "safe_depth": ((), {}),
    "sieve_table": ((8,), {}),
    "sieve_levels": ((8,), {}),
    "class_word": ((5, 4), {}),
    "jump_table": ((3,), {}),
    "default_store_path": ((), {}),
    "adopt_legacy_store": ((), {}),
    "prove_cycle_rows": (("positive", [(1, 2, b'{"length": 2}')]), {}),
    "records": ((300,), {"side": "both", "workers": 1, "store": False}),
    "default_records_path": ((), {}),
    "start_figures": ((27,), {}),
    "glide_model": ((), {}),
    "graph_bound": ((40,), {"side": "both"}),
    "plan_records": ((300,), {"side": "both", "max_steps": 100, "rate": 1e6}),
    "plan_excursions": ((300,), {"side": "both", "max_steps": 100, "rate": 1e6}),
    "records_memory": ((1000,), {"workers": 2}),
    "plan_scan": ((300,), {"side": "both", "max_steps": 100, "rate": 1e6}),
    "growth_bits": ((), {}),
    "scan_arguments": ((300, 1, "both", 1, 100, None, None, "local"), {}),
}

# Takes several maps: the first argument is a sequence of maps.
MANY = {"compare": {"max_length": 8, "to": 200, "odd": 3, "store": False, "workers": 1}}

# Takes a census (which carries its map) rather than a map: called with both forms of the map.
# get_map is the resolver itself (name -> Map).
SPECIAL = {"predictions", "get_map"}


def _is_map_param(p: inspect.Parameter) -> bool:
    words = str(p.annotation).replace("[", " ").replace("]", " ").replace("|", " ").split()
    return p.name in ("m", "maps_") or "Map" in words


def _map_functions() -> dict[str, object]:
    """Every public function taking a map: the package's exports and the cycles modules' __all__."""
    found: dict[str, object] = {}
    names = [n for n in cyclewright.__all__ if n not in ("maps", "cycles", "cli")]
    candidates = [(n, getattr(cyclewright, n)) for n in names]
    for mod in pkgutil.walk_packages(cyclewright.cycles.__path__, "cyclewright.cycles."):
        module = importlib.import_module(mod.name)
        for n in getattr(module, "__all__", ()):
            candidates.append((n, getattr(module, n)))
    for n, f in candidates:
        if not inspect.isfunction(inspect.unwrap(f)):
            continue
        params = list(inspect.signature(f).parameters.values())
        if params and _is_map_param(params[0]):
            found.setdefault(n, f)
    return found


def _plain(x):
    """Comparable plain data: timings dropped (a run's seconds differ), Maps by key."""
    if isinstance(x, PerSide):
        return {"sides": {s: _plain(r) for s, r in x.results.items()}, "problems": x.problems}
    if hasattr(x, "to_dict"):
        x = x.to_dict()
    elif dataclasses.is_dataclass(x) and not isinstance(x, type):
        x = {f.name: getattr(x, f.name) for f in dataclasses.fields(x)}
    if isinstance(x, maps.Map):
        return x.key
    if isinstance(x, dict):
        return {
            k: _plain(v)
            for k, v in x.items()
            if not any(t in str(k) for t in ("elapsed", "seconds", "per_second", "graph"))
        }
    if hasattr(x, "tolist"):
        return x.tolist()
    if isinstance(x, (list, tuple)):
        return [_plain(v) for v in x]
    if hasattr(x, "_asdict"):
        return _plain(x._asdict())
    return x


def test_every_map_function_has_a_recipe():
    # common practice, no source: the walk below must cover every public function taking a map
    missing = sorted(set(_map_functions()) - set(RECIPES) - set(MANY) - SPECIAL)
    assert missing == []


@pytest.mark.parametrize("name", sorted(RECIPES))
def test_map_name_and_map_give_the_same_result(name):
    # common practice, no source: a name is only another way to say the same map
    f = _map_functions()[name]
    args, kw = RECIPES[name]
    by_name = f(NAME, *args, **kw)
    by_map = f(MAP, *args, **kw)
    assert _plain(by_name) == _plain(by_map)


def test_compare_takes_names_and_maps():
    # common practice, no source
    f = _map_functions()["compare"]
    a = f([NAME, "5x+1"], **MANY["compare"])
    b = f([MAP, maps.get("5x+1")], **MANY["compare"])
    assert a.rows() == b.rows()


def test_predictions_take_a_census_of_a_named_map():
    # common practice, no source
    from cyclewright.cycles.compare import predictions

    c = cyclewright.census(NAME, 12, side="both", store=False, workers=1)
    assert _plain(predictions(NAME, c, limit=10**4)) == _plain(predictions(MAP, c, limit=10**4))


def test_unknown_map_and_wrong_type_are_map_errors():
    # common practice, no source: bad input is a MapError (the CLI's exit 2), never AttributeError
    with pytest.raises(maps.MapError):
        cyclewright.count("no such map", 13, 8)
    with pytest.raises(maps.MapError):
        cyclewright.floor(3, 100)


# ------------------------------------------------------------------ sides
def test_one_side_type():
    # common practice, no source
    assert SIDES == ("positive", "negative") and DEFAULT_SIDE == "positive"
    for s in (*SIDES, "both"):
        assert parse_side(s) == s
    with pytest.raises(InputError, match="side must be"):
        parse_side("up")
    with pytest.raises(InputError, match="side must be"):
        parse_side("both", allow_both=False)


def test_both_sides_equal_each_side_alone():
    # Lagarias 1985: 3x+1 cycles through 1 (positive) and -1, -5, -17 (negative)
    per = cyclewright.floor(NAME, 16, side="both")
    assert [f.side for f in per] == ["positive", "negative"]
    for s in SIDES:
        assert _plain(per[s]) == _plain(cyclewright.floor(NAME, 16, side=s))
    sw = cyclewright.sweep(NAME, range(1, 9), side="both")
    for s in SIDES:
        assert _plain(sw[s]) == _plain(cyclewright.sweep(NAME, range(1, 9), side=s))
    ex = cyclewright.excursions(NAME, 30, side="both")
    assert ex["negative"].peak == -136  # the cycle of -17 reaches -136 (Lagarias 1985)


def test_every_side_argument_defaults_to_the_same_side():
    # common practice, no source: one documented default
    for name, f in _map_functions().items():
        p = inspect.signature(f).parameters.get("side")
        if p is not None and p.default is not inspect.Parameter.empty:
            assert p.default == DEFAULT_SIDE, name


# ------------------------------------------------------------------ step cap and progress
def test_one_step_cap_name():
    # common practice, no source: the step cap is max_steps everywhere, never cap
    for name, f in _map_functions().items():
        params = inspect.signature(f).parameters
        assert "cap" not in params, name


def test_progress_is_one_event_type():
    # common practice, no source: every long-running function reports ProgressEvent values
    runs = {
        "count": lambda p: cyclewright.count(NAME, 13, 8, progress=p),
        "sweep": lambda p: cyclewright.sweep(NAME, range(1, 5), progress=p),
        "scan": lambda p: cyclewright.scan(NAME, 200, store=False, workers=1, progress=p),
        "census": lambda p: cyclewright.census(NAME, 8, store=False, workers=1, progress=p),
        "census_family": lambda p: cyclewright.census_family(
            "3x+k", range(1, 6), 8, store=False, workers=1, progress=p
        ),
        "functional_graph": lambda p: cyclewright.functional_graph(NAME, 30, progress=p),
        "compare": lambda p: cyclewright.compare(
            [NAME], max_length=8, to=100, odd=3, store=False, workers=1, progress=p
        ),
    }
    for name, run in runs.items():
        seen: list = []
        run(seen.append)
        assert seen, name
        assert all(isinstance(e, ProgressEvent) for e in seen), name
        last = seen[-1]
        assert last.total is None or last.done == last.total, name
