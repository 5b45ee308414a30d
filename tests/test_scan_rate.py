"""The scan's time estimate: its formula, its exact counts, and what uses it (census, verify).

No test here depends on the machine's speed: measured times are replaced by
fixed ones where a decision is checked, and only counts, placement and
arithmetic are asserted.
"""

from __future__ import annotations

import pytest

from cyclewright import maps
from cyclewright.cycles import census as census_mod
from cyclewright.cycles.census import census, plan_census, scan_wall_seconds
from cyclewright.cycles.certificate import verify_certificate, write_certificate
from cyclewright.cycles.errors import InputError
from cyclewright.cycles.scan import rate as rate_mod
from cyclewright.cycles.scan.chunks import _side_tools, default_chunk_size
from cyclewright.cycles.scan.kernel import classify_range
from cyclewright.cycles.scan.rate import (
    PARTS,
    Sample,
    ScanEstimate,
    estimate_scan,
    scan_seconds,
    visited_starts,
)
from cyclewright.cycles.scan.sieve import sieve_levels

M31 = maps.get("3x+1")


@pytest.fixture(autouse=True)
def _data_dir(tmp_path, monkeypatch):
    monkeypatch.setenv("CYCLEWRIGHT_DATA_DIR", str(tmp_path / "data"))


def test_formula():
    # common practice, no source: time per visited start of the sample times the range's
    assert scan_seconds(2 * 10**9, 10**6, 2**27, 0.25, 10**12) == pytest.approx(500.0)
    assert scan_seconds(0, 0, 4000, 0.002, 8 * 10**6) == pytest.approx(4.0)
    assert scan_wall_seconds(1_802_109_784_640, 1.69e9, 2) == pytest.approx(533.2, abs=0.1)
    assert scan_wall_seconds(0, 1e9, 2) == 0.0


@pytest.mark.parametrize(
    "lo, hi",
    [
        (1, 5000),
        (4000, 4200),
        (2**12 - 7, 2**12 + 900),
        (2**24 - 300, 2**24 + 70_000),
        (10**9, 10**9 + 2**20),
    ],
)
def test_visited_starts_is_what_the_kernel_iterates(lo, hi):
    # the kernel's own count of sieved starts (proved drops, never iterated) is the complement
    levels = sieve_levels(M31)
    km, _ = _side_tools(M31, "positive", 1000, hi)
    out = classify_range(km, lo, hi, 1000, True, levels)
    assert visited_starts(levels, lo, hi) == (hi - lo + 1) - out.sieved
    assert visited_starts((), lo, hi) == hi - lo + 1


def test_visited_starts_of_a_large_range_is_the_survivor_density():
    # one period of the deep sieve holds each surviving class once
    levels = sieve_levels(M31)
    deep = levels[-1]
    n = 10**6
    lo = 10**12 // deep.modulus * deep.modulus
    assert visited_starts(levels, lo, lo + n * deep.modulus - 1) == n * deep.survivors


def test_estimate_samples_lie_on_the_chunk_grid_across_the_range():
    to = 40 * default_chunk_size(M31) + 12345
    e = estimate_scan(M31, to, side="negative", max_cycle_length=10_000, budget=0.0)
    assert isinstance(e, ScanEstimate) and e.starts == to and len(e.samples) == PARTS
    assert e.visited == sum(x.part_visited for x in e.samples) < e.starts // 20
    assert e.visited == visited_starts(sieve_levels(M31.conjugate()), 1, to)
    cs = default_chunk_size(M31)
    for x in e.samples:
        assert x.part_lo <= x.lo <= x.hi <= x.part_hi
        assert x.lo % cs in (0, 16)  # a grid chunk (the first after 16 untimed starts)
        assert x.hi - x.lo + 1 >= 16 and x.visited == visited_starts(
            sieve_levels(M31.conjugate()), x.lo, x.hi
        )
    assert e.seconds > 0 and e.rate > 0
    small = estimate_scan(M31, 5000, max_cycle_length=1000, budget=0.0)
    assert len(small.samples) == 1 and small.samples[0].part_hi == 5000


def _fixed(seconds_per_start: float):
    """An estimate_scan stand-in: every start costs ``seconds_per_start`` on one worker."""

    def fake(m, to, *, side="positive", max_cycle_length, start=1, budget=0.3, chunk_size=None):
        n = to - start + 1
        s = Sample(start, start, 1, seconds_per_start, start, to, n)
        return ScanEstimate(side, start, to, n, n, (s,), n * seconds_per_start)

    return fake


def test_plan_uses_the_measurement_per_side(monkeypatch):
    monkeypatch.setattr(rate_mod, "estimate_scan", _fixed(1e-9))
    p = plan_census(M31, 8_000_000, side="both", workers=2)
    # 1,802,109,784,640 starts at 1e9 starts/s per worker on 2 workers
    assert p.seconds == pytest.approx(1_802_109_784_640 / 2e9)
    assert p.rate == pytest.approx(1e9) and "measured on this machine" in p.rate_source
    assert p.seconds_on(64) == pytest.approx(1_802_109_784_640 / 64e9)
    # below MEASURE_ABOVE starts nothing is measured
    monkeypatch.setattr(rate_mod, "estimate_scan", None)
    q = plan_census(M31, 1000, side="both", workers=2)
    assert q.rate_source == "nominal rate" and q.starts < census_mod.MEASURE_ABOVE


def test_refusal_states_the_estimate_without_measuring(monkeypatch):
    # a side beyond max_scan is refused at once: the estimate is nominal, nothing is timed
    def no_measurement(*a, **k):
        raise AssertionError("a refused census must not time samples")

    monkeypatch.setattr(rate_mod, "estimate_scan", no_measurement)
    with pytest.raises(InputError) as exc:
        census(M31, 16_785_920, side="both", store=False, workers=2, max_scan=10**12)
    msg = str(exc.value)
    # 984,572,810,980 + 29,678,897,487,861 starts at 1e9 starts/s per worker on 2 workers:
    # about 4.3 h (scan_wall_seconds); on 64 workers about 8 min
    assert "1..29,678,897,487,861 on the negative side" in msg
    assert f"about 4.3 h here at {census_mod.NOMINAL_RATE:.2g} starts/s per worker x 2" in msg
    assert "about 8 min on 64 such workers" in msg
    # within max_scan the same plan is measured (the stand-in: 1e9 starts/s per worker)
    monkeypatch.setattr(rate_mod, "estimate_scan", _fixed(1e-9))
    p = plan_census(M31, 16_785_920, side="both", workers=2, max_scan=10**14)
    assert "measured on this machine" in p.rate_source
    assert p.seconds == pytest.approx((984_572_810_980 + 29_678_897_487_861) / 2e9)


def test_verify_rescans_by_the_estimate(tmp_path, monkeypatch):
    c = census(M31, 10_000, side="both", store=False, workers=1)
    path = tmp_path / "c.json"
    write_certificate(c, path)
    # 8,409,793 starts at 1e4 starts/s on one worker: about 14 min, above the 5 min default
    monkeypatch.setattr(rate_mod, "estimate_scan", _fixed(1e-4))
    v = verify_certificate(path, workers=1)
    assert not v.rescanned and v.estimate_seconds == pytest.approx(840.979, abs=0.001)
    assert any("NOT re-derived" in n and "14 min" in n for n in v.not_run)
    # at 1e9 starts/s: well under the limit, so it re-derives
    monkeypatch.setattr(rate_mod, "estimate_scan", _fixed(1e-9))
    v = verify_certificate(path, workers=1, minutes=1)
    assert (
        v.rescanned
        and v.status == "holds"
        and v.estimate_seconds == pytest.approx(0.008, abs=0.001)
    )
