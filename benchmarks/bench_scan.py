"""Speed of ``cyclewright scan`` against plain implementations of the same classification.

Run (from the repository root, after ``make test`` created .venv)::

    .venv/bin/python benchmarks/bench_scan.py            # 3x+1 on [1, 10^9], 5x+1 on [1, 10^7]
    .venv/bin/python benchmarks/bench_scan.py --quick    # 10x smaller ranges

What is measured, in one run on this machine:

1. ``cyclewright scan 3x+1 --to N`` with the default workers (all cores), as a
   user runs it: a fresh process, wall-clock time including start-up, a new
   store in a temporary directory. Also on N/10, to show that peak memory does
   not grow with the range. The one-time work of a first run on a machine
   (compiling the kernels into numba's cache, building the depth-24 sieve
   table into the user cache directory, together about 20 s) is done by two
   warm-up scans before anything is timed.
2. The same classification as a plain C loop (``benchmarks/plain_scan.c``,
   compiled here with ``gcc -O2`` into ``benchmarks/_build/``), one start after
   the other, one core, on the same range.
3. The same as a plain Python loop on a smaller range, scaled to starts per second.
4. ``cyclewright scan 5x+1 --to M`` (most time goes into the exact multi-limb
   continuation of orbits that pass 2^63), against the plain Python loop
   (exact integers) on a small range.

The counts of the C loop are compared with the scan's (they must agree for
3x+1, whose orbits stay far below 2^63 here). Figures are rates (floats,
measurements); the results go to ``benchmarks/_build/bench_scan.json``.
"""

from __future__ import annotations

import argparse
import json
import os
import platform
import subprocess
import tempfile
import time
from pathlib import Path

from harness import BUILD, ROOT, build_c, measured


def plain_c(exe: Path, a: int, b: int, lo: int, hi: int, cap: int) -> dict:
    out = subprocess.run(
        [str(exe), str(a), str(b), str(lo), str(hi), str(cap)],
        capture_output=True,
        text=True,
        check=True,
    ).stdout.split()
    drops, cycles, other, unresolved = map(int, out[:4])
    secs = float(out[4])
    return {
        "drops": drops,
        "cycles": cycles,
        "other_cycle": other,
        "unresolved": unresolved,
        "seconds": secs,
        "rate": (hi - lo + 1) / secs,
    }


def plain_python(a: int, b: int, lo: int, hi: int, cap: int) -> dict:
    """The C loop's logic in Python (exact integers, so no overflow stop)."""
    counts = [0, 0, 0, 0]
    t0 = time.perf_counter()
    for s in range(lo, hi + 1):
        v = t = s
        power, lam, out = 1, 0, 3
        for _ in range(cap):
            v = (a * v + b) >> 1 if v & 1 else v >> 1
            if abs(v) < s or v == -s:
                out = 0
                break
            if v == s:
                out = 1
                break
            if v == t:
                out = 2
                break
            lam += 1
            if lam == power:
                t, power, lam = v, power << 1, 0
        counts[out] += 1
    secs = time.perf_counter() - t0
    return {
        "drops": counts[0],
        "cycles": counts[1],
        "other_cycle": counts[2],
        "unresolved": counts[3],
        "seconds": secs,
        "rate": (hi - lo + 1) / secs,
    }


def cyclewright_scan(name: str, to: int, store_dir: Path, tag: str = "") -> dict:
    """``cyclewright scan NAME --to TO`` in a fresh process, with a new store."""
    exe = ROOT / ".venv" / "bin" / "cyclewright"
    cmd = [str(exe) if exe.exists() else "cyclewright", "scan", name, "--to", str(to), "--json"]
    cmd += ["--store", str(store_dir / f"{name}-{to}{tag}.sqlite")]
    res = measured(cmd)
    doc = json.loads(res["out"])
    return {
        "command": " ".join(["cyclewright", *cmd[1:]]),
        "wall_seconds": res["seconds"],
        "rate_wall": to / res["seconds"],
        "inner_seconds": doc["run"]["seconds"],
        "rate_inner": to / doc["run"]["seconds"],
        "peak_rss_mib": res["maxrss_kib"] / 1024,
        "counts": doc["counts"]["positive"],
        "minima": doc["minima"]["positive"],
        "unresolved_escaped": doc["unresolved"]["positive"]["escaped"],
        "executor": doc["run"]["executor"],
        "sieve": doc["sieve"]["positive"],
    }


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--quick", action="store_true", help="ranges 10x smaller")
    ap.add_argument("--to", type=int, default=None, help="3x+1 range (default 10^9)")
    ap.add_argument("--five", type=int, default=None, help="5x+1 range (default 10^7)")
    args = ap.parse_args()
    N = args.to or (10**8 if args.quick else 10**9)
    F = args.five or (10**6 if args.quick else 10**7)
    cap = 1000  # the scan's default step cap
    results: dict = {
        "machine": {
            "cpus": os.cpu_count(),
            "platform": platform.platform(),
            "python": platform.python_version(),
        }
    }
    exe = build_c("plain_scan")
    with tempfile.TemporaryDirectory() as tmp:
        tmpd = Path(tmp)
        # warm the caches a user's second run finds: the compiled kernels (numba)
        # and the sieve tables (user cache directory), so neither the one-time
        # compilation nor the one-time table construction is measured
        cyclewright_scan("3x+1", 1000, tmpd)
        cyclewright_scan("3x+1", 2**24 + 1000, tmpd, tag="-tables")
        print(f"3x+1 on [1, {N:,}]")
        tiny = cyclewright_scan("3x+1", 1000, tmpd, tag="-startup")
        small = cyclewright_scan("3x+1", N // 10, tmpd)
        big = cyclewright_scan("3x+1", N, tmpd)
        marginal = (N - N // 10) / max(big["wall_seconds"] - small["wall_seconds"], 1e-9)
        c = plain_c(exe, 3, 1, 1, N, cap)
        P = max(10**5, N // 5000)
        py = plain_python(3, 1, 1, P, cap)
        same = all(
            c[k] == big["counts"][k] for k in ("drops", "cycles", "other_cycle", "unresolved")
        )
        results["3x+1"] = {
            "range": N,
            "cyclewright": big,
            "cyclewright_tenth": small,
            "plain_c_O2": c,
            "plain_python": {**py, "range": P},
            "c_counts_agree": same,
            "startup_seconds": tiny["wall_seconds"],
            "marginal_rate": marginal,
            "speedup_vs_c_wall": big["rate_wall"] / c["rate"],
            "speedup_vs_c_inner": big["rate_inner"] / c["rate"],
            "speedup_vs_c_marginal": marginal / c["rate"],
            "speedup_vs_python_wall": big["rate_wall"] / py["rate"],
        }
        r = results["3x+1"]
        print(
            f"  cyclewright scan ({big['executor']}): {big['wall_seconds']:.2f} s wall, {big['rate_wall']:.3e} starts/s"
        )
        print(
            f"    (inside the scan: {big['inner_seconds']:.2f} s, {big['rate_inner']:.3e} starts/s; sieve {big['sieve']})"
        )
        print(
            f"  plain C loop (gcc -O2, 1 core): {c['seconds']:.2f} s, {c['rate']:.3e} starts/s; counts agree: {same}"
        )
        print(
            f"  plain Python loop on [1, {P:,}]: {py['rate']:.3e} starts/s (scaled: {N / py['rate']:.0f} s)"
        )
        print(
            f"  start-up (a scan of [1, 1000]): {tiny['wall_seconds']:.2f} s wall; marginal rate "
            f"from [1, {N // 10:,}] to [1, {N:,}]: {marginal:.3e} starts/s"
        )
        print(
            f"  speed-up against the C loop: {r['speedup_vs_c_wall']:.1f}x wall (start-up included), "
            f"{r['speedup_vs_c_inner']:.1f}x inside the scan call, {r['speedup_vs_c_marginal']:.1f}x marginal; "
            f"{r['speedup_vs_python_wall']:.0f}x the Python loop (wall)"
        )
        print(
            f"  peak memory: {small['peak_rss_mib']:.0f} MiB on [1, {N // 10:,}], {big['peak_rss_mib']:.0f} MiB on [1, {N:,}]"
        )

        print(f"5x+1 on [1, {F:,}]")
        five = cyclewright_scan("5x+1", F, tmpd)
        Q = 2 * 10**4
        py5 = plain_python(5, 1, 1, Q, cap)
        results["5x+1"] = {
            "range": F,
            "cyclewright": five,
            "plain_python": {**py5, "range": Q},
            "speedup_vs_python_wall": five["rate_wall"] / py5["rate"],
        }
        print(
            f"  cyclewright scan: {five['wall_seconds']:.2f} s wall, {five['rate_wall']:.3e} starts/s; minima {five['minima']}"
        )
        print(f"    counts {five['counts']} ({five['unresolved_escaped']} unresolved passed 2^63)")
        print(
            f"  plain Python loop (exact) on [1, {Q:,}]: {py5['rate']:.3e} starts/s; speed-up {results['5x+1']['speedup_vs_python_wall']:.0f}x"
        )
    BUILD.mkdir(exist_ok=True)
    (BUILD / "bench_scan.json").write_text(json.dumps(results, indent=2))
    print(f"results: {BUILD / 'bench_scan.json'}")


if __name__ == "__main__":
    main()
