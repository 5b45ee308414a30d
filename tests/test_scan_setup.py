"""What a scan sets up per map: jump tables, sieve depths, stores (the family census's cost).

Checked against the plain forms they replace; no test depends on speed.
"""

from __future__ import annotations

import numpy as np
import pytest

from cyclewright import maps
from cyclewright.cycles.census import census_family
from cyclewright.cycles.scan.chunks import _side_tools
from cyclewright.cycles.scan.kernel import (
    KernelMap,
    _limb_jump_arrays,
    _limb_jump_arrays_exact,
    classify_range,
)
from cyclewright.cycles.scan.sieve import jump_table, sieve_levels
from cyclewright.maps import Map

MAPS = [
    "3x+1",
    "3x-1",
    "5x+1",
    "7x+1",
    "181x+1",
    "3x+5",
    "3x+999",
    "mod3-4x",
    "1073741823x+1",  # |a| just below the kernel's coefficient limit 2^30
]


@pytest.mark.parametrize("name", MAPS)
def test_vectorised_jump_table_equals_the_exact_one(name):
    # common practice, no source: two constructions of the same exact table
    m = maps.get(name) if not name[0].isdigit() or "x" not in name else maps.parse_shorthand(name)
    for mm in (m, m.conjugate()):
        km = KernelMap.from_map(mm)
        fast = _limb_jump_arrays(km.divisor, km.branches)
        slow = _limb_jump_arrays_exact(km.divisor, km.branches)
        assert (fast is None) == (slow is None)
        if fast is None:
            continue
        assert fast[:2] == slow[:2]
        J, dJ = fast[:2]
        assert np.array_equal(fast[2], slow[2]) and np.array_equal(fast[3], slow[3])
        p = 2**31 - 1
        assert np.array_equal(fast[4] % p, slow[4]) and np.array_equal(fast[5] % p, slow[5])
        # and the table is the exact J-step composite (sieve.jump_table, plain integers)
        assert [(int(a), int(c)) for a, c in zip(fast[2], fast[3])] == jump_table(mm, J)


def test_mixed_residue_map_jump_table():
    # Map(3, [(-3, 12), (5, 13), (2, 11)]): a multiplier sharing a factor with d
    m = Map(3, [(-3, 12), (5, 13), (2, 11)])
    km = KernelMap.from_map(m)
    fast, slow = _limb_jump_arrays(3, km.branches), _limb_jump_arrays_exact(3, km.branches)
    assert fast[:2] == slow[:2] and np.array_equal(fast[3], slow[3])


def test_sieve_depth_follows_the_range():
    m = maps.get("3x+1")
    assert _side_tools(m, "positive", 1000, 4000)[1] == ()  # below 2^12: no table
    assert [t.depth for t in _side_tools(m, "positive", 1000, 10**5)[1]] == [8, 16]
    assert [t.depth for t in _side_tools(m, "positive", 1000, 10**12)[1]] == [12, 24]
    assert [t.depth for t in _side_tools(m, "positive", 20, 10**12)[1]] == [10, 20]
    # chunks of every size above 2^24 share one deep table (one copy in memory)
    deep = _side_tools(m, "negative", 8 * 10**6, 2**25)[1][-1]
    assert all(
        _side_tools(m, "negative", 8 * 10**6, hi)[1][-1] is deep
        for hi in (2**30, 10**12, 3 * 10**13)
    )
    # a lower table never changes a result (sieve.py: every skipped class drops provably)
    km = KernelMap.from_map(m)
    lo, hi = 3 * 2**16, 3 * 2**16 + 50_000
    a = classify_range(km, lo, hi, 1000, True, _side_tools(m, "positive", 1000, hi)[1])
    b = classify_range(km, lo, hi, 1000, True, sieve_levels(m, 1000))
    assert (a.drops, a.other, a.cycles, a.open_starts) == (
        b.drops,
        b.other,
        b.cycles,
        b.open_starts,
    )


def test_family_members_with_tiny_scans_keep_no_store(tmp_path, monkeypatch):
    monkeypatch.setenv("CYCLEWRIGHT_DATA_DIR", str(tmp_path / "data"))
    fam = census_family("3x+k", range(1, 8), 20, workers=1)
    # OEIS A226607: 3x+5 has 1, 19, 23, 187 as primitive minima; 3x+7 has 5
    assert [(r["k"], r["primitive_minima"]) for r in fam.records()] == [
        (1, [1]),
        (5, [1, 19, 23]),
        (7, [5]),
    ]
    assert all(c.store_path is None for c in fam.rows)
    assert not (tmp_path / "data").exists() or not any((tmp_path / "data").rglob("*.sqlite"))
    (tmp_path / "stores").mkdir()  # a directory of stores, one per map
    named = census_family("3x+k", range(1, 8), 20, workers=1, store=tmp_path / "stores")
    assert all(c.store_path for c in named.rows)
    assert named.records() == fam.records()
