"""The shortcuts of the records walk (cyclewright.cycles.records_kernel) against plain integers.

Every shortcut of the fast walk is checked on its own (the jump rows, the glide
read from the residue, the bounds that decide when peaks are skipped), and the
whole walk against the plain definition (``start_figures``) on random ranges:
far above the table, across its end, near 2^44 and near int64 (where the
overflow guards hand starts to the exact continuations), on both sides, with
chunk grids and buffer sizes that cut the four-start blocks anywhere. These are
checks of the trade (a shortcut must give the plain walk's figures); common
practice, no source.
"""

from __future__ import annotations

import random

import pytest
from records_reference import plain_records

from cyclewright import maps
from cyclewright.cycles import records as rec
from cyclewright.cycles.records import _side_map, records, start_figures
from cyclewright.cycles.records_kernel import BLOCK, LANES, jump_tables

# the catalog's d = 2 ax+b sides whose values stay positive (the fast walk's maps)
FAST_SIDES = [
    ("3x+1", "positive"),
    ("3x+1", "negative"),
    ("3x+5", "positive"),
    ("3x+13", "positive"),
    ("5x+1", "positive"),
    ("5x+1", "negative"),
]


def _walk(a: int, b: int, n: int, steps: int) -> list[int]:
    """n, T(n), ..., T^steps(n) for n -> n/2, (a n + b)/2, in Python integers."""
    out = [n]
    for _ in range(steps):
        n = (a * n + b) // 2 if n % 2 else n // 2
        out.append(n)
    return out


def _k(a: int) -> int:
    k = rec._JUMP
    while k > 1 and a**k > 2**40:
        k -= 1
    return k


@pytest.mark.parametrize("name,side", FAST_SIDES)
def test_jump_rows_glides_and_bounds_are_exact(name, side):
    # common practice, no source: every column of the jump tables against the plain steps
    a, b = _side_map(maps.get(name), side).ax_b
    K = _k(a)
    jt, gt, bnd = jump_tables(a, b, K)
    G, L, Q = (int(x) for x in bnd)
    rnd = random.Random(a * 1000 + b)
    rows = [0, 1, 2, (1 << K) - 1] + [rnd.randrange(1 << K) for _ in range(150)]
    for r in rows:
        c = int(jt[r, 1]) >> 48
        B = int(jt[r, 1]) & ((1 << 48) - 1)
        assert int(jt[r, 0]) == a**c
        qmax = (2**63 - 1 - B) // a**c  # the row's own limit: Q is at most it
        assert a**c * Q + B < 2**63 and Q <= qmax
        g = int(gt[r, 0])
        j, cj, qmin = g & 255, (g >> 8) & 255, g >> 16
        qs = {
            0,
            1,
            2,
            qmin - 1,
            qmin,
            qmin + 1,
            qmax,
            rnd.randrange(1, 2**20),
            rnd.randrange(1, qmax + 1),
        }
        for q in sorted(x for x in qs if 0 <= x <= qmax):
            n = (q << K) + r
            vals = _walk(a, b, n, K)
            odd = [v % 2 for v in vals[:-1]]
            # the jump: K steps at once, the odd steps counted
            assert vals[K] == a**c * q + B and sum(odd) == c
            # every value of the jump under G q + L; steps 1..K at least gt[r, 1] q
            assert max(vals) <= G * q + L
            assert min(vals[1:]) >= int(gt[r, 1]) * q
            # the glide read from the residue: exact for q >= qmin, and qmin the
            # least such q (below it the first j steps do not drop at step j first)
            first = next((i for i in range(1, K + 1) if vals[i] < n), None)
            if g and q >= qmin and n > 0:
                assert (first, sum(odd[:first])) == (j, cj)
            if g and q == qmin - 1:
                assert first != j
        # a residue that does not settle the glide: large starts of it stay above
        # themselves for all K steps (and those that settle it drop within K)
        q = 2**40
        n = (q << K) + r
        vals = _walk(a, b, n, K)
        assert (min(vals[1:]) >= n) == (g == 0)


def _check(m, side, lo, hi, cap, chunk):
    sign = 1 if side == "positive" else -1
    want = plain_records(m, lo, hi, cap, sign)
    r = records(m, hi, start=lo, side=side, max_steps=cap, chunk_size=chunk, store=False)
    sd = r.sides[side]
    assert sorted(sd.unresolved_first) == sorted(want["unresolved"])
    for k in ("delays", "full_delays", "glides", "full_glides", "basins"):
        assert getattr(sd, k) == want[k], k
    for k, v in want["records"].items():
        assert [(x.start, x.value) for x in sd.records[k]] == v, k


# where the ranges lie: below 2^16 (above the table of maps that grow on average,
# 2^10, where q = 0 and the residue's qmin decides), far above the table, across its end (2^20), near 2^44,
# just below 2^K multiples where the residue's qmin matters, near int64
PLACES = {
    "small": lambda rnd: rnd.randrange(2**10, 2**16),
    "above": lambda rnd: rnd.randrange(2**21, 2**34),
    "table_end": lambda rnd: 2**20 - rnd.randrange(0, 90),
    "2^44": lambda rnd: 2**44 - rnd.randrange(0, 2**30),
    "small_q": lambda rnd: (rnd.randrange(16, 40) << 16) + rnd.randrange(0, 2**16 - 200),
    "2^58": lambda rnd: rnd.randrange(2**57, 2**59),
    "2^62": lambda rnd: 2**62 + rnd.randrange(0, 2**40),
}


@pytest.mark.parametrize("name,side", FAST_SIDES)
@pytest.mark.parametrize("place", sorted(PLACES))
def test_fast_walk_matches_plain_definition(name, side, place):
    # common practice, no source: the four-start blocks, the residue glides, the
    # skipped peaks and every fall-back against the plain definition
    rnd = random.Random(f"{name}/{side}/{place}")
    m = maps.get(name)
    lo = PLACES[place](rnd)
    hi = lo + rnd.randrange(40, 130)
    _check(m, side, lo, hi, 400, rnd.choice([5, 7, 31, 1000]))


@pytest.mark.parametrize("name", ["3x+1", "3x+5"])
def test_block_edges_and_full_buffers_change_nothing(name, monkeypatch):
    # common practice, no source: buffers so small that every block is cut short
    # (a call returns, is drained and resumes mid-block) give the same result
    lo, hi = 5 * 2**20 + 3, 5 * 2**20 + 3 + 3 * BLOCK + LANES + 1
    want = records(name, hi, start=lo, store=False).to_dict()
    monkeypatch.setattr(rec, "_REC_BUF", 2)
    monkeypatch.setattr(rec, "_BUF", 3)
    got = records(name, hi, start=lo, store=False, chunk_size=BLOCK + 3).to_dict()
    assert got["sides"] == want["sides"]
    _check(maps.get(name), "positive", lo, lo + 150, 1000, 2 * LANES + 1)


def test_fast_walk_equals_stepwise_walk_on_both_sides(monkeypatch):
    # common practice, no source: the jumps switched off, on both sides of 3x+1 and 5x+1
    for name in ("3x+1", "5x+1"):
        lo, hi = 2**20 - 500, 2**20 + 20000
        fast = records(name, hi, start=lo, side="both", max_steps=300, store=False)
        rec._table.cache_clear()
        monkeypatch.setattr(rec, "_JUMP", 0)
        try:
            slow = records(name, hi, start=lo, side="both", max_steps=300, store=False)
        finally:
            monkeypatch.setattr(rec, "_JUMP", 16)
            rec._table.cache_clear()
        assert fast.to_dict()["sides"] == slow.to_dict()["sides"]


@pytest.mark.parametrize("name,side", FAST_SIDES)
@pytest.mark.parametrize("place", sorted(PLACES))
def test_blocks_with_warm_records_keep_every_figure(name, side, place):
    # common practice, no source: the fast walk's contract start by start, with the
    # chunk's running peak records already high (as after the first thousands of
    # starts of a long range, where the jumped peaks are skipped): delay, odd steps,
    # glides and cycle exact; a peak exact when it beats the record, else within it
    import numpy as np

    from cyclewright.cycles.records_kernel import _block, _exact_rows

    rnd = random.Random(f"warm/{name}/{side}/{place}")
    mm = _side_map(maps.get(name), side)
    km = rec._kernel_arrays(mm)
    cap = 400
    size = rec._TABLE_CONTRACTING if mm.drift_ratio() < 1 else rec._TABLE_EXPANDING
    tab, fast = rec._table(mm.divisor, tuple(tuple(b) for b in mm.branches), cap, size)
    hot, tcmin, tmax, jt, gt, bnd, K = fast
    T = tab.shape[0]
    lo = max(PLACES[place](rnd), T)
    n = BLOCK - rnd.randrange(0, 7)
    figs = [start_figures(mm, s, cap) for s in range(lo, lo + n)]
    peaks = sorted(abs(f["peak"]) for f in figs if f is not None) or [0]
    for b4 in {min(x, 2**62) for x in (-1, 0, peaks[len(peaks) // 2], peaks[-1], 2**62)}:
        b5 = b4 if b4 < 2 else min(2 * b4 - rnd.randrange(2), 2**63 - 1)
        qlim = min((b4 - int(bnd[1])) // int(bnd[0]), (b5 // 2 - int(bnd[1])) // int(bnd[0]))
        out = np.zeros((BLOCK, 8), np.int64)
        _block(lo, n, T, K, cap, jt, gt, hot, tcmin, tmax, tab, qlim, int(bnd[2]), b4, b5, out)
        skipped = int(((out[:n, 0] == 0) | (out[:n, 0] == 4)).sum())
        _exact_rows(
            lo, n, out, 2, km.multipliers, km.offsets, km.vmax, cap, True, True, T, tab, False,
            hot, tcmin, tmax, jt, gt, K, int(bnd[2]), qlim, b4, b5,
        )  # fmt: skip
        for k, f in enumerate(figs):
            st, delay, odd, glide, uglide, peak, upk, cmin = (int(x) for x in out[k])
            if st == 1:
                continue  # near int64: handed to the exact Python continuation (tested apart)
            if f is None:
                assert st == 2  # unresolved
                continue
            assert st == 0
            assert (delay, odd, cmin) == (f["delay"], f["odd"], f["cycle_min"])
            assert glide == (f["glide"] if f["glide"] is not None else -1)
            if f["glide"] is not None:
                assert uglide == f["glide"] + f["glide_odd"]
            if abs(f["peak"]) > b4:
                assert peak == f["peak"]
            else:
                assert abs(peak) <= b4
            if abs(f["full_peak"]) > b5:
                assert upk == f["full_peak"]
            else:
                assert abs(upk) <= b5
        if b4 >= 2**62 and place in ("above", "2^44") and mm.drift_ratio() < 1:
            assert skipped > n // 2  # the blocks do take the fast way here
