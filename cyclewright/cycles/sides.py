"""The side of the integers an analysis looks at: one type, one check, one default.

Inside
------
- :data:`Side` -- ``Literal["positive", "negative", "both"]``.
- :data:`SIDES` -- the two actual sides, ``("positive", "negative")``, in
  the order every result lists them.
- :data:`DEFAULT_SIDE` -- ``"positive"``, the default of every API function
  that takes a side (the positive integers are what most questions are
  about; ``"both"`` doubles the work).
- :func:`parse_side` -- check a side argument (one error message everywhere).
- :func:`sides_of` -- the actual sides a side argument stands for.
- :class:`PerSide`, :func:`on_sides` -- the result of a one-side analysis
  asked for ``"both"``: one result per side (and, where an analysis does not
  apply on one side, the reason).

A cycle's side is the sign of its minimum (its element of least absolute
value); the negative side of a map ``T`` is the positive side of its
conjugate ``x -> -T(-x)``.
"""

from __future__ import annotations

from collections.abc import Callable, Iterator
from dataclasses import dataclass, field
from typing import Generic, Literal, TypeVar

from .errors import InputError

__all__ = ["Side", "SIDES", "DEFAULT_SIDE", "parse_side", "sides_of", "PerSide", "on_sides"]

T = TypeVar("T")

Side = Literal["positive", "negative", "both"]

SIDES: tuple[str, str] = ("positive", "negative")

DEFAULT_SIDE: Side = "positive"


def parse_side(side: object, *, allow_both: bool = True) -> str:
    """Return ``side`` when it names a side, else raise :class:`InputError`.

    Parameters
    ----------
    side : object
        The argument to check.
    allow_both : bool
        Whether ``"both"`` is accepted (False where the mathematics of the
        analysis is one side at a time and its caller loops over sides).

    Returns
    -------
    str
        ``side`` itself.

    Examples
    --------
    >>> parse_side("negative")
    'negative'
    >>> parse_side("up")
    Traceback (most recent call last):
    ...
    cyclewright.cycles.errors.InputError: side must be 'positive', 'negative' or 'both', got 'up'
    """
    allowed = (*SIDES, "both") if allow_both else SIDES
    if side not in allowed:
        names = ", ".join(repr(s) for s in allowed[:-1]) + f" or {allowed[-1]!r}"
        raise InputError(f"side must be {names}, got {side!r}")
    return side  # type: ignore[return-value]


def sides_of(side: object) -> tuple[str, ...]:
    """The actual sides ``side`` stands for (checked).

    Examples
    --------
    >>> sides_of("both")
    ('positive', 'negative')
    >>> sides_of("negative")
    ('negative',)
    """
    side = parse_side(side)
    return SIDES if side == "both" else (side,)


@dataclass(frozen=True)
class PerSide(Generic[T]):
    """One result per side, for an analysis asked for ``side="both"``.

    Attributes
    ----------
    results : dict
        Side -> result, in the order of :data:`SIDES`, for the sides where the
        analysis applies.
    problems : dict
        Side -> why the analysis does not apply there.

    ``per["positive"]`` is that side's result; iterating gives the results.
    """

    results: dict[str, T]
    problems: dict[str, str] = field(default_factory=dict)

    def __getitem__(self, side: str) -> T:
        return self.results[side]

    def __iter__(self) -> Iterator[T]:
        return iter(self.results.values())

    def __len__(self) -> int:
        return len(self.results)

    def _repr_html_(self) -> str:
        """Each side's result as HTML (Jupyter shows it), under the side's name; then the problems."""
        from html import escape

        out = []
        for side, r in self.results.items():
            body = r._repr_html_() if hasattr(r, "_repr_html_") else f"<pre>{escape(repr(r))}</pre>"
            out.append(f"<h4>{escape(side)} side</h4>{body}")
        out += [f"<p>{escape(s)} side: {escape(why)}</p>" for s, why in self.problems.items()]
        return "".join(out)

    def to_dict(self) -> dict:
        """Plain data: each result's ``to_dict()`` by side, and the problems."""
        return {
            "sides": {s: r.to_dict() for s, r in self.results.items()},  # type: ignore[attr-defined]
            "problems": dict(self.problems),
        }


def on_sides(side: object, run: Callable[[str], T], *, tolerate: bool = False) -> T | PerSide[T]:
    """``run(side)`` for one side; a :class:`PerSide` of both for ``"both"``.

    With ``tolerate``, an :class:`InputError` on one side becomes that side's
    entry in :attr:`PerSide.problems`; the error is raised only when no side
    applies.

    Examples
    --------
    >>> on_sides("negative", lambda s: s.upper())
    'NEGATIVE'
    >>> on_sides("both", lambda s: s[:3]).results
    {'positive': 'pos', 'negative': 'neg'}
    """
    side = parse_side(side)
    if side != "both":
        return run(side)
    results: dict[str, T] = {}
    problems: dict[str, str] = {}
    first: InputError | None = None
    for s in SIDES:
        try:
            results[s] = run(s)
        except InputError as exc:
            if not tolerate:
                raise
            problems[s] = str(exc)
            first = first or exc
    if not results and first is not None:
        raise first
    return PerSide(results, problems)
