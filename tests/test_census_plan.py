"""Census planning, refusals, progress, resumption and the Dask executor.

No test here depends on the machine's speed: rates are given where an
estimate is checked, and only its arithmetic is asserted.
"""

from __future__ import annotations

import tracemalloc

import pytest

from cyclewright import maps
from cyclewright.cycles.census import census, plan_census
from cyclewright.cycles.errors import InputError
from cyclewright.cycles.limits import lift_limits
from cyclewright.cycles.progress import ProgressEvent

M31 = maps.get("3x+1")


@pytest.fixture(autouse=True)
def _data_dir(tmp_path, monkeypatch):
    monkeypatch.setenv("CYCLEWRIGHT_DATA_DIR", str(tmp_path / "data"))


def test_plan_3x1_to_8_million():
    # the ranges follow from the continued fraction of log2 3 (OEIS A028507): the convergent
    # (301994, 190537) above, the semiconvergent 176251 + 25 * 301994 = 7726101 below
    p = plan_census(M31, 8_000_000, side="both", rate=1e9, workers=2)
    pos, neg = p.plans["positive"], p.plans["negative"]
    assert pos.scan_to == 984_572_810_980 and sum(pos.bound_content) == 301_994
    assert neg.scan_to == 817_536_973_660 and sum(neg.bound_content) == 7_726_101
    assert p.starts == pos.scan_to + neg.scan_to
    assert p.seconds == pytest.approx(p.starts / 2e9)
    assert p.seconds_on(8) == pytest.approx(p.starts / 8e9)
    assert pos.bound_method == "continued fraction"
    doc = p.to_dict()
    assert doc["labels"]["seconds"] == "heuristic" and doc["labels"]["starts"] == "exact"
    text = "\n".join(p.lines())
    assert "1..984,572,810,980" in text and "heuristic" in text


def test_plan_memory_does_not_grow_with_K():
    # common practice, no source: planning holds O(log K) data, whatever K
    peaks = []
    for K in (10**5, 10**8, 10**12):
        tracemalloc.start()
        with lift_limits():  # K = 10^12 is beyond the census's limit of 10^9
            plan_census(M31, K, side="both", rate=1e9, workers=2)
        peaks.append(tracemalloc.get_traced_memory()[1])
        tracemalloc.stop()
    assert max(peaks) < 8 * 2**20


def test_refusal_gives_ranges_time_and_cluster():
    # K = 16,785,920: about 3e13 starts on the negative side (the semiconvergent with j = 54)
    with pytest.raises(InputError) as exc:
        census(M31, 16_785_920, side="both", store=False, rate=1e9, workers=2, max_scan=10**12)
    msg = str(exc.value)
    assert "1..984,572,810,980 on the positive side" in msg
    assert "1..29,678,897,487,861 on the negative side" in msg
    assert "--executor dask" in msg and "--max-scan" in msg and "h here" in msg


def _events():
    seen: list[ProgressEvent] = []
    return seen, seen.append


def test_progress_events_for_every_phase():
    seen, cb = _events()
    c = census(M31, 3000, side="both", store=False, workers=1, progress=cb)
    assert c.minima == (0, 1, -1, -5, -17)  # Lagarias 1985 survey; Steiner 1977
    assert all(isinstance(e, ProgressEvent) for e in seen)
    phases = {e.phase for e in seen}
    assert {"plan", "scan"} <= phases
    for side in ("positive", "negative"):
        scan = [e for e in seen if e.phase == "scan" and e.detail.startswith(side)]
        assert scan and scan[-1].done == scan[-1].total
        assert [e.done for e in scan] == sorted(e.done for e in scan)
    seen, cb = _events()
    census(maps.get("3x+7"), 12, store=False, workers=1, progress=cb)
    assert any(e.phase == "itineraries" and e.done == e.total for e in seen)


class _Killed(Exception):
    pass


def test_census_resumes_after_a_kill(tmp_path):
    # common practice, no source: an interrupted run keeps its finished chunks
    store = tmp_path / "s.sqlite"
    kw = dict(side="positive", store=store, workers=1, chunk_size=2**12)
    seen: list[ProgressEvent] = []

    def killer(e):
        seen.append(e)
        if e.phase == "scan" and e.done >= 3 * 2**12:
            raise _Killed

    with pytest.raises(_Killed):
        census(M31, 2000, progress=killer, **kw)
    done_before = max(e.done for e in seen if e.phase == "scan")
    again: list[ProgressEvent] = []
    c = census(M31, 2000, progress=again.append, **kw)
    first = next(e for e in again if e.phase == "scan")
    assert first.done >= done_before > 0  # the finished chunks were not scanned again
    fresh = census(M31, 2000, side="positive", store=False, workers=1)
    assert c.minima == fresh.minima == (0, 1)


def test_census_through_dask_local_cluster(tmp_path):
    # common practice, no source: the Dask executor must give the local executor's result
    import distributed

    with distributed.LocalCluster(
        n_workers=1,
        threads_per_worker=2,
        processes=False,
        protocol="tcp://",
        host="127.0.0.1",
        dashboard_address=None,
    ) as cluster:
        remote = census(
            maps.get("3x+5"),
            30,
            side="positive",
            store=tmp_path / "d.sqlite",
            executor="dask",
            scheduler=cluster.scheduler_address,
            chunk_size=4096,
        )
    local = census(maps.get("3x+5"), 30, side="positive", store=False, workers=1)
    # OEIS A226607 (k = 5): 1, 19, 23, 187, 347 primitive; 5 is 5 * {1}
    assert remote.minima == local.minima == (0, 1, 5, 19, 23, 187, 347)
    assert remote.plans["positive"].scan_to == local.plans["positive"].scan_to


def test_cli_accepts_long_lengths_where_the_continued_fraction_plans(cli_run):
    # the K = 8,000,000 plan of the issue (continued fraction: planning does not grow
    # with K); maps, methods and families whose planning grows with K keep the 10^6 limit
    import json

    r = cli_run("census", "3x+1", "--max-length", "8*10^6", "--side", "both", "--plan", "--json")
    assert r.returncode == 0, r.stderr
    doc = json.loads(r.stdout)
    # the same figures as test_plan_3x1_to_8_million, through the CLI
    assert doc["plans"]["positive"]["scan_to"] == 984_572_810_980
    assert doc["plans"]["negative"]["scan_to"] == 817_536_973_660
    for args in (
        ("mod3-4x", "--max-length", "2*10^6"),
        ("3x+1", "--max-length", "2*10^6", "--method", "itineraries"),
        ("3x+k", "--offsets", "1..3", "--max-length", "2*10^6"),
    ):
        r = cli_run("census", *args)
        assert r.returncode == 2, args
        assert r.stderr.count("error:") == 1 and "at most 10^6" in r.stderr
