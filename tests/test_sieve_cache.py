"""The on-disk cache of sieve tables: same tables as a fresh build, damage is rebuilt.

The tables themselves are checked against brute force in test_scan_exact.py;
here the point is that reading one back can never change it.
"""

from __future__ import annotations

import os

import numpy as np
import pytest

from cyclewright import maps
from cyclewright.cycles.scan import sieve


def _fresh(m, limit):
    sieve.sieve_table.cache_clear()
    return sieve.sieve_table(m, limit)


def _same(t1, t2) -> bool:
    return (t1.map_key, t1.depth, t1.modulus) == (t2.map_key, t2.depth, t2.modulus) and all(
        np.array_equal(a, b) for a, b in zip(t1.arrays(), t2.arrays())
    )


def _files(tmp_path):
    return sorted((tmp_path / "cache" / "sieve").glob("*.npz"))


def test_written_once_then_read_back(tmp_path, monkeypatch):
    m = maps.get("3x+1")
    built = _fresh(m, 20)
    assert built.depth == 20 and built.survivors == 27328  # OEIS A076227: a(20) = 27328
    (path,) = _files(tmp_path)
    monkeypatch.setattr(sieve, "_build", lambda *a: pytest.fail("the cached table was rebuilt"))
    assert _same(_fresh(m, 20), built)
    assert _files(tmp_path) == [path]


@pytest.mark.parametrize("damage", ["truncate", "garbage", "other_map"])
def test_damaged_or_foreign_file_is_rebuilt(tmp_path, damage):
    m = maps.get("3x+5")
    built = _fresh(m, 21)
    (path,) = _files(tmp_path)
    if damage == "truncate":
        path.write_bytes(path.read_bytes()[: path.stat().st_size // 2])
    elif damage == "garbage":
        raw = bytearray(path.read_bytes())
        raw[len(raw) // 2 : len(raw) // 2 + 64] = os.urandom(64)
        path.write_bytes(bytes(raw))
    else:
        # a valid table of another map, put under this map's name
        _fresh(maps.get("3x+7"), 21)
        (other,) = [p for p in _files(tmp_path) if p != path]
        other.replace(path)
    assert _same(_fresh(m, 21), built)
    # and the file holds a good table again
    assert sieve._cache_read(path, m, built.depth) is not None


def test_cache_can_be_turned_off(tmp_path, monkeypatch):
    monkeypatch.setenv("CYCLEWRIGHT_NO_CACHE", "1")
    _fresh(maps.get("3x+1"), 20)
    assert _files(tmp_path) == []


def test_unwritable_cache_only_costs_speed(tmp_path, monkeypatch):
    blocker = tmp_path / "not-a-dir"
    blocker.write_text("a file where the cache directory should be")
    monkeypatch.setenv("CYCLEWRIGHT_CACHE_DIR", str(blocker))
    t = _fresh(maps.get("3x+1"), 20)
    assert t.survivors == 27328  # OEIS A076227: a(20) = 27328


def test_cheap_tables_are_not_cached(tmp_path):
    t = _fresh(maps.get("3x+1"), 16)
    assert t.survivors == 2114  # OEIS A076227: a(16) = 2114
    assert _files(tmp_path) == []


def test_least_recently_used_tables_go_first(tmp_path, monkeypatch):
    sizes = {}
    for name in ("3x+1", "3x+5", "3x+7"):
        _fresh(maps.get(name), 20)
        sizes[name] = sum(p.stat().st_size for p in _files(tmp_path)) - sum(sizes.values())
    assert len(_files(tmp_path)) == 3
    # use 3x+1 again (a read refreshes it), then cap the cache below three tables
    first = sieve._cache_file(maps.get("3x+1"), 20)
    old = first.stat().st_mtime - 1000
    for p in _files(tmp_path):
        os.utime(p, (old, old))
    _fresh(maps.get("3x+1"), 20)
    limit = 2 * max(sizes.values()) + 1000  # two tables fit, not three
    monkeypatch.setenv("CYCLEWRIGHT_CACHE_LIMIT", str(limit))
    _fresh(maps.get("3x+11"), 20)
    names = _files(tmp_path)
    assert sum(p.stat().st_size for p in names) <= limit
    assert first in names and len(names) == 2  # the one used last stays, with the new one


def test_the_cache_never_exceeds_its_limit_in_a_family_run(tmp_path, monkeypatch):
    from cyclewright.cycles.scan import scan

    limit = 10 * 2**20  # three tables of depth 22 (3 MB each) fit, not four
    monkeypatch.setenv("CYCLEWRIGHT_CACHE_LIMIT", str(limit))
    seen = 0
    for k in range(1, 40, 2):  # the family 3x+k, k odd
        sieve.sieve_table.cache_clear()
        # starts above 2^22, so the depth-22 table serves them and is built (a scan
        # below 2^22 builds only tables too small to cache)
        scan(f"3x+{k}", 2**22 + 20000, start=2**22, max_cycle_length=22, store=False, workers=1)
        usage = sieve.cache_usage()
        assert usage["bytes"] <= limit and usage["limit"] == limit
        seen = max(seen, usage["files"])
    assert seen == 3  # tables were cached, and old ones evicted to stay in bounds
