"""Entry-point discovery: a real plugin distribution, built and installed by pip in a temp dir."""

from __future__ import annotations

import json
import subprocess
import sys
import zipfile

import pytest
from conftest import run_cli

PLUGIN_CODE = """
from cyclewright.maps import Map

def provide():
    return [Map(2, [(1, 0), (9, 7)], name="ninefold", description="a test plugin map"),
            Map(4, [(1, 0), (5, 3), (3, -2), (7, 3)], name="quad-mix")]
"""


def _build_wheel(tmp_path):
    """A minimal wheel of the distribution ``tinycat`` registering ``cyclewright.maps``."""
    whl = tmp_path / "tinycat-0.1-py3-none-any.whl"
    info = "tinycat-0.1.dist-info"
    files = {
        "tinycat/__init__.py": PLUGIN_CODE,
        f"{info}/METADATA": "Metadata-Version: 2.1\nName: tinycat\nVersion: 0.1\n",
        f"{info}/WHEEL": "Wheel-Version: 1.0\nGenerator: test\nRoot-Is-Purelib: true\nTag: py3-none-any\n",
        f"{info}/entry_points.txt": "[cyclewright.maps]\ntiny = tinycat:provide\n",
    }
    record = "".join(f"{name},,\n" for name in files) + f"{info}/RECORD,,\n"
    files[f"{info}/RECORD"] = record
    with zipfile.ZipFile(whl, "w") as z:
        for name, text in files.items():
            z.writestr(name, text)
    return whl


@pytest.mark.slow
def test_plugin_distribution_is_discovered(tmp_path):
    whl = _build_wheel(tmp_path)
    site = tmp_path / "site"
    subprocess.run(
        [
            sys.executable,
            "-m",
            "pip",
            "install",
            "--quiet",
            "--no-deps",
            "--no-index",
            "--target",
            str(site),
            str(whl),
        ],
        check=True,
        capture_output=True,
    )
    assert (site / "tinycat-0.1.dist-info" / "entry_points.txt").is_file()
    env = {"PYTHONPATH": str(site)}
    out = run_cli("maps", "--json", env=env)
    assert out.returncode == 0, out.stderr
    rows = {r["name"]: r for r in json.loads(out.stdout)["maps"]}
    assert rows["ninefold"]["source"] == "plugin:tinycat"
    assert rows["quad-mix"]["divisor"] == 4
    assert rows["3x+1"]["source"] == "builtin"  # the built-in catalog came through the same group
    solved = run_cli("solve", "ninefold", "10", "--json", env=env)
    assert solved.returncode == 0, solved.stderr


def test_builtin_catalog_registered_through_entry_point():
    from importlib import metadata

    eps = [
        ep
        for ep in metadata.entry_points(group="cyclewright.maps")
        if ep.dist and ep.dist.name == "cyclewright"
    ]
    assert [ep.value for ep in eps] == ["cyclewright.maps.catalog:builtin_maps"]


def test_broken_plugin_is_reported_not_fatal(tmp_path):
    site = tmp_path / "site"
    info = site / "brokencat-0.1.dist-info"
    info.mkdir(parents=True)
    (info / "METADATA").write_text("Metadata-Version: 2.1\nName: brokencat\nVersion: 0.1\n")
    (info / "entry_points.txt").write_text("[cyclewright.maps]\nbad = brokencat_missing:provide\n")
    out = run_cli("maps", "--json", env={"PYTHONPATH": str(site)})
    assert out.returncode == 0
    doc = json.loads(out.stdout)
    assert any("brokencat" in p for p in doc["problems"])
    assert any(r["name"] == "3x+1" for r in doc["maps"])
