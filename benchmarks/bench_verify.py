"""The scan against a specialist: a C implementation of the published 3x+1 verification method.

Run (from the repository root, after ``make test`` created .venv)::

    .venv/bin/python benchmarks/bench_verify.py                 # 3x+1 on [1, 10^10]
    .venv/bin/python benchmarks/bench_verify.py --to 10^9       # quicker

Measured in one run on this machine, on the same range and the same number
of cores:

1. ``cyclewright scan 3x+1 --to N --no-store`` (default workers = all
   cores): a fresh process, wall-clock time including start-up; the
   one-time work of a first run (kernel compilation into numba's cache, the
   sieve table into the user cache) is done by a warm-up scan before.
2. ``benchmarks/sieve_verify.c``, compiled here (``gcc -O3 -march=native
   -fopenmp``, into ``benchmarks/_build/``): convergence verification written
   from the description of the method in D. Barina, "Convergence
   verification of the Collatz problem", J. Supercomputing 77 (2021)
   2681-2688 -- a 2^k residue sieve (k = 24 here), runs of odd steps jumped
   with ``ctz(n + 1)`` and a table of powers of 3, 128-bit arithmetic --
   with one OpenMP thread per core. Its own timer (verification only, the
   sieve table excluded, as the paper's figures are) and the process wall
   time are both reported.

The ratio is C time / scan time (above 1: the scan is faster). For scale,
published single-thread figures of the method: 4.2e9 starts/s (Barina 2020,
Xeon Gold 5218) and 3.6e9 (a 2^34-sieve variant on a laptop i5); they use a
much deeper sieve and further tuning than this plain rendering of the
description. Results go to ``benchmarks/_build/bench_verify.json``. Figures
are measurements (floats), not certified.
"""

from __future__ import annotations

import argparse
import json
import os
import platform
import shutil
import subprocess
import sys
import time
from pathlib import Path

from harness import BUILD, HERE, ROOT, parse_n


def build_c() -> tuple[Path, str]:
    BUILD.mkdir(exist_ok=True)
    exe = BUILD / "sieve_verify"
    cc = shutil.which("gcc") or shutil.which("cc")
    if cc is None:
        raise SystemExit("a C compiler (gcc) is needed for the specialist implementation")
    src = str(HERE / "sieve_verify.c")
    for flags in (["-O3", "-march=native", "-fopenmp"], ["-O3", "-fopenmp"], ["-O3"]):
        p = subprocess.run([cc, *flags, "-o", str(exe), src], capture_output=True, text=True)
        if p.returncode == 0:
            return exe, " ".join([Path(cc).name, *flags])
    raise SystemExit(f"cannot compile {src}:\n{p.stderr}")


def cyclewright_cmd() -> list[str]:
    exe = Path(sys.executable).parent / "cyclewright"
    return [str(exe)] if exe.exists() else [sys.executable, "-m", "cyclewright"]


def run_scan(to: int, workers: int) -> dict:
    cmd = [*cyclewright_cmd(), "scan", "3x+1", "--to", str(to), "--no-store", "--json"]
    cmd += ["--workers", str(workers)]
    t0 = time.perf_counter()
    p = subprocess.run(cmd, capture_output=True, text=True, cwd=ROOT)
    dt = time.perf_counter() - t0
    if p.returncode != 0:
        raise SystemExit(f"scan failed: {p.stderr}")
    doc = json.loads(p.stdout)
    return {"seconds": dt, "counts": doc.get("counts"), "label": doc.get("label")}


def run_c(exe: Path, to: int, threads: int, k: int) -> dict:
    t0 = time.perf_counter()
    p = subprocess.run(
        [str(exe), "1", str(to), str(k), str(threads)], capture_output=True, text=True
    )
    dt = time.perf_counter() - t0
    if p.returncode != 0:
        raise SystemExit(f"sieve_verify failed ({p.returncode}): {p.stdout}{p.stderr}")
    doc = json.loads(p.stdout)
    doc["wall_seconds"] = dt
    return doc


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--to", default="10^10", help="range [1, N] (default 10^10)")
    ap.add_argument("--workers", type=int, default=os.cpu_count() or 1)
    ap.add_argument("--sieve-k", type=int, default=24, help="sieve depth of the C program")
    args = ap.parse_args()
    to = parse_n(args.to)
    exe, flags = build_c()
    print(f"compiled {exe.name} with {flags}", flush=True)
    run_scan(10**6, args.workers)  # warm-up: numba cache, sieve table
    scan = run_scan(to, args.workers)
    print(f"cyclewright scan 3x+1 --to {to:.0e}: {scan['seconds']:.2f} s", flush=True)
    c = run_c(exe, to, args.workers, args.sieve_k)
    print(
        f"sieve_verify (Barina 2020 method, {args.workers} threads, 2^{args.sieve_k} sieve): "
        f"{c['verify_seconds']:.2f} s verification, {c['wall_seconds']:.2f} s wall",
        flush=True,
    )
    result = {
        "range": [1, to],
        "workers": args.workers,
        "machine": platform.processor() or platform.machine(),
        "cpu_count": os.cpu_count(),
        "scan": {**scan, "starts_per_second": to / scan["seconds"]},
        "sieve_verify": {
            **c,
            "compiler": flags,
            "starts_per_second": to / c["verify_seconds"],
        },
        "ratio_verify_time_to_scan_time": c["verify_seconds"] / scan["seconds"],
        "ratio_wall_to_scan_time": c["wall_seconds"] / scan["seconds"],
        "published_single_thread_starts_per_second": {
            "Barina 2020, Xeon Gold 5218": 4.2e9,
            "2^34-sieve variant, laptop i5": 3.6e9,
        },
    }
    BUILD.mkdir(exist_ok=True)
    (BUILD / "bench_verify.json").write_text(json.dumps(result, indent=2) + "\n")
    print()
    print(f"3x+1 on [1, {to:.0e}], {args.workers} cores:")
    print(
        f"  cyclewright scan:        {to / scan['seconds']:.3g} starts/s ({scan['seconds']:.2f} s)"
    )
    print(
        f"  sieve_verify (C):        {to / c['verify_seconds']:.3g} starts/s "
        f"({c['verify_seconds']:.2f} s, {c['tested']:,} starts left by the sieve)"
    )
    print(f"  ratio C time / scan time: {result['ratio_verify_time_to_scan_time']:.2f}")


if __name__ == "__main__":
    main()
