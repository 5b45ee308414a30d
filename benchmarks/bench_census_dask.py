"""The census scan through Dask: a LocalCluster of 1 and 2 workers on a fixed range, and the extrapolation.

Run (from the repository root, after ``make test`` created .venv)::

    .venv/bin/python benchmarks/bench_census_dask.py                      # about a minute
    .venv/bin/python benchmarks/bench_census_dask.py --chunks 64 --workers 1,2

What runs: ``scan(3x+1, side="negative", max_cycle_length=16,785,920)`` --
the scan of the census to length 16,785,920, on the chunk grid of that census
(2^27 starts a chunk) -- over ``--chunks`` chunks just below the top of its
negative range (29,678,897,487,861), with ``executor="dask"`` on a
``distributed.LocalCluster`` of N worker processes (one thread each), no
store. Each cluster first scans one chunk untimed (the workers load the
compiled kernels and build the sieve tables), then the range is timed.

Reported per N: wall time, starts per second, starts per second per worker.
Then the wall time of the whole census to K = 16,785,920 (3.07e13 starts,
both sides) on N workers as *measured per-worker rate times N*: an
extrapolation (heuristic) -- it assumes workers as fast as these, a
scheduler that keeps up, and the range's cost per start like this sample's.
Results go to ``benchmarks/_build/bench_census_dask.json``.
"""

from __future__ import annotations

import argparse
import json
import logging
import os
import sys
import time

from harness import BUILD, ROOT

sys.path.insert(0, str(ROOT))

from cyclewright.cycles.presentation import duration_text  # noqa: E402 (after the path)

K = 16_785_920
NEG_TOP = 29_678_897_487_861  # the proved bound on the negative side at K (docs/census.md)
POS_TOP = 984_572_810_980
CHUNK = 2**27


def run(n_workers: int, chunks: int) -> dict:
    import distributed

    from cyclewright.cycles.scan.run import scan

    hi = NEG_TOP
    lo = hi - chunks * CHUNK + 1
    with distributed.LocalCluster(
        n_workers=n_workers,
        threads_per_worker=1,
        processes=True,
        dashboard_address=None,
        host="127.0.0.1",
        silence_logs=logging.CRITICAL,
    ) as cluster:
        kw = dict(
            side="negative",
            max_cycle_length=K,
            store=False,
            executor="dask",
            scheduler=cluster.scheduler_address,
            chunk_size=CHUNK,
        )
        # warm-up: every worker loads the kernels and its sieve tables
        scan("3x+1", lo - 1, start=lo - n_workers * CHUNK, **kw)
        t0 = time.perf_counter()
        r = scan("3x+1", hi, start=lo, **kw)
        dt = time.perf_counter() - t0
    starts = hi - lo + 1
    assert r.counts["negative"]["unresolved"] == 0
    rec = {
        "workers": n_workers,
        "range": [-hi, -lo],
        "starts": starts,
        "seconds": round(dt, 3),
        "starts_per_second": starts / dt,
        "per_worker": starts / dt / n_workers,
    }
    print(
        f"LocalCluster, {n_workers} worker(s): {starts:.3g} starts in {dt:.2f} s, "
        f"{rec['starts_per_second']:.3g} starts/s, {rec['per_worker']:.3g} per worker",
        flush=True,
    )
    return rec


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--chunks", type=int, default=64, help="chunks of 2^27 starts timed")
    ap.add_argument("--workers", default="1,2", help="cluster sizes (default 1,2)")
    args = ap.parse_args()
    BUILD.mkdir(exist_ok=True)
    logging.getLogger("distributed").setLevel(logging.CRITICAL)  # shutdown chatter
    load = os.getloadavg()[0]
    runs = [run(int(n), args.chunks) for n in args.workers.split(",")]
    rate = min(r["per_worker"] for r in runs)  # the slower per-worker rate: conservative
    total = POS_TOP + NEG_TOP
    table = {N: total / (N * rate) for N in (1, 2, 8, 16, 64, 256)}
    print(f"\nload average before the runs: {load:.1f}")
    print(
        f"census 3x+1 to K = 16,785,920 ({total:.3g} starts): wall time on N workers at "
        f"{rate:.2g} starts/s per worker (measured above; extrapolation, heuristic)"
    )
    print("| workers N | " + " | ".join(str(n) for n in table) + " |")
    print("|---|" + "---|" * len(table))
    print("| wall time | " + " | ".join(duration_text(s) for s in table.values()) + " |")
    out = {"runs": runs, "rate_per_worker": rate, "load_average": load, "extrapolation": table}
    (BUILD / "bench_census_dask.json").write_text(json.dumps(out, indent=2) + "\n")


if __name__ == "__main__":
    main()
