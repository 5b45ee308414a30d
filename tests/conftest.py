"""Shared fixtures of the test suite.

- ``_isolated_dirs`` (every test): config, data and cache directories of its own.
- ``_warm_kernels`` (once a session): compile the numba scan kernels, or load
  them from numba's cache, before the first test, so no test pays for it and
  subprocess tests find the cache filled.
- ``cli_run`` / :func:`run_cli`: the ``cyclewright`` command in a subprocess.

Hypothesis strategies live in ``tests/strategies.py``.
"""

from __future__ import annotations

import os
import subprocess
import sys

import pytest


@pytest.fixture(scope="session", autouse=True)
def _warm_kernels(tmp_path_factory):
    """Run tiny scans once: the two-branch lanes, the negative side and a divisor-3 map."""
    base = tmp_path_factory.mktemp("warm")
    saved = {k: os.environ.get(k) for k in _DIR_VARS}
    for k, sub in _DIR_VARS.items():
        os.environ[k] = str(base / sub)
    try:
        from cyclewright.cycles.scan.run import scan

        scan("3x+1", 3000, side="both", store=False, workers=1)
        scan("mod3-4x", 500, store=False, workers=1)
    finally:
        for k, v in saved.items():
            if v is None:
                os.environ.pop(k, None)
            else:
                os.environ[k] = v


_DIR_VARS = {
    "CYCLEWRIGHT_CONFIG_DIR": "config",
    "CYCLEWRIGHT_DATA_DIR": "data",
    "CYCLEWRIGHT_CACHE_DIR": "cache",
}


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
