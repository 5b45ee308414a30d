"""Records and step statistics over a range (cyclewright.cycles.records).

External checks name their sources: OEIS A006877/A006878 (delay records of
3x+1), A006884/A006885 (path records and their peaks), A060412 (glide record
holders; their values from memory, OEIS A060413), A060409 (glides of path-record
holders), A060445 and A126241 (glides of single starts, as distributions and record
tables), A006577 (steps to 1).
"""

from __future__ import annotations

import pytest
from records_reference import plain_records

from cyclewright import maps
from cyclewright.cycles.errors import InputError
from cyclewright.cycles.graph import functional_graph
from cyclewright.cycles.orbit import orbit
from cyclewright.cycles.records import (
    RangeRecords,
    _exact_one,
    _side_map,
    glide_model,
    records,
    start_figures,
)
from cyclewright.cycles.records_kernel import new_table

# OEIS A006877: starts setting records for the number of 3x+1 steps to reach 1
# (3x+1 and halving steps counted), the terms below 10^6.
A006877 = [
    1, 2, 3, 6, 7, 9, 18, 25, 27, 54, 73, 97, 129, 171, 231, 313, 327, 649, 703, 871,
    1161, 2223, 2463, 2919, 3711, 6171, 10971, 13255, 17647, 23529, 26623, 34239, 35655,
    52527, 77031, 106239, 142587, 156159, 216367, 230631, 410011, 511935, 626331, 837799,
]  # fmt: skip
# OEIS A006878: the record step counts of those starts.
A006878 = [
    0, 1, 7, 8, 16, 19, 20, 23, 111, 112, 115, 118, 121, 124, 127, 130, 143, 144, 170,
    178, 181, 182, 208, 216, 237, 261, 267, 275, 278, 281, 307, 310, 323, 339, 350, 353,
    374, 382, 385, 442, 448, 469, 508, 524,
]  # fmt: skip
# OEIS A006884: starts setting records for the highest point before reaching 1, below 10^6.
A006884 = [
    1, 2, 3, 7, 15, 27, 255, 447, 639, 703, 1819, 4255, 4591, 9663, 20895, 26623, 31911,
    60975, 77671, 113383, 138367, 159487, 270271, 665215, 704511,
]  # fmt: skip
# OEIS A006885: those highest points.
A006885 = [
    1, 2, 16, 52, 160, 9232, 13120, 39364, 41524, 250504, 1276936, 6810136, 8153620,
    27114424, 50143264, 106358020, 121012864, 593279152, 1570824736, 2482111348,
    2798323360, 17202377752, 24648077896, 52483285312, 56991483520,
]  # fmt: skip
# OEIS A060412: starts setting records for the dropping time (glide), below 10^6.
A060412 = [2, 3, 7, 27, 703, 10087, 35655, 270271, 362343, 381727, 626331]
# The record glides of those starts, 3x+1 and halving steps counted (OEIS A060413 lists
# them; these values are from memory, the entry's data could not be read here).
A060413_FROM_MEMORY = [1, 6, 11, 96, 132, 171, 220, 267, 269, 282, 287]
# OEIS A126241: dropping time of n = 1, 2, ..., 99 under n/2, (3n+1)/2 (a(1) = 0 by convention).
A126241 = [
    0, 1, 4, 1, 2, 1, 7, 1, 2, 1, 5, 1, 2, 1, 7, 1, 2, 1, 4, 1, 2, 1, 5, 1, 2, 1, 59, 1, 2, 1,
    56, 1, 2, 1, 4, 1, 2, 1, 8, 1, 2, 1, 5, 1, 2, 1, 54, 1, 2, 1, 4, 1, 2, 1, 5, 1, 2, 1, 7, 1,
    2, 1, 54, 1, 2, 1, 4, 1, 2, 1, 51, 1, 2, 1, 5, 1, 2, 1, 8, 1, 2, 1, 4, 1, 2, 1, 5, 1, 2, 1,
    45, 1, 2, 1, 8, 1, 2, 1, 4,
]  # fmt: skip
# OEIS A060445: dropping time of 2n+1 = 1, 3, ..., 185 (3x+1 and halving steps; a(0) = 0).
A060445 = [
    0, 6, 3, 11, 3, 8, 3, 11, 3, 6, 3, 8, 3, 96, 3, 91, 3, 6, 3, 13, 3, 8, 3, 88, 3, 6, 3, 8, 3,
    11, 3, 88, 3, 6, 3, 83, 3, 8, 3, 13, 3, 6, 3, 8, 3, 73, 3, 13, 3, 6, 3, 68, 3, 8, 3, 50, 3,
    6, 3, 8, 3, 13, 3, 24, 3, 6, 3, 11, 3, 8, 3, 11, 3, 6, 3, 8, 3, 65, 3, 34, 3, 6, 3, 47, 3, 8,
    3, 13, 3, 6, 3, 8, 3,
]  # fmt: skip
# OEIS A060409: dropping times, in the (3x+1)/2 count, of the path-record starts of A006884
# from 2 on (2, 3, 7, 15, 27, 255, ...).
A060409 = [
    1, 4, 7, 7, 59, 13, 40, 23, 81, 61, 70, 65, 54, 72, 65, 59, 127, 105, 110, 59, 72, 164,
]  # fmt: skip


def _running_records(values: dict[int, int]) -> list[tuple[int, int]]:
    """(start, value) of every start whose value beats all smaller starts'."""
    out, best = [], -1
    for s in sorted(values):
        if values[s] > best:
            best = values[s]
            out.append((s, values[s]))
    return out


@pytest.fixture(scope="module")
def million():
    # a million starts: about a second once the kernels are compiled
    return records("3x+1", 10**6)


def test_delay_records_oeis_a006877(million):
    recs = million.sides["positive"].records["full_delay"]
    assert [r.start for r in recs] == A006877  # OEIS A006877
    assert [r.value for r in recs] == A006878  # OEIS A006878


def test_path_records_oeis_a006884_a006885(million):
    recs = million.sides["positive"].records["full_peak"]
    assert [r.start for r in recs] == A006884  # OEIS A006884
    assert [r.value for r in recs] == A006885  # OEIS A006885


def test_glide_records_oeis_a060412(million):
    sd = million.sides["positive"]
    assert [r.start for r in sd.records["full_glide"]] == A060412  # OEIS A060412
    assert [r.start for r in sd.records["glide"]] == A060412  # OEIS A060412 (same holders)
    # OEIS A060445: glide(27) = 96 (undivided); OEIS A126241: 59 in the (3x+1)/2 count
    vals = {r.start: r.value for r in sd.records["full_glide"]}
    assert vals[27] == 96 and vals[3] == 6 and vals[7] == 11  # OEIS A060445
    assert {r.start: r.value for r in sd.records["glide"]}[27] == 59  # OEIS A126241


def test_glide_record_values_oeis(million):
    sd = million.sides["positive"]
    full = [(r.start, r.value) for r in sd.records["full_glide"]]
    # OEIS A060412 (holders); values from memory (OEIS A060413 lists them)
    assert full == list(zip(A060412, A060413_FROM_MEMORY))
    # the divided record glides of the holders that also set path records (OEIS A006884)
    # are OEIS A060409's terms: 2 -> 1, 3 -> 4, 7 -> 7, 27 -> 59, 703 -> 81, 270271 -> 164
    divided = {r.start: r.value for r in sd.records["glide"]}
    path_glide = dict(zip(A006884[1:], A060409))
    shared = [s for s in A060412 if s in path_glide]
    assert shared == [2, 3, 7, 27, 703, 270271]
    assert [divided[s] for s in shared] == [path_glide[s] for s in shared]  # OEIS A060409


def test_glide_distribution_and_records_oeis_a126241_a060445():
    # OEIS A126241: the divided glides of 1..99, as a distribution and as a record table
    r = records("3x+1", 99).sides["positive"]
    glides = dict(enumerate(A126241[1:], start=2))  # a(1) = 0: 1 never drops
    want: dict[int, int] = {}
    for g in glides.values():
        want[g] = want.get(g, 0) + 1
    assert r.glides == want and r.no_glide == 1  # OEIS A126241
    assert [(x.start, x.value) for x in r.records["glide"]] == _running_records(glides)
    # OEIS A060445: the undivided glides of the odd starts 3..185; an even start drops at once
    r = records("3x+1", 185).sides["positive"]
    full = {2 * n + 1: g for n, g in enumerate(A060445) if n}
    full.update({s: 1 for s in range(2, 186, 2)})  # common practice, no source
    want = {}
    for g in full.values():
        want[g] = want.get(g, 0) + 1
    assert r.full_glides == want  # OEIS A060445
    assert [(x.start, x.value) for x in r.records["full_glide"]] == _running_records(full)


def test_every_start_resolved_and_counted(million):
    sd = million.sides["positive"]
    assert sd.resolved == 10**6 and sd.unresolved == 0
    assert sum(sd.delays.values()) == 10**6
    assert sum(sd.glides.values()) + sd.no_glide == 10**6
    assert sd.no_glide == 1  # only 1 never gets below itself; common practice, no source
    assert sd.basins == {1: 10**6}


def test_divided_and_undivided_agree_full_is_steps_plus_odd():
    # full_steps = steps + odd_steps, start by start, against orbit() (OEIS A006577 values)
    m = maps.get("3x+1")
    for s in range(1, 400):
        f = start_figures(m, s)
        o = orbit(m, s)
        assert f["delay"] == o.total_steps
        assert f["delay"] + f["odd"] == o.undivided_total_steps
    assert start_figures(m, 27)["delay"] + start_figures(m, 27)["odd"] == 111  # OEIS A006577
    # and the undivided map's own delays are the full delays of the divided map
    r_div = records("3x+1", 3000)
    r_und = records("3x+1-undivided", 3000)
    assert r_und.sides["positive"].delays == r_div.sides["positive"].full_delays


@pytest.mark.parametrize(
    "name", ["3x+1", "3x-1", "3x+5", "3x+13", "5x+1", "mod3-4x", "mod3-mixed", "3x+1-undivided"]
)
@pytest.mark.parametrize("side", ["positive", "negative"])
def test_compiled_walk_matches_plain_definition(name, side):
    # common practice, no source: the compiled walk against the plain exact definition
    m = maps.get(name)
    cap = 150
    r = records(m, 250, side=side, max_steps=cap)
    sd = r.sides[side]
    sign = 1 if side == "positive" else -1
    figs = {s: start_figures(m, sign * s, cap) for s in range(1, 251)}
    ok = [f for f in figs.values() if f is not None]
    assert sd.resolved == len(ok) and sd.unresolved == 250 - len(ok)
    assert sorted(sd.unresolved_first) == sorted(sign * s for s, f in figs.items() if f is None)
    hist = {}
    for f in ok:
        hist[f["delay"]] = hist.get(f["delay"], 0) + 1
    assert sd.delays == hist
    gl = {}
    for f in ok:
        if f["glide"] is not None:
            gl[f["glide"]] = gl.get(f["glide"], 0) + 1
    assert sd.glides == gl
    # record holders recomputed from the plain figures
    best, holders = -1, []
    for s in range(1, 251):
        f = figs[s]
        if f is not None and abs(f["peak"]) > best:
            best = abs(f["peak"])
            holders.append((sign * s, f["peak"]))
    assert [(x.start, x.value) for x in sd.records["peak"]] == holders


@pytest.mark.parametrize("name", ["3x+1", "3x+5", "5x+1", "mod3-mixed"])
def test_exact_continuation_matches_plain_definition(name):
    # the Python continuation (used past int64) against the plain definition
    m = maps.get(name)
    for side in ("positive", "negative"):
        mm = _side_map(m, side)
        for s in range(1, 120):
            f = start_figures(mm, s, 100)
            got = _exact_one(mm, s, 100, new_table(1), 1)
            assert (got is None) == (f is None)
            if f is not None:
                delay, odd, glide, _, peak, _, cmin = got
                assert (delay, odd, peak, cmin) == (f["delay"], f["odd"], f["peak"], f["cycle_min"])
                assert glide == (f["glide"] if f["glide"] is not None else -1)


def test_exact_past_int64():
    # starts near 2^62: their orbits pass 2^63 at once; every figure stays exact
    m = maps.get("3x+1")
    lo = 2**62 + 1
    r = records(m, lo + 40, start=lo)
    sd = r.sides["positive"]
    assert sd.resolved == 41
    figs = [start_figures(m, s) for s in range(lo, lo + 41)]
    hist = {}
    for f in figs:
        hist[f["delay"]] = hist.get(f["delay"], 0) + 1
    assert sd.delays == hist
    top = max(figs, key=lambda f: f["full_peak"])["full_peak"]
    assert sd.holder("full_peak").value == top and top > 2**63


@pytest.mark.slow
@pytest.mark.parametrize("name", ["3x+1", "3x-1", "3x+5", "3x+13", "mod3-4x"])
def test_basins_equal_the_graph_module(name):
    # common practice, no source: two independent computations of the same basins
    m = maps.get(name)
    g = functional_graph(m, 10**4, side="both", ceiling=None)
    r = records(m, 10**4, side="both")
    assert r.unresolved == 0 and g.unresolved == 0
    want = {c.minimum: n for c, n in zip(g.cycles, g.basins)}
    got = {}
    for sd in r.sides.values():
        for cmin, n in sd.basins.items():
            got[cmin] = got.get(cmin, 0) + n
    assert got == want


def test_unresolved_counted_and_listed_never_dropped():
    r = records("5x+1", 400, max_steps=200)
    sd = r.sides["positive"]
    assert sd.resolved + sd.unresolved == 400
    assert sd.unresolved > 0 and len(sd.unresolved_first) == sd.unresolved
    assert "unresolved" in r.caution
    assert sum(sd.delays.values()) == sd.resolved
    d = r.to_dict()
    assert d["sides"]["positive"]["unresolved"] == sd.unresolved


def test_chunking_does_not_change_results():
    a = records("3x+5", 5000, side="both")
    b = records("3x+5", 5000, side="both", chunk_size=777)
    for s in ("positive", "negative"):
        assert a.sides[s].records == b.sides[s].records
        assert a.sides[s].delays == b.sides[s].delays
        assert a.sides[s].basins == b.sides[s].basins


def test_glide_model_terras():
    # Terras 1976: a random parity sequence drops first at step 1 w.p. 1/2, at 2 w.p. 1/4
    g = glide_model(maps.get("3x+1"))
    assert abs(g["p"][1] - 0.5) < 1e-12 and abs(g["p"][2] - 0.25) < 1e-12
    assert glide_model(maps.get("5x+1")) is None
    r = records("3x+1", 2000)
    h = r.sides["positive"].heuristic
    assert h["delay_mean"] > 0 and "glide_p" in h


def test_bad_input():
    for kwargs in ({"to": 0}, {"to": 10, "start": 20}, {"to": 10, "side": "up"}):
        with pytest.raises(InputError):
            records("3x+1", **kwargs)
    with pytest.raises(InputError):
        records("3x+1", 10, max_steps=0)
    with pytest.raises(InputError):
        records("3x+1", 2**63)


def test_notebook_display():
    r = records("3x+1", 100)
    assert isinstance(r, RangeRecords)
    html = r._repr_html_()
    assert "<table>" in html and "27" in html
    rows = r.record_rows()
    assert {"side", "kind", "start", "value"} <= set(rows[0])


@pytest.mark.parametrize("name", ["3x+1", "3x-1", "3x+5", "3x+13", "5x+1"])
@pytest.mark.parametrize("seed", [1, 2, 3])
def test_fast_walk_matches_plain_definition_on_random_ranges(name, seed):
    # common practice, no source: starts far above the table (the jumping walk, its
    # peak bounds and its fall-backs) against the plain definition, with chunk grids
    # that restart the record bounds often
    import random

    rnd = random.Random(seed * 7919 + len(name))
    m = maps.get(name)
    lo = rnd.randrange(2**21, 2**44)
    hi = lo + rnd.randrange(60, 160)
    cap = 400
    want = plain_records(m, lo, hi, cap)
    r = records(m, hi, start=lo, max_steps=cap, chunk_size=rnd.choice([7, 31, 1000]))
    sd = r.sides["positive"]
    assert sorted(sd.unresolved_first) == want["unresolved"]
    for k in ("delays", "full_delays", "glides", "full_glides", "basins"):
        assert getattr(sd, k) == want[k], k
    for k, v in want["records"].items():
        assert [(x.start, x.value) for x in sd.records[k]] == v, k


@pytest.mark.parametrize("name", ["3x+1", "3x+5"])
def test_fast_walk_equals_stepwise_walk(name, monkeypatch):
    # common practice, no source: the same range with the jumping walk switched off
    from cyclewright.cycles import records as rec

    lo, hi = 3 * 2**20, 3 * 2**20 + 40000
    fast = records(name, hi, start=lo, chunk_size=5000, store=False)
    rec._table.cache_clear()
    monkeypatch.setattr(rec, "_JUMP", 0)
    try:
        slow = records(name, hi, start=lo, chunk_size=5000, store=False)
    finally:
        rec._table.cache_clear()
    a, b = fast.sides["positive"], slow.sides["positive"]
    assert a.to_dict() == b.to_dict()
