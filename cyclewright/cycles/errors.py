"""Errors of the cycles API that mean "the input was wrong" (the CLI exits 2 on them)."""

from __future__ import annotations

__all__ = ["InputError", "Name", "StoreError"]


class Name(str):
    """A parameter's name inside a refusal built by :meth:`InputError.of` (renamed by callers)."""


class InputError(ValueError):
    """Bad input to an analysis (empty range, impossible parameter...): one clear sentence.

    A refusal of one parameter's value (built by
    :func:`~cyclewright.cycles.limits.check_range` and its kin) records the
    parameter's name (``param``) and where the sentence names it (``at``);
    ``names`` lists every parameter the sentence names, with its position.
    A caller that knows the parameters under other names (the command line's
    ``--max-steps`` for ``max_steps``) says the same sentence with its own
    names: :meth:`named`, :meth:`renamed`.

    >>> e = InputError("max_steps must be at least 1, got 0", param="max_steps")
    >>> e.named("--max-steps")
    '--max-steps must be at least 1, got 0'
    >>> InputError("the range is empty").named("--to")
    'the range is empty'
    >>> e = InputError.of("too slow: raise ", Name("max_minutes"), " or use more ", Name("workers"))
    >>> e.renamed({"max_minutes": "--max-minutes", "workers": "--workers"})
    'too slow: raise --max-minutes or use more --workers'
    """

    def __init__(
        self,
        message: object = "",
        *,
        param: str | None = None,
        at: int = 0,
        names: tuple[tuple[str, int], ...] = (),
    ) -> None:
        super().__init__(message)
        self.param = param
        self.at = at
        self.names = tuple(names) or (((param, at),) if param else ())

    @classmethod
    def of(cls, *parts: str) -> InputError:
        """The refusal whose text is ``parts`` joined; each :class:`Name` part is a parameter."""
        text, names = "", []
        for part in parts:
            if isinstance(part, Name):
                names.append((str(part), len(text)))
            text += str(part)
        param, at = names[0] if names else (None, 0)
        return cls(text, param=param, at=at, names=tuple(names))

    def renamed(self, names: dict[str, str]) -> str:
        """The message with each parameter it names called as ``names`` says (others unchanged)."""
        text = str(self.args[0]) if self.args else ""
        for param, at in sorted(self.names, key=lambda n: -n[1]):
            new = names.get(param)
            if new is not None and text[at : at + len(param)] == param:
                text = text[:at] + new + text[at + len(param) :]
        return text

    def named(self, name: str) -> str:
        """The message with its (first) parameter called ``name``."""
        if not self.param:
            return self.renamed({})
        return self.renamed({self.param: name})


class StoreError(InputError):
    """A results store that cannot be used as asked (wrong map, wrong version, corrupt, unwritable).

    The store is never modified when this is raised.
    """
