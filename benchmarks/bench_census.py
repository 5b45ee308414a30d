"""Census length per minute, peak memory, and the family census, against plain enumeration.

Run (from the repository root, after ``make test`` created .venv)::

    .venv/bin/python benchmarks/bench_census.py --lengths 10^5            # about 10 s
    .venv/bin/python benchmarks/bench_census.py                           # 10^5, 10^6, 8*10^6
    .venv/bin/python benchmarks/bench_census.py --lengths 10^5 --family   # + 3x+k, k = 1..1000
    .venv/bin/python benchmarks/bench_census.py --lengths 10^5 --probe 10^10 --no-plain
    .venv/bin/python benchmarks/bench_census.py --lengths 8*10^6 --no-plain   # 9 min, both cores

The default lengths need the machine alone for about half an hour
(8*10^6 scans about 1.8e12 starts, 10^6 about 1.0e12). Measured in one run:

1. ``cyclewright census 3x+1 --max-length K --side both`` for each K, as a
   user runs it: a fresh process, a fresh store, default workers. Reported:
   K, the range scanned per side (the proved bound, from the continued
   fraction of log2 3), wall time, the census length reached per minute
   (``K * 60 / wall``), starts per second, and the peak memory of the whole
   process tree (the census and its scan workers): the proportional set size
   (PSS) of each process from /proc/PID/smaps_rollup, summed, sampled every
   0.2 s, with each process's share at the peak (a page shared by n
   processes counts 1/n in each; the summed resident sets, which count it n
   times, and the largest single one are reported beside it).
   The kernels are compiled and the sieve table built by a warm-up census
   before anything is timed.
2. With ``--probe N``: ``scan 3x+1 --max-length 8*10^6 --side both`` on the N
   starts below 984,572,810,980 (the top of the K = 8*10^6 census's positive
   range): the same cap, chunks, workers and store as that census, for its
   memory in seconds instead of nine minutes.
3. With ``--family``: ``census "3x+k" --offsets 1..1000 --max-length 100`` (333
   maps), wall time and peak memory.
4. Plain enumeration of itineraries (method 2 without pruning, every word
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


def _tree_pids(pid: int) -> list[int]:
    """The process and all its descendants (from /proc: parent ids), empty when it has ended."""
    children: dict[int, list[int]] = {}
    for entry in os.listdir("/proc"):
        if not entry.isdigit():
            continue
        try:
            with open(f"/proc/{entry}/stat", "rb") as f:
                stat = f.read()
        except OSError:
            continue
        # pid (comm) state ppid ...: comm may hold spaces and parentheses
        ppid = int(stat[stat.rindex(b")") + 2 :].split()[1])
        children.setdefault(ppid, []).append(int(entry))
    if not os.path.exists(f"/proc/{pid}"):
        return []
    out, todo = [], [pid]
    while todo:
        p = todo.pop()
        out.append(p)
        todo.extend(children.get(p, ()))
    return out


def _kib(path: str, key: str) -> int:
    """The ``key:`` line of a /proc file in KiB (0 when the process has ended)."""
    try:
        with open(path) as f:
            for line in f:
                if line.startswith(key):
                    return int(line.split()[1])
    except (OSError, ValueError):
        pass
    return 0


def tree_memory(pid: int) -> dict:
    """Memory of a process tree now, in bytes.

    ``pss``: the sum of the proportional set sizes (/proc/PID/smaps_rollup;
    a page shared by n processes counts 1/n in each, so the sum is the
    memory the tree really holds); ``rss_sum``: the sum of the resident sets
    (shared pages counted once per process: an overcount); ``rss_max``: the
    largest single process; ``procs``: per process (pid, name, pss).
    """
    procs = []
    for p in _tree_pids(pid):
        pss = _kib(f"/proc/{p}/smaps_rollup", "Pss:")
        rss = _kib(f"/proc/{p}/status", "VmRSS:")
        try:
            with open(f"/proc/{p}/comm") as f:
                name = f.read().strip()
        except OSError:
            name = "?"
        procs.append((p, name, pss * 1024, rss * 1024))
    return {
        "pss": sum(x[2] for x in procs),
        "rss_sum": sum(x[3] for x in procs),
        "rss_max": max((x[3] for x in procs), default=0),
        "procs": [(p, n, pss) for p, n, pss, _ in procs],
    }


def measured(cmd: list[str], env: dict | None = None, timeout: float | None = None) -> dict:
    """Run ``cmd``: wall time, exit status, output, and the peak memory of its process tree.

    Sampled every 0.2 s: the peak of the summed proportional set size (PSS),
    with the processes' shares at that moment, the peak of the summed
    resident sets and the largest single resident set.
    """
    t0 = time.perf_counter()
    p = subprocess.Popen(
        cmd,
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
        cwd=ROOT,
        env={**os.environ, **(env or {})},
    )
    peak = {"pss": 0, "rss_sum": 0, "rss_max": 0, "procs": []}
    stop = threading.Event()

    def poll() -> None:
        while not stop.is_set():
            now = tree_memory(p.pid)
            if now["pss"] > peak["pss"]:
                peak["pss"], peak["procs"] = now["pss"], now["procs"]
            peak["rss_sum"] = max(peak["rss_sum"], now["rss_sum"])
            peak["rss_max"] = max(peak["rss_max"], now["rss_max"])
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
        "peak_mib": peak["pss"] / 2**20,
        "peak_rss_sum_mib": peak["rss_sum"] / 2**20,
        "peak_rss_max_mib": peak["rss_max"] / 2**20,
        "at_peak": [
            {"pid": pid, "name": name, "pss_mib": round(pss / 2**20, 1)}
            for pid, name, pss in peak["procs"]
        ],
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
        **_memory_fields(r),
        "minima": [c["minimum"] for c in doc["cycles"]],
    }
    print(
        f"census 3x+1 K = {K:,}: {starts:.3g} starts, {r['seconds']:.1f} s, "
        f"{rec['length_per_minute']:,} lengths/min, {rec['starts_per_second']:.3g} starts/s, "
        f"{_memory_text(rec)}, minima {rec['minima']}",
        flush=True,
    )
    return rec


def _memory_fields(r: dict) -> dict:
    return {
        "peak_mib": round(r["peak_mib"], 1),
        "peak_rss_sum_mib": round(r["peak_rss_sum_mib"], 1),
        "peak_rss_max_mib": round(r["peak_rss_max_mib"], 1),
        "at_peak": r["at_peak"],
    }


def _memory_text(rec: dict) -> str:
    shares = ", ".join(f"{p['name']} {p['pss_mib']:.0f}" for p in rec["at_peak"])
    return (
        f"peak PSS {rec['peak_mib']:.0f} MiB ({shares}); resident sets summed "
        f"{rec['peak_rss_sum_mib']:.0f} MiB, largest process {rec['peak_rss_max_mib']:.0f} MiB"
    )


#: The memory probe: the census's scan at K = 8*10^6 (the cap, the sieve tables, the workers,
#: the store) on a window of chunks at the top of its positive range, both sides.
PROBE_K = 8_000_000
PROBE_TO = 984_572_810_980


def memory_probe(tmp: Path, window: int) -> dict:
    """``scan 3x+1 --max-length 8*10^6 --side both`` on ``window`` starts below the top of the range.

    The per-process memory of the K = 8*10^6 census (kernels, sieve tables,
    step cap, chunk results, store) without its nine minutes: the same
    command path, chunk size and workers on a window of its range.
    """
    cmd = [*cyclewright_cmd(), "scan", "3x+1", "--from", str(PROBE_TO - window + 1)]
    cmd += ["--to", str(PROBE_TO), "--max-length", str(PROBE_K), "--side", "both"]
    cmd += ["--store", str(tmp / "probe.sqlite"), "--json"]
    r = measured(cmd)
    if r["rc"] != 0:
        raise SystemExit(f"memory probe failed: {r['err']}")
    rec = {
        "command": " ".join(cmd[len(cyclewright_cmd()) :]),
        "starts": 2 * window,
        "seconds": round(r["seconds"], 2),
        **_memory_fields(r),
    }
    print(f"memory probe (K = 8*10^6, {2 * window:.3g} starts): {_memory_text(rec)}", flush=True)
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
        **_memory_fields(r),
    }
    print(
        f"census 3x+k, k = 1..1000, K = 100: {rec['maps']} maps, {rec['seconds']:.1f} s, "
        f"{_memory_text(rec)}",
        flush=True,
    )
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
    ap.add_argument(
        "--probe",
        default=None,
        help="also the memory probe at K = 8*10^6 on this many starts per side (e.g. 2*10^10)",
    )
    ap.add_argument(
        "--no-plain", action="store_true", help="skip the plain enumeration and itinerary method"
    )
    args = ap.parse_args()
    BUILD.mkdir(exist_ok=True)
    lengths = [parse_n(x) for x in args.lengths.split(",") if x.strip()]
    with tempfile.TemporaryDirectory() as tmp:
        census_run(1000, Path(tmp))  # warm-up: numba cache, sieve table
        runs = [census_run(K, Path(tmp)) for K in lengths]
        family = family_run(Path(tmp)) if args.family else None
        probe = memory_probe(Path(tmp), parse_n(args.probe)) if args.probe else None
    plain = {"K": 0} if args.no_plain else plain_enumeration(args.budget)
    mitm = {} if args.no_plain else pruned_itineraries(args.budget)
    result = {
        "census_3x1_both_sides": runs,
        "family_3x_k": family,
        "memory_probe_8e6": probe,
        "plain_enumeration": plain,
        "itinerary_method": mitm,
        "budget_seconds": args.budget,
    }
    (BUILD / "bench_census.json").write_text(json.dumps(result, indent=2) + "\n")
    print()
    print(
        "| K | range scanned (positive / negative) | wall | lengths per minute | "
        "peak memory (PSS, whole tree) |"
    )
    print("|---|---|---|---|---|")
    for r in runs:
        rng = " / ".join(f"{v:.3g}" for v in r["scan_to"].values())
        print(
            f"| {r['K']:,} | {rng} | {r['seconds']:.1f} s | {r['length_per_minute']:,} | "
            f"{r['peak_mib']:.0f} MiB |"
        )
    if family:
        print(
            f"family 3x+k (k = 1..1000, K = 100): {family['seconds']:.1f} s, {_memory_text(family)}"
        )
    if probe:
        print(f"memory probe at K = 8*10^6 ({probe['command']}): {_memory_text(probe)}")
    if not args.no_plain:
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
