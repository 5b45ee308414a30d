"""Independent cross-check: the networkx functional graph and the compiled scan find the same cycles."""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from strategies import valid_maps

from cyclewright import maps
from cyclewright.cycles.graph import functional_graph
from cyclewright.cycles.scan.run import scan


@pytest.mark.slow
@pytest.mark.parametrize(
    "name,to,side",
    [
        ("3x+5", 2000, "both"),  # OEIS A226607: 1, 5, 19, 23, 187, 347
        ("3x+13", 1500, "positive"),  # OEIS A226607
        ("3x-1", 3000, "both"),  # OEIS A226623: 1, 5, 17
        ("3x+1", 5000, "negative"),  # Lagarias 1985 (from memory): -1, -5, -17
        ("mod3-4x", 3000, "both"),
        ("mod3-mixed", 3000, "both"),
        ("5x+1", 300, "positive"),  # 1, 13, 17 (OEIS A259207 for 13)
    ],
)
def test_graph_cycles_equal_scan_cycles(name, to, side):
    m = maps.get(name)
    g = functional_graph(m, to, side=side, ceiling=10**30, max_steps=5000)
    r = scan(m, to, side=side, store=False, workers=1, max_steps=5000)
    from_graph = sorted(g.cycle_minima(in_range=True), key=lambda v: (v < 0, abs(v)))
    from_scan = sorted((c.minimum for c in r.cycles), key=lambda v: (v < 0, abs(v)))
    assert from_graph == from_scan
    by_min = {c.minimum: c for c in r.cycles}
    for c in g.cycles:
        if c.minimum in by_min:
            assert tuple(c.elements) == by_min[c.minimum].elements


@pytest.mark.slow
@settings(max_examples=25, deadline=None)
@given(valid_maps(max_divisor=4, max_multiplier=5, max_offset=9), st.integers(20, 200))
def test_random_maps_agree(m, to):
    g = functional_graph(m, to, side="both", ceiling=10**18, max_steps=300)
    if g.unresolved or g.escaped:
        return  # the graph stops walks that the scan would follow further; compare only closed cases
    r = scan(m, to, side="both", store=False, workers=1, max_steps=300)
    if any(r.unresolved_count.values()):
        return
    assert sorted(g.cycle_minima(in_range=True)) == sorted(c.minimum for c in r.cycles)
