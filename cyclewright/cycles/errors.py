"""Errors of the cycles API that mean "the input was wrong" (the CLI exits 2 on them)."""

from __future__ import annotations

__all__ = ["InputError", "StoreError"]


class InputError(ValueError):
    """Bad input to an analysis (empty range, impossible parameter...): one clear sentence."""


class StoreError(InputError):
    """A results store that cannot be used as asked (wrong map, wrong version, corrupt, unwritable).

    The store is never modified when this is raised.
    """
