"""Run every benchmark of this folder in turn (``make bench``); each prints its own figures."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent

if __name__ == "__main__":
    extra = sys.argv[1:]
    failed = []
    for script in sorted(HERE.glob("bench_*.py")):
        print(f"== {script.name}", flush=True)
        rc = subprocess.call([sys.executable, str(script), *extra], cwd=HERE.parent)
        if rc:
            failed.append(script.name)
    if failed:
        print("failed: " + ", ".join(failed))
        sys.exit(1)
