"""Speed of ``cyclewright records`` against a plain C loop computing the same 3x+1 records.

Run (from the repository root, after ``make test`` created .venv)::

    .venv/bin/python benchmarks/bench_records.py              # 3x+1 on [1, 10^9]
    .venv/bin/python benchmarks/bench_records.py --to 10^7    # a quick run

What is measured, in one run on this machine:

1. ``cyclewright records 3x+1 --to N --json`` as a user runs it: a fresh
   process, wall-clock time including start-up, with the default workers (all
   cores) and with one worker; peak memory at N and at N/10 (it must not grow
   with the range). One warm-up run first loads the compiled kernels into
   numba's cache (the first run on a machine compiles them, about 10 s).
   For the one-worker run also the CPU time of the whole process (user +
   system, start-up included), which moves less than wall-clock time when
   other work shares the machine.
2. The same records as a plain C loop (``benchmarks/plain_records.c``,
   compiled here with ``gcc -O2`` into ``benchmarks/_build/``): the classic
   trajectory of every start followed to 1, one start after the other, one
   core; its wall-clock and CPU time.

The ratios: C's wall time over ours with all cores and with one worker, and
C's CPU time over our one-worker CPU time (per core).

The record holders and values of the two (undivided delay, glide and peak)
must agree; the script stops otherwise. Figures are measurements (floats);
the results go to ``benchmarks/_build/bench_records.json``.
"""

from __future__ import annotations

import argparse
import json
import os
import platform
import resource
import subprocess
import sys
import time
from pathlib import Path

from harness import BUILD, build_c, measured, parse_n


def plain_c(exe: Path, lo: int, hi: int) -> dict:
    out = subprocess.run(
        [str(exe), str(lo), str(hi)], capture_output=True, text=True, check=True
    ).stdout.split("\n")
    recs: dict[str, list] = {"full_delay": [], "full_glide": [], "full_peak": []}
    for line in out[1:]:
        if line.strip():
            kind, s, v = line.split()
            recs[kind].append([int(s), int(v)])
    secs, cpu = (float(x) for x in out[0].split())
    return {"seconds": secs, "cpu_seconds": cpu, "rate": (hi - lo + 1) / secs, "records": recs}


def cpu_timed(cmd: list[str]) -> dict:
    """Run ``cmd``: wall-clock seconds and CPU seconds (user + system) of it and its children."""
    r0 = resource.getrusage(resource.RUSAGE_CHILDREN)
    t0 = time.perf_counter()
    p = subprocess.run(cmd, capture_output=True, text=True)
    dt = time.perf_counter() - t0
    r1 = resource.getrusage(resource.RUSAGE_CHILDREN)
    if p.returncode != 0:
        raise SystemExit(f"command failed: {' '.join(cmd)}\n{p.stderr}")
    cpu = (r1.ru_utime - r0.ru_utime) + (r1.ru_stime - r0.ru_stime)
    return {"seconds": dt, "cpu_seconds": cpu, "out": p.stdout}


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--to", default="10^9", help="range end N (default 10^9)")
    args = ap.parse_args()
    n = parse_n(args.to)
    cli = [sys.executable, "-m", "cyclewright"]
    env_note = f"{platform.machine()}, {os.cpu_count()} cores, Python {platform.python_version()}"
    print(f"machine: {env_note}")
    # warm-up: compile or load the kernels
    measured([*cli, "records", "3x+1", "--to", "1000", "--json", "--no-store"])
    ours = measured([*cli, "records", "3x+1", "--to", str(n), "--json", "--no-store"])
    ours1 = cpu_timed(
        [*cli, "records", "3x+1", "--to", str(n), "--json", "--workers", "1", "--no-store"]
    )
    small = measured(
        [*cli, "records", "3x+1", "--to", str(max(n // 10, 1)), "--json", "--no-store"]
    )
    doc = json.loads(ours["out"])
    got = {
        k: [[r["start"], r["value"]] for r in doc["sides"]["positive"]["records"][k]]
        for k in ("full_delay", "full_glide", "full_peak")
    }
    exe = build_c("plain_records")
    c = plain_c(exe, 1, n)
    if got != c["records"]:
        raise SystemExit("the record holders of cyclewright and of the C loop differ")
    res = {
        "machine": env_note,
        "to": n,
        "cyclewright_seconds": ours["seconds"],
        "cyclewright_one_worker_seconds": ours1["seconds"],
        "cyclewright_one_worker_cpu_seconds": ours1["cpu_seconds"],
        "cyclewright_peak_rss_kib": ours["maxrss_kib"],
        "cyclewright_peak_rss_kib_at_n_over_10": small["maxrss_kib"],
        "plain_c_seconds": c["seconds"],
        "plain_c_cpu_seconds": c["cpu_seconds"],
        "ratio_c_over_cyclewright": c["seconds"] / ours["seconds"],
        "ratio_c_over_cyclewright_one_worker": c["seconds"] / ours1["seconds"],
        "ratio_c_over_cyclewright_cpu_per_core": c["cpu_seconds"] / ours1["cpu_seconds"],
        "records_agree": True,
    }
    BUILD.mkdir(exist_ok=True)
    (BUILD / "bench_records.json").write_text(json.dumps(res, indent=2) + "\n")
    print(f"3x+1 records on [1, {n}] (the same record holders from both):")
    print(
        f"  cyclewright (all cores)   {ours['seconds']:9.2f} s wall, peak {ours['maxrss_kib'] / 1024:.0f} MiB"
    )
    print(
        f"  cyclewright (1 worker)    {ours1['seconds']:9.2f} s wall, {ours1['cpu_seconds']:.2f} s CPU"
    )
    print(f"  plain C loop (1 core)     {c['seconds']:9.2f} s wall, {c['cpu_seconds']:.2f} s CPU")
    print(
        f"  C / cyclewright           {res['ratio_c_over_cyclewright']:9.2f}x (all cores), "
        f"{res['ratio_c_over_cyclewright_one_worker']:.2f}x (1 worker), "
        f"{res['ratio_c_over_cyclewright_cpu_per_core']:.2f}x (CPU time, per core)"
    )
    print(f"  peak memory at N/10       {small['maxrss_kib'] / 1024:.0f} MiB")


if __name__ == "__main__":
    main()
