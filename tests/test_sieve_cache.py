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
    built = _fresh(m, 16)
    assert built.depth == 16 and built.survivors == 2114  # OEIS A076227: a(16) = 2114
    (path,) = _files(tmp_path)
    monkeypatch.setattr(sieve, "_build", lambda *a: pytest.fail("the cached table was rebuilt"))
    assert _same(_fresh(m, 16), built)
    assert _files(tmp_path) == [path]


@pytest.mark.parametrize("damage", ["truncate", "garbage", "other_map"])
def test_damaged_or_foreign_file_is_rebuilt(tmp_path, damage):
    m = maps.get("3x+5")
    built = _fresh(m, 17)
    (path,) = _files(tmp_path)
    if damage == "truncate":
        path.write_bytes(path.read_bytes()[: path.stat().st_size // 2])
    elif damage == "garbage":
        raw = bytearray(path.read_bytes())
        raw[len(raw) // 2 : len(raw) // 2 + 64] = os.urandom(64)
        path.write_bytes(bytes(raw))
    else:
        # a valid table of another map, put under this map's name
        _fresh(maps.get("3x+7"), 17)
        (other,) = [p for p in _files(tmp_path) if p != path]
        other.replace(path)
    assert _same(_fresh(m, 17), built)
    # and the file holds a good table again
    assert sieve._cache_read(path, m, built.depth) is not None


def test_cache_can_be_turned_off(tmp_path, monkeypatch):
    monkeypatch.setenv("CYCLEWRIGHT_NO_CACHE", "1")
    _fresh(maps.get("3x+1"), 16)
    assert _files(tmp_path) == []


def test_unwritable_cache_only_costs_speed(tmp_path, monkeypatch):
    blocker = tmp_path / "not-a-dir"
    blocker.write_text("a file where the cache directory should be")
    monkeypatch.setenv("CYCLEWRIGHT_CACHE_DIR", str(blocker))
    t = _fresh(maps.get("3x+1"), 16)
    assert t.survivors == 2114  # OEIS A076227: a(16) = 2114
