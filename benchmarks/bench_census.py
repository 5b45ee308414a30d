"""Census length per minute, peak memory, and the family census, against plain enumeration.

Run (from the repository root, after ``make test`` created .venv)::

    .venv/bin/python benchmarks/bench_census.py --lengths 10^5            # about 10 s
    .venv/bin/python benchmarks/bench_census.py                           # 10^5, 10^6, 8*10^6
    .venv/bin/python benchmarks/bench_census.py --lengths 10^5 --family   # + 3x+k, k = 1..1000

The default lengths need the machine alone for about half an hour
(8*10^6 scans about 1.8e12 starts, 10^6 about 1.0e12). Measured in one run:

1. ``cyclewright census 3x+1 --max-length K --side both`` for each K, as a
   user runs it: a fresh process, a fresh store, default workers. Reported:
   K, the range scanned per side (the proved bound, from the continued
   fraction of log2 3), wall time, the census length reached per minute
   (``K * 60 / wall``), starts per second, and the peak memory of the whole
   process tree (the census and its scan workers; proportional set size,
   shared library pages split between processes, sampled every 0.2 s).
   The kernels are compiled and the sieve table built by a warm-up census
   before anything is timed.
2. With ``--family``: ``census "3x+k" --offsets 1..1000 --max-length 100`` (333
   maps), wall time and peak memory.
3. Plain enumeration of itineraries (method 2 without pruning, every word
   solved exactly) and the pruned itinerary method, each within a budget
   (default 20 s): the largest K they certify, for the ratio of lengths.

Results go to ``benchmarks/_build/bench_census.json``. Figures are
measurements (floats, heuristic as speeds), the ranges are exact.
"""

from __future__ import annotations

import argparse
import itertools
import json
import os
import subprocess
import sys
import tempfile
import threading
import time
from pathlib import Path

from harness import BUILD, ROOT, parse_n

sys.path.insert(0, str(ROOT))

DEFAULT_LENGTHS = "10^5,10^6,8*10^6"


def _tree_rss(pid: int) -> int:
    """Memory of a process and all its descendants (0 when it has ended).

    The proportional set size (PSS: shared pages split between the processes
    that share them) where the system reports it, else the resident set size
    (which counts the libraries shared by the workers once per process).
    """
    try:
        import psutil
    except ImportError:  # pragma: no cover - psutil is a test dependency
        return 0
    try:
        p = psutil.Process(pid)
        procs = [p, *p.children(recursive=True)]
    except psutil.Error:
        return 0
    total = 0
    for q in procs:
        try:
            info = q.memory_full_info()
            total += getattr(info, "pss", info.rss)
        except psutil.Error:
            try:
                total += q.memory_info().rss
            except psutil.Error:
                pass
    return total


def measured(cmd: list[str], env: dict | None = None, timeout: float | None = None) -> dict:
    """Run ``cmd``: wall time, exit status, output, and the peak memory of its process tree."""
    t0 = time.perf_counter()
    p = subprocess.Popen(
        cmd,
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
        cwd=ROOT,
        env={**os.environ, **(env or {})},
    )
    peak = [0]
    stop = threading.Event()

    def poll() -> None:
        while not stop.is_set():
            peak[0] = max(peak[0], _tree_rss(p.pid))
            stop.wait(0.2)

    th = threading.Thread(target=poll, daemon=True)
    th.start()
    try:
        out, err = p.communicate(timeout=timeout)
    finally:
        stop.set()
        th.join()
        if p.poll() is None:
            p.kill()
            p.communicate()
    return {
        "seconds": time.perf_counter() - t0,
        "rc": p.returncode,
        "out": out,
        "err": err,
        "peak_mib": peak[0] / 2**20,
    }


def cyclewright_cmd() -> list[str]:
    exe = Path(sys.executable).parent / "cyclewright"
    return [str(exe)] if exe.exists() else [sys.executable, "-m", "cyclewright"]


def census_run(K: int, tmp: Path) -> dict:
    cmd = [*cyclewright_cmd(), "census", "3x+1", "--max-length", str(K), "--side", "both"]
    cmd += ["--store", str(tmp / f"census-{K}.sqlite"), "--json"]
    r = measured(cmd)
    if r["rc"] != 0:
        raise SystemExit(f"census failed (K = {K}): {r['err']}")
    doc = json.loads(r["out"])
    plans = doc["plans"]
    starts = sum(v["scan_to"] or 0 for v in plans.values())
    rec = {
        "K": K,
        "scan_to": {s: v["scan_to"] for s, v in plans.items()},
        "bound_type": {s: v["bound_content"] for s, v in plans.items()},
        "starts": starts,
        "seconds": round(r["seconds"], 2),
        "length_per_minute": round(K * 60 / r["seconds"]),
        "starts_per_second": starts / r["seconds"],
        "peak_mib": round(r["peak_mib"], 1),
        "minima": [c["minimum"] for c in doc["cycles"]],
    }
    print(
        f"census 3x+1 K = {K:,}: {starts:.3g} starts, {r['seconds']:.1f} s, "
        f"{rec['length_per_minute']:,} lengths/min, {rec['starts_per_second']:.3g} starts/s, "
        f"peak {rec['peak_mib']:.0f} MiB, minima {rec['minima']}",
        flush=True,
    )
    return rec


def family_run(tmp: Path) -> dict:
    cmd = [*cyclewright_cmd(), "census", "3x+k", "--offsets", "1..1000", "--max-length", "100"]
    cmd += ["--json"]
    r = measured(cmd, env={"CYCLEWRIGHT_DATA_DIR": str(tmp / "data")})
    if r["rc"] != 0:
        raise SystemExit(f"family census failed: {r['err']}")
    rows = json.loads(r["out"])["rows"]
    rec = {
        "maps": len(rows),
        "seconds": round(r["seconds"], 2),
        "peak_mib": round(r["peak_mib"], 1),
    }
    print(f"census 3x+k, k = 1..1000, K = 100: {rec}", flush=True)
    return rec


def plain_enumeration(budget: float) -> dict:
    from cyclewright import maps
    from cyclewright.cycles.solver import solve

    m = maps.get("3x+1")
    total = 0.0
    done = 0
    last = 0.0
    found: set[int] = set()
    for K in itertools.count(1):
        if total + 2.2 * last > budget:  # the next length would take about twice the last one
            break
        t0 = time.perf_counter()
        for word in itertools.product((0, 1), repeat=K):
            c = solve(m, word)
            if c.integral:
                found.add(int(c.minimum))
        last = time.perf_counter() - t0
        total += last
        done = K
        print(f"plain enumeration, K = {K}: {last:.2f} s (total {total:.1f} s)", flush=True)
    return {
        "K": done,
        "seconds": round(total, 2),
        "minima": sorted(found, key=lambda v: (v < 0, abs(v))),
    }


def pruned_itineraries(budget: float) -> dict:
    from cyclewright import maps
    from cyclewright.cycles.wordsearch import integral_cycles_by_itinerary

    m = maps.get("3x+1")
    best = None
    for K in range(10, 80, 2):
        t0 = time.perf_counter()
        r = integral_cycles_by_itinerary(m, K)
        dt = time.perf_counter() - t0
        if dt > budget:
            break
        best = {"K": K, "seconds": round(dt, 2), "minima": list(r.minima())}
        print(f"itinerary method (meet in the middle), K = {K}: {dt:.2f} s", flush=True)
        if dt * 1.5 > budget:  # the next even length costs about 2x
            break
    return best or {}


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument(
        "--lengths", default=DEFAULT_LENGTHS, help=f"K values (default {DEFAULT_LENGTHS})"
    )
    ap.add_argument("--family", action="store_true", help="also the 3x+k family census")
    ap.add_argument("--budget", type=float, default=20.0, help="seconds for the plain methods")
    args = ap.parse_args()
    BUILD.mkdir(exist_ok=True)
    lengths = [parse_n(x) for x in args.lengths.split(",") if x.strip()]
    with tempfile.TemporaryDirectory() as tmp:
        census_run(1000, Path(tmp))  # warm-up: numba cache, sieve table
        runs = [census_run(K, Path(tmp)) for K in lengths]
        family = family_run(Path(tmp)) if args.family else None
    plain = plain_enumeration(args.budget)
    mitm = pruned_itineraries(args.budget)
    result = {
        "census_3x1_both_sides": runs,
        "family_3x_k": family,
        "plain_enumeration": plain,
        "itinerary_method": mitm,
        "budget_seconds": args.budget,
    }
    (BUILD / "bench_census.json").write_text(json.dumps(result, indent=2) + "\n")
    print()
    print("| K | range scanned (positive / negative) | wall | lengths per minute | peak memory |")
    print("|---|---|---|---|---|")
    for r in runs:
        rng = " / ".join(f"{v:.3g}" for v in r["scan_to"].values())
        print(
            f"| {r['K']:,} | {rng} | {r['seconds']:.1f} s | {r['length_per_minute']:,} | "
            f"{r['peak_mib']:.0f} MiB |"
        )
    if family:
        print(
            f"family 3x+k (k = 1..1000, K = 100): {family['seconds']:.1f} s, {family['peak_mib']:.0f} MiB"
        )
    print(f"plain enumeration of itineraries in {args.budget:.0f} s: largest K = {plain['K']}")
    print(
        f"itinerary method (meet in the middle) in {args.budget:.0f} s: largest K = {mitm.get('K')}"
    )
    if runs and plain["K"]:
        print(
            f"ratio of lengths (largest census K here / plain enumeration): {runs[-1]['K'] / plain['K']:,.0f}x"
        )


if __name__ == "__main__":
    main()
