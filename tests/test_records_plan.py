"""The time estimate of records and excursions, and their refusal before any work.

The estimate's arithmetic and the refusal are checked with a fake clock or a
given rate, so no assertion depends on the machine's speed; where the real
kernel is timed, only the shape of the result is checked (samples inside the
range, a positive time per start, the heuristic label). The limits and the
rule (a refusal in one line before the work starts) are the project's own
(docs/limits.md; common practice, no source).
"""

from __future__ import annotations

import os

import pytest

import cyclewright as cw
from cyclewright.cycles import limits
from cyclewright.cycles.records_plan import (
    QUICK_SECONDS,
    WalkPlan,
    check_plan,
    growing_seconds,
    growth_bits,
    is_quick,
    measure_pieces,
    plan_excursions,
    plan_records,
    plan_scan,
    records_memory,
)


class FakeClock:
    """Advances by ``per_start`` seconds for every start the last piece walked."""

    def __init__(self, per_start: float, fixed: float = 0.0):
        self.now = 0.0
        self.per_start = per_start
        self.fixed = fixed
        self.pieces: list[tuple[int, int]] = []

    def run(self, a: int, b: int) -> None:
        self.pieces.append((a, b))
        self.now += self.fixed + self.per_start * (b - a + 1)

    def __call__(self) -> float:
        return self.now


def test_quick_ranges_are_not_measured():
    # starts * max_steps^2 <= 10^9 (the limit's arithmetic; common practice, no source)
    assert limits.QUICK_WALK_WORK == 10**9
    assert is_quick(1000, 1000) and not is_quick(1001, 1000)
    assert not is_quick(1, 10**5)
    p = plan_records("3x+1", 1000, max_steps=1000)
    assert p.samples == () and p.seconds == 0.0 and p.source.startswith("not measured")


def test_pieces_grow_fourfold_inside_each_part_and_stop_at_the_budget():
    clock = FakeClock(per_start=1e-3)
    samples = measure_pieces(clock.run, 1, 4_000_000, budget=0.3, clock=clock)
    # one untimed piece of one start first, then pieces of 1, 4, 16, ... starts
    assert clock.pieces[0] == (1, 1)
    first_part = [p for p in clock.pieces[1:] if p[1] <= 1_000_000]
    sizes = [b - a + 1 for a, b in first_part]
    assert sizes[:4] == [1, 4, 16, 64]
    # the budget per part (0.3 / 4 s at 1 ms a start) ends the growth
    assert sum(sizes) * 1e-3 >= 0.3 / 4 and sizes[-1] <= 4 * sizes[-2]
    # one sample per part, inside its part; pieces are contiguous from the part's middle
    assert len(samples) == 4
    for j, s in enumerate(samples):
        assert s.part_lo == 1 + j * 1_000_000 and s.part_hi == (j + 1) * 1_000_000
        assert s.part_lo <= s.lo <= s.hi <= s.part_hi and s.visited == s.hi - s.lo + 1


def test_sampling_stops_early_when_the_range_is_quick():
    clock = FakeClock(per_start=1e-9)  # 10^6 starts: a millisecond in all
    samples = measure_pieces(clock.run, 1, 10**6, clock=clock, quick_seconds=QUICK_SECONDS)
    assert len(samples) == 1 and samples[0].hi - samples[0].lo + 1 >= 1024
    assert len(clock.pieces) <= 8


def test_sampling_of_slow_starts_stops_after_its_time():
    clock = FakeClock(per_start=0.0, fixed=2.0)  # every piece takes 2 s, whatever its size
    samples = measure_pieces(clock.run, 1, 10**9, budget=0.3, clock=clock)
    # one piece a part; after more than max(2 * budget, 1 s) no further part is timed
    assert [s.hi - s.lo + 1 for s in samples] == [1]
    assert len(clock.pieces) == 2  # the untimed first piece and one timed piece


def test_plan_with_a_given_rate_is_starts_over_rate_and_workers():
    p = plan_records("3x+1", 10**10, side="both", max_steps=1000, workers=4, rate=2e6)
    assert p.starts == 2 * 10**10 and p.workers == 4 and p.samples == ()
    assert p.seconds == pytest.approx(2 * 10**10 / (2e6 * 4))
    assert p.seconds_on(64) == pytest.approx(2 * 10**10 / (2e6 * 64))
    d = p.to_dict()
    assert d["labels"] == {
        "starts": "exact",
        "seconds_per_start": "heuristic",
        "seconds": "heuristic",
    }
    assert "heuristic" in p.lines()[1] and "x 4 workers" in p.lines()[1]
    # every core when workers is None (local); a Dask run counts the workers given, else 1
    assert plan_records("3x+1", 10**10, max_steps=9, workers=None, rate=1e6).workers == (
        os.cpu_count() or 1
    )
    assert (
        plan_records("3x+1", 10**10, max_steps=9, workers=None, executor="dask", rate=1e6).workers
        == 1
    )
    e = plan_excursions("3x+1", 10**10, side="both", max_steps=1000, rate=1e8)
    assert e.workers == 1 and e.seconds == pytest.approx(2 * 10**10 / 1e8)
    with pytest.raises(cw.InputError, match="rate must be a positive number"):
        plan_records("3x+1", 10**10, max_steps=9, rate=0.0)


def test_check_plan_refuses_in_one_line_with_the_estimate():
    p = plan_records("3x+1", 10**12, max_steps=1000, workers=2, rate=1e7)  # 13.9 h
    assert check_plan(p, 14 * 60) is p and check_plan(p, None) is p
    with pytest.raises(cw.InputError) as info:
        check_plan(p, 30)
    msg = str(info.value)
    assert "\n" not in msg and "1e+12 starts" in msg and "13.9 h" in msg
    assert "heuristic" in msg and "beyond the limit of 30 min" in msg
    assert "(max_minutes)" in msg and "more workers" in msg and "64 workers" in msg
    assert (
        info.value.renamed({"max_minutes": "--max-minutes", "workers": "--workers"}).count("--")
        == 2
    )
    with cw.lift_limits():
        assert check_plan(p, 30) is p
    e = plan_excursions("3x+1", 10**12, max_steps=1000, rate=1e7)
    with pytest.raises(cw.InputError) as info:
        check_plan(e, 30, option="max_minutes", more_workers=False)
    assert "workers" not in str(info.value) and "(max_minutes)" in str(info.value)
    with pytest.raises(cw.InputError, match="max_minutes must be a number"):
        check_plan(p, -1)


def test_records_and_excursions_refuse_before_any_work():
    calls = []
    with pytest.raises(cw.InputError, match="beyond the limit of 1 min"):
        cw.records("3x+1", 10**7, rate=1e3, max_minutes=1, store=False, on_plan=calls.append)
    assert calls == []  # refused before the plan is handed on, before any chunk
    with pytest.raises(cw.InputError, match="beyond the limit of 1 min"):
        cw.excursions("3x+1", 10**7, side="both", rate=1e3, max_minutes=1)
    # raised by the parameter, or lifted: the same range then runs
    r = cw.records("3x+1", 2000, rate=1e3, max_minutes=60, store=False, on_plan=calls.append)
    assert [p.starts for p in calls] == [2000] and r.sides["positive"].basins == {1: 2000}
    with cw.lift_limits():
        e = cw.excursions("3x+1", 30, rate=1.0, max_minutes=0)
    # OEIS A006885: 27's trajectory peaks at 9232, i.e. 4616 for the divided map
    assert (e.peak, e.peak_start) == (4616, 27)


def test_records_memory_of_climbing_starts_is_checked_first():
    # 5x+1 climbs about 0.16 bits a step (its drift, ln(5/4)/2 nats); the exact walk
    # keeps up to 2C + 1 values, so C = 10^6 needs tens of GB: refused before timing
    assert records_memory("5x+1", 10**6) > limits.MEMORY_BUDGET
    assert records_memory("5x+1", 1000) < 10**6
    assert records_memory("3x+1", 10**6) < limits.MEMORY_BUDGET  # contracting: small values
    assert records_memory("5x+1", 10**4, workers=2) == 2 * records_memory("5x+1", 10**4)
    with pytest.raises(cw.InputError, match="of memory, more than"):
        cw.records("5x+1", 1000, max_steps=10**6, store=False, rate=1e9)


def test_the_real_kernel_is_timed_on_the_range_itself():
    # shape only: the samples sit inside the range and the time is positive
    p = plan_records("3x+1", 10**8, side="both", max_steps=1000, budget=0.1)
    assert isinstance(p, WalkPlan) and p.samples and p.seconds_per_start > 0
    assert all(1 <= s.lo <= s.hi <= 10**8 for s in p.samples)
    assert p.source.startswith("measured now") and p.starts == 2 * 10**8
    e = plan_excursions("5x+1", 10**7, max_steps=10**4, budget=0.1)
    assert e.samples and e.seconds_per_start > 0 and e.workers == 1


def _run(args, capsys):
    from cyclewright.cli.app import main

    with pytest.raises(SystemExit) as info:
        main(list(args))
    out, err = capsys.readouterr()
    return info.value.code or 0, out, err


def test_records_plan_option_prints_the_estimate_and_runs_nothing(capsys, tmp_path, monkeypatch):
    import json

    monkeypatch.chdir(tmp_path)
    code, out, err = _run(["records", "3x+1", "--to", "1000", "--plan", "--json"], capsys)
    doc = json.loads(out)
    assert code == 0 and doc["starts"] == 1000 and doc["refused"] is False
    assert doc["labels"]["seconds"] == "heuristic" and doc["max_minutes"] == 30
    # any measured time is above a limit of 0 minutes: the plan says it would be refused
    args = ["records", "3x+1", "--to", "10^7", "--plan", "--max-minutes", "0"]
    code, out, err = _run(args, capsys)
    assert code == 0 and "measured now" in out and "would be refused" in out
    assert list(tmp_path.iterdir()) == []  # nothing written


def test_compare_refuses_its_records_before_any_map_is_worked_on(monkeypatch):
    # the estimate comes first: with a slow fake rate the comparison stops before the
    # census, excursions or scan of the first map start
    from cyclewright.cycles import compare as compare_module
    from cyclewright.cycles import records_plan

    real = records_plan.plan_records

    def slow(*args, **kw):
        return real(*args, **{**kw, "rate": 1.0})

    def no_census(*args, **kw):
        raise AssertionError("the census ran before the refusal")

    monkeypatch.setattr(records_plan, "plan_records", slow)
    monkeypatch.setattr(compare_module, "census", no_census)
    with pytest.raises(cw.InputError) as info:
        cw.compare(["3x+1"], max_length=8, to=10**5, store=False, workers=1)
    msg = str(info.value)
    # API messages name parameters, never an option of the command line
    assert "(records' max_minutes)" in msg and "--" not in msg


# ------------------------------------------------------------------ scan
def test_growing_walks_are_scaled_from_growing_caps_leaning_high():
    # a walk whose i-th step costs alpha + beta * i (values gaining the same bits every
    # step: common practice, no source) costs alpha c + beta c^2 / 2 for c steps
    t = {"now": 0.0}
    caps = []

    def walk(c, alpha=1e-6, beta=2e-9):
        caps.append(c)
        t["now"] += alpha * c + beta * c * c / 2

    per, c, dt = growing_seconds(walk, 10**7, pieces=4, budget=0.3, clock=lambda: t["now"])
    assert caps == [16 * 4**i for i in range(len(caps))] and c == caps[-1] < 10**7
    true = (1e-6 * 10**7 + 1e-9 * 10**14) / 4
    assert true * 0.99 <= per <= true * 1.01  # the fit is exact on this model
    # a walk of constant cost per step: the straight scaling, never less
    t["now"] = 0.0
    per, c, _ = growing_seconds(
        lambda c: t.__setitem__("now", t["now"] + 1e-5 * c), 10**8, clock=lambda: t["now"]
    )
    assert per == pytest.approx(1e-5 * 10**8, rel=1e-6)
    # the cap reached within the budget: measured, not scaled
    t["now"] = 0.0
    per, c, dt = growing_seconds(
        lambda c: t.__setitem__("now", t["now"] + 1e-6 * c), 1000, pieces=2, clock=lambda: t["now"]
    )
    assert c == 1000 and per == pytest.approx(1e-6 * 1000 / 2)


def test_scan_plan_with_a_given_rate_and_its_refusal():
    p = plan_scan("3x+1", 2**63 - 1, side="both", max_steps=1000, workers=2, rate=1e9)
    assert p.what == "scan" and p.starts == 2 * (2**63 - 1) and p.samples == ()
    assert p.seconds == pytest.approx(2 * (2**63 - 1) / (1e9 * 2))
    with pytest.raises(cw.InputError) as info:
        check_plan(p, 30)
    msg = str(info.value)
    assert msg.startswith("scan of 3x+1 over 1..9,223,372,036,854,775,807 (positive and")
    assert "beyond the limit of 30 min (max_minutes)" in msg and "\n" not in msg
    with cw.lift_limits():
        assert check_plan(p, 30) is p
    # a cycle-length bound is the scan's cap
    q = plan_scan("3x+1", 10**12, max_steps=1000, max_cycle_length=77, workers=1, rate=1e6)
    assert q.max_steps == 77 and q.seconds == pytest.approx(10**6)
    # small contracting scans are not measured; small growing ones are weighed by their bits
    assert plan_scan("3x+1", 10**6, max_steps=1000).source.startswith("not measured")
    assert growth_bits(cw.maps.get("7x+1")) == 3


def test_scan_plan_times_the_real_chunks():
    # shape only (no speed): samples inside the range, a positive time, the sieve named
    p = plan_scan("3x+1", 10**12, max_steps=1000, workers=1, budget=0.05)
    assert p.samples and p.seconds_per_start > 0 and "sieve" in p.source
    assert all(1 <= s.lo <= s.hi <= 10**12 for s in p.samples)
    g = plan_scan("5x+1", 1000, max_steps=10**6, workers=1, budget=0.05)
    assert g.samples and g.seconds > 0 and "step cap" in g.source
    assert all(1 <= s.lo <= s.hi <= 1000 for s in g.samples)


def test_a_huge_multiplier_is_shortened_in_the_plan():
    from cyclewright.maps import Map

    m = Map(2, [(1, 0), (10**4000 + 1, 1)])
    p = plan_scan(m, 100, max_steps=1000, workers=1, rate=1e-3)
    assert "(4004 characters)" in p.lines()[0] and len(p.lines()[0]) < 200
    with pytest.raises(cw.InputError) as info:
        check_plan(p, 30)
    assert len(str(info.value)) < 600


def test_scan_refuses_before_any_work_and_plan_option(capsys, tmp_path, monkeypatch):
    import json

    monkeypatch.chdir(tmp_path)
    calls = []
    with pytest.raises(cw.InputError, match="beyond the limit of 1 min"):
        cw.scan("3x+1", 10**9, rate=1e3, max_minutes=1, store="s.sqlite", on_plan=calls.append)
    assert calls == [] and list(tmp_path.iterdir()) == []  # no store created
    r = cw.scan("3x+5", 400, rate=1e3, max_minutes=60, store=False, on_plan=calls.append)
    assert [p.starts for p in calls] == [400]
    assert r.minima["positive"] == (1, 5, 19, 23, 187, 347)  # OEIS A226607
    code, out, err = _run(["scan", "3x+1", "--to", "10^12", "--plan", "--json"], capsys)
    doc = json.loads(out)
    assert code == 0 and doc["what"] == "scan" and doc["starts"] == 10**12
    args = ["scan", "3x+1", "--to", "10^12", "--plan", "--max-minutes", "0"]
    code, out, err = _run(args, capsys)
    assert code == 0 and "would be refused" in out
    assert list(tmp_path.iterdir()) == []  # nothing written


# ------------------------------------------------- a family census, a comparison
def test_a_family_is_estimated_as_a_whole_and_its_timed_members_are_kept():
    from cyclewright.cycles.census import FAMILY_TIMED, _family_parts, census_family

    # the parts: FAMILY_TIMED members near the middles of equal parts after the first
    parts = _family_parts(101)
    assert len(parts) == FAMILY_TIMED and sum(size for _, size in parts) == 100
    assert all(0 < i < 101 for i, _ in parts)
    # a given time per member: 10 members of 10 s are beyond 1 min, refused at once
    with pytest.raises(cw.InputError) as info:
        census_family("3x+k", range(1, 31), 10, member_seconds=10.0, max_minutes=1, store=False)
    msg = str(info.value)
    assert msg.startswith("census of the family 3x+k (10 members, length <= 10), about 100 s")
    assert "(max_minutes): raise it, or use fewer members" in msg and "heuristic" in msg
    with cw.lift_limits():
        census_family("3x+k", range(1, 31), 3, member_seconds=10.0, max_minutes=1, store=False)
    # measured: the members timed first are the family's own rows, in order
    timed = census_family("3x+k", range(1, 31), 12, workers=1, store=False)
    plain = census_family("3x+k", range(1, 31), 12, workers=1, store=False, max_minutes=None)
    assert [r["primitive_minima"] for r in timed.records()] == [
        r["primitive_minima"] for r in plain.records()
    ]
    # the members are the k prime to 6 (Lagarias 1990, the 3x+k family)
    assert [r["k"] for r in timed.records()][:3] == [1, 5, 7]


def test_a_comparison_is_estimated_as_a_whole_before_any_map():
    # any measured time is above a limit of 0 minutes: refused before the first map
    calls = []
    with pytest.raises(cw.InputError) as info:
        cw.compare(["5x+1"], max_minutes=0, store=False, progress=calls.append)
    msg = str(info.value)
    assert msg.startswith("comparison of 1 map (to 100,000, step cap 1,000), about")
    assert "beyond the limit of 0 min (max_minutes): raise it, use more workers" in msg
    assert calls == []  # no map worked on
