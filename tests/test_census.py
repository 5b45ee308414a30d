"""Certified census: published cycle lists, the two methods against each other, certificates."""

from __future__ import annotations

import pytest

from cyclewright import maps
from cyclewright.cycles.census import census, census_family, parse_family
from cyclewright.cycles.errors import InputError


def _pos(c):
    return c.minima_on("positive")


def test_3x5_up_to_length_30():
    # OEIS A226607 (k = 5): 1, 19, 23, 187, 347 primitive; plus the non-primitive 5
    c = census(maps.get("3x+5"), 30, side="positive", store=False, workers=1)
    assert _pos(c) == (1, 5, 19, 23, 187, 347)
    assert [x.minimum for x in c.cycles if x.minimum > 0 and not x.lagarias_primitive] == [5]
    assert c.plans["positive"].method == "bound-scan"


def test_3x13_up_to_length_30():
    # OEIS A226607 (k = 13): 1, 131, 211, 227, 251, 259, 283, 287, 319; plus 13 = 13 * {1, 2}
    c = census(maps.get("3x+13"), 30, side="positive", store=False, workers=1)
    assert _pos(c) == (1, 13, 131, 211, 227, 251, 259, 283, 287, 319)


def test_3x1_both_sides_up_to_10000():
    # Lagarias 1985 survey; Steiner 1977 for circuits: only the cycles through 1, -1, -5, -17
    c = census(maps.get("3x+1"), 10_000, store=False, workers=1, side="both")
    assert c.minima == (0, 1, -1, -5, -17)
    assert all(p.method == "bound-scan" for p in c.plans.values())
    assert c.plans["positive"].scan_to >= c.plans["positive"].bound > 10**6


@pytest.mark.slow
@pytest.mark.parametrize("name", [m.name for m in maps.load_catalog(include_user=False)])
def test_method_1_equals_method_2_up_to_24(name):
    # common practice, no source: two independent certifications must agree
    m = maps.get(name)
    K = 24
    words = census(m, K, method="itineraries", store=False, workers=1, side="both")
    try:
        bound = census(m, K, method="bound-scan", store=False, workers=1, side="both")
    except InputError as exc:
        assert "does not apply" in str(exc)  # offsets of mixed sign: only method 2 applies
        return
    assert bound.minima == words.minima
    for a, b in zip(bound.cycles, words.cycles):
        assert a.elements == b.elements and a.itinerary == b.itinerary


@pytest.mark.slow
@pytest.mark.parametrize("name", [m.name for m in maps.load_catalog(include_user=False)])
def test_necklace_method_equals_itinerary_method(name):
    # two forms of method 2 (Sawada 2003 fixed-content generation vs meet in the middle) must agree
    m = maps.get(name)
    a = census(m, 13, method="necklaces", store=False, side="both")
    b = census(m, 13, method="itineraries", store=False, side="both")
    assert a.minima == b.minima
    assert [c.elements for c in a.cycles] == [c.elements for c in b.cycles]


def test_auto_cross_checks_small_lengths():
    c = census(maps.get("3x+7"), 12, store=False, workers=1, side="both")
    assert c.cross_checked and "cross-checked" in c.method
    # OEIS A226607 (k = 7): 5 primitive, 7 = 7 * {1, 2} (1 is no cycle: 1 -> 5)
    assert _pos(c) == (5, 7)


def test_mixed_sign_offsets_use_itineraries():
    c = census(maps.get("mod3-4x"), 14, store=False, side="both")
    assert {p.method for p in c.plans.values()} == {"itineraries"}
    assert c.minima == (0, 1, -1)


def test_bad_input():
    with pytest.raises(InputError, match="at least 1|>= 1"):
        census(maps.get("3x+1"), 0, store=False, side="both")
    with pytest.raises(
        InputError, match=r"needs a scan of 1\.\.[\d,]+ .* beyond the limit.*--executor dask"
    ):
        census(maps.get("3x+1"), 100_000, store=False, max_scan=10**6, side="both")
    with pytest.raises(InputError, match="no applicable method"):
        census(maps.get("mod3-4x"), 60, store=False, side="both")


def test_family():
    # OEIS A226607: k = 1: 1; k = 5: 1, 19, 23; k = 7: 5; k = 11: 1 (3x+11 has the cycle 1 -> 7 -> 16 -> 8 ...)
    fam = census_family("3x+k", range(1, 8), 20, store=False, workers=1)
    rows = {r["k"]: r["primitive_minima"] for r in fam.records()}
    assert rows == {1: [1], 5: [1, 19, 23], 7: [5]}
    assert parse_family("5x-k") == (5, -1)
    with pytest.raises(InputError):
        parse_family("3x+2")


# certificates and their verification: tests/test_certificate.py
