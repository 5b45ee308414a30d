"""The distribution installs exactly one top-level import package, ``cyclewright``.

Builds the wheel from a copy of the sources (``pip wheel --no-deps``) and
reads its ``top_level.txt`` and ``RECORD``. (common practice, no source:
the wheel format's metadata files, PEP 427 / PEP 376.)
"""

from __future__ import annotations

import shutil
import subprocess
import sys
import zipfile
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]


@pytest.mark.slow
def test_wheel_has_one_top_level_package(tmp_path):
    src = tmp_path / "src"
    src.mkdir()
    for name in ("pyproject.toml", "README.md"):
        shutil.copy(ROOT / name, src / name)
    shutil.copytree(
        ROOT / "cyclewright", src / "cyclewright", ignore=shutil.ignore_patterns("__pycache__")
    )
    out = tmp_path / "wheels"
    proc = subprocess.run(
        [sys.executable, "-m", "pip", "wheel", "--no-deps", "-q", "-w", str(out), str(src)],
        capture_output=True,
        text=True,
        timeout=900,
    )
    assert proc.returncode == 0, proc.stderr
    (wheel,) = out.glob("cyclewright-*.whl")
    with zipfile.ZipFile(wheel) as zf:
        names = zf.namelist()
        (top_level,) = [n for n in names if n.endswith(".dist-info/top_level.txt")]
        assert zf.read(top_level).decode().split() == ["cyclewright"]
        (record,) = [n for n in names if n.endswith(".dist-info/RECORD")]
        paths = [line.split(",")[0] for line in zf.read(record).decode().splitlines() if line]
    tops = {p.split("/")[0] for p in paths if not p.split("/")[0].endswith(".dist-info")}
    assert tops == {"cyclewright"}
    # the package data and every subpackage are inside it
    assert "cyclewright/scenarios/demo.toml" in paths
    for sub in ("maps", "cycles", "cycles/scan", "cli", "cli/commands"):
        assert f"cyclewright/{sub}/__init__.py" in paths
