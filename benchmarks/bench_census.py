"""How long a certified census can be in 60 seconds, against plain enumeration of itineraries.

Run (from the repository root, after ``make test`` created .venv)::

    .venv/bin/python benchmarks/bench_census.py           # budget 60 s per run
    .venv/bin/python benchmarks/bench_census.py --budget 20

Measured in one run on this machine, for 3x+1 on both sides:

1. ``cyclewright census 3x+1 --max-length K --side both`` (method 1: proved
   bound + compiled scan in cycle-length mode, default workers), as a user
   runs it: a fresh process, wall-clock time, a fresh store. The scan range is
   the largest proved bound over all types of length <= K, which only jumps at
   the lengths of good approximations of log2 3; the candidate K are those
   jump points and round numbers. The largest K that finishes within the
   budget is reported.
2. Plain enumeration (method 2 without pruning): every itinerary of length
   <= K solved exactly (``cycles.solve``), K increased one by one until the
   total time passes the budget (the last complete K is reported; the time of
   the next K is extrapolated from the doubling, never waited for).
3. For reference, the pruned itinerary method (meet in the middle) within the budget.

Results go to ``benchmarks/_build/bench_census.json``.
"""

from __future__ import annotations

import argparse
import itertools
import json
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
BUILD = HERE / "_build"
ROOT = HERE.parent
sys.path.insert(0, str(ROOT))

CANDIDATES = [
    1_000,
    10_000,
    100_000,
    125_742,
    125_743,
    176_250,
    176_251,
    301_993,
    301_994,
    1_000_000,
]


def method1(budget: float) -> list[dict]:
    out = []
    for K in CANDIDATES:
        with tempfile.TemporaryDirectory() as tmp:
            cmd = [
                sys.executable,
                "-m",
                "cyclewright",
                "census",
                "3x+1",
                "--max-length",
                str(K),
                "--side",
                "both",
                "--store",
                str(Path(tmp) / "s.sqlite"),
                "--json",
            ]
            t0 = time.perf_counter()
            try:
                p = subprocess.run(cmd, capture_output=True, text=True, timeout=budget, cwd=ROOT)
                dt = time.perf_counter() - t0
                doc = json.loads(p.stdout) if p.returncode == 0 else {}
                plans = doc.get("plans", {})
                rec = {
                    "K": K,
                    "seconds": round(dt, 2),
                    "finished": p.returncode == 0,
                    "minima": [c["minimum"] for c in doc.get("cycles", [])],
                    "scan_to": {s: v["scan_to"] for s, v in plans.items()},
                }
            except subprocess.TimeoutExpired:
                rec = {"K": K, "seconds": None, "finished": False, "timeout": budget}
        print(f"method 1, K = {K}: {rec}", flush=True)
        out.append(rec)
        if not rec["finished"]:
            break
    return out


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
    ap.add_argument("--budget", type=float, default=60.0, help="seconds per run (default 60)")
    args = ap.parse_args()
    BUILD.mkdir(exist_ok=True)
    m1 = method1(args.budget)
    best1 = max((r["K"] for r in m1 if r["finished"] and r["seconds"] <= args.budget), default=None)
    plain = plain_enumeration(args.budget)
    mitm = pruned_itineraries(args.budget)
    result = {
        "budget_seconds": args.budget,
        "method1_runs": m1,
        "method1_largest_K": best1,
        "plain_enumeration": plain,
        "itinerary_method": mitm,
    }
    (BUILD / "bench_census.json").write_text(json.dumps(result, indent=2) + "\n")
    print()
    print(f"census 3x+1 --side both within {args.budget:.0f} s:")
    print(f"  method 1 (bound + scan):           largest K = {best1}")
    print(f"  plain enumeration of itineraries:  largest K = {plain['K']}")
    print(f"  itinerary method (meet in middle): largest K = {mitm.get('K')}")
    if best1 and plain["K"]:
        print(f"  ratio of lengths: {best1 / plain['K']:.0f}x")


if __name__ == "__main__":
    main()
