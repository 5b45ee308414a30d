"""Shared fixtures: an isolated config/data directory for every test."""

from __future__ import annotations

import os
import subprocess
import sys

import pytest


@pytest.fixture(autouse=True)
def _isolated_dirs(tmp_path, monkeypatch):
    # No test may read the developer's own maps or write into their data dir.
    monkeypatch.setenv("CYCLEWRIGHT_CONFIG_DIR", str(tmp_path / "config"))
    monkeypatch.setenv("CYCLEWRIGHT_DATA_DIR", str(tmp_path / "data"))
    monkeypatch.setenv("CYCLEWRIGHT_CACHE_DIR", str(tmp_path / "cache"))
    monkeypatch.setenv("MPLBACKEND", "Agg")
    import cyclewright.maps.registry

    monkeypatch.setattr(cyclewright.maps.registry, "_default", None)
    try:
        import cyclewright.cli.options

        cyclewright.cli.options._catalog.cache_clear()
    except ImportError:  # pragma: no cover
        pass


def run_cli(*args: str, env: dict | None = None, cwd=None) -> subprocess.CompletedProcess:
    """Run ``python -m cli ARGS`` in a subprocess (exit codes and stderr as a user sees them)."""
    full_env = dict(os.environ)
    if env:
        full_env.update(env)
    return subprocess.run(
        [sys.executable, "-m", "cyclewright", *args],
        capture_output=True,
        text=True,
        env=full_env,
        cwd=cwd,
        timeout=600,
    )


@pytest.fixture
def cli_run():
    return run_cli
