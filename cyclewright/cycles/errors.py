"""Errors of the cycles API that mean "the input was wrong" (the CLI exits 2 on them)."""

from __future__ import annotations

__all__ = ["InputError", "StoreError"]


class InputError(ValueError):
    """Bad input to an analysis (empty range, impossible parameter...): one clear sentence.

    A refusal of one parameter's value (built by
    :func:`~cyclewright.cycles.limits.check_range` and its kin) records the
    parameter's name (``param``) and where the sentence names it (``at``), so
    a caller that knows the parameter under another name (the command line's
    ``--max-steps`` for ``max_steps``) says the same sentence with its own
    name: :meth:`named`.

    >>> e = InputError("max_steps must be at least 1, got 0", param="max_steps")
    >>> e.named("--max-steps")
    '--max-steps must be at least 1, got 0'
    >>> InputError("the range is empty").named("--to")
    'the range is empty'
    """

    def __init__(self, message: object = "", *, param: str | None = None, at: int = 0) -> None:
        super().__init__(message)
        self.param = param
        self.at = at

    def named(self, name: str) -> str:
        """The message with the parameter called ``name`` (unchanged when it names none)."""
        text = str(self.args[0]) if self.args else ""
        param, at = self.param, self.at
        if not param or text[at : at + len(param)] != param:
            return text
        return text[:at] + name + text[at + len(param) :]


class StoreError(InputError):
    """A results store that cannot be used as asked (wrong map, wrong version, corrupt, unwritable).

    The store is never modified when this is raised.
    """
