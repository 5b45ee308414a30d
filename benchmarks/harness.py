"""The timing harness shared by the benchmarks of this folder.

Inside
------
- :data:`HERE`, :data:`BUILD`, :data:`ROOT` -- this folder, its build folder
  (``benchmarks/_build/``, compiled plain loops and JSON results) and the
  repository root.
- :func:`measured` -- run a command in a fresh wrapper process: wall-clock
  time and the largest child's peak resident memory.
- :func:`build_c` -- compile one of the plain C loops with ``gcc -O2``.
- :func:`parse_n` -- a size as the command line writes it (``10^9``,
  ``5*2^20``, ``1_000_000``), with the project's own parser.

The scripts import it as ``harness`` (they run as ``python benchmarks/bench_x.py``,
so this folder is on ``sys.path``); ``run_all.py`` runs only ``bench_*.py``.
"""

from __future__ import annotations

import json
import shutil
import subprocess
import sys
from pathlib import Path

__all__ = ["HERE", "BUILD", "ROOT", "measured", "build_c", "parse_n"]

HERE = Path(__file__).resolve().parent
BUILD = HERE / "_build"
ROOT = HERE.parent

_WRAPPER = r"""
import json, resource, subprocess, sys, time
t0 = time.perf_counter()
p = subprocess.run(sys.argv[1:], capture_output=True, text=True)
dt = time.perf_counter() - t0
rss = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss
print(json.dumps({"seconds": dt, "maxrss_kib": rss, "rc": p.returncode, "out": p.stdout, "err": p.stderr}))
"""


def measured(cmd: list[str]) -> dict:
    """Run ``cmd`` in a fresh wrapper process: wall time and the largest child's peak RSS."""
    p = subprocess.run([sys.executable, "-c", _WRAPPER, *cmd], capture_output=True, text=True)
    res = json.loads(p.stdout)
    if res["rc"] != 0:
        raise SystemExit(f"command failed: {' '.join(cmd)}\n{res['err']}")
    return res


def build_c(name: str) -> Path:
    """Compile ``benchmarks/<name>.c`` with ``gcc -O2`` into ``benchmarks/_build/<name>``."""
    BUILD.mkdir(exist_ok=True)
    exe = BUILD / name
    cc = shutil.which("gcc")
    if cc is None:
        raise SystemExit("gcc is needed for the plain C loop")
    subprocess.run([cc, "-O2", "-o", str(exe), str(HERE / f"{name}.c")], check=True)
    return exe


def parse_n(text: str) -> int:
    """A size written as on the command line (``10^9``, ``5*2^20``, ``1_000_000``, ``1e9``)."""
    from cyclewright.cli.numbers import int_expression

    try:
        return int_expression(text.replace(",", ""))
    except ValueError as exc:
        raise SystemExit(f"{text!r}: {exc}") from None
