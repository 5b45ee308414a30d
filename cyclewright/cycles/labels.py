"""What kind of figure a number is: every figure carries one of five labels.

- ``exact``: computed exactly (integers, rationals, closed formulas such as
  ``(1/2) ln(3/4)``), or an exact statement such as ``> 2^62`` for a value
  known to pass ``2^62``.
- ``certified``: the outcome of an exhaustive search, with its method and range,
  or an enclosure computed in interval arithmetic (``Λ``; the least
  ``|k ln p - x ln q|`` over ``x <= X`` from the certified continued fraction).
- ``proved``: a theorem's bound, evaluated rigorously. When the bound rests
  on a published constant quoted from memory, the figure's text says which
  theorem and that the constant is from memory.
- ``heuristic``: a model's expectation; never a proof.
- ``rounded``: a floating-point value of an exact quantity whose exact form is
  given beside it (e.g. ``drift`` next to ``drift_exact``); it is that
  quantity rounded to double precision, never itself exact.

A capped value is never labelled ``exact`` as a number: it is shown as a
lower bound (``"> 2^62"``). Results expose their labels through a ``labels``
mapping from field name to label; JSON output carries it alongside the values.
:data:`LABELS` lists every label name a ``labels`` mapping may use;
:func:`labels_field` declares a result's ``labels`` as a dataclass field.
"""

from __future__ import annotations

from dataclasses import field
from enum import Enum

__all__ = [
    "Label",
    "EXACT",
    "CERTIFIED",
    "PROVED",
    "HEURISTIC",
    "ROUNDED",
    "LABELS",
    "HEURISTIC_CAUTION",
    "labels_field",
]


class Label(str, Enum):
    """The five kinds of figure."""

    EXACT = "exact"
    CERTIFIED = "certified"
    PROVED = "proved"
    HEURISTIC = "heuristic"
    ROUNDED = "rounded"

    def __str__(self) -> str:
        return self.value


EXACT = Label.EXACT
CERTIFIED = Label.CERTIFIED
PROVED = Label.PROVED
HEURISTIC = Label.HEURISTIC
ROUNDED = Label.ROUNDED

#: Every label name (the values of every ``labels`` mapping).
LABELS = frozenset(x.value for x in Label)

HEURISTIC_CAUTION = (
    "Figures labelled 'heuristic' are expectations of a probabilistic model, not proofs; "
    "unresolved starts are open cases, not evidence either way."
)


def labels_field(*, repr: bool = True, **labels: Label):
    """A dataclass field ``labels``: field name -> label name, each instance its own dict.

    Left out of comparisons (two results are equal by their figures).

    >>> from dataclasses import dataclass
    >>> @dataclass
    ... class R:
    ...     n: int
    ...     labels: dict = labels_field(n=EXACT)
    >>> R(3).labels, R(3) == R(3)
    ({'n': 'exact'}, True)
    """
    names = {k: Label(v).value for k, v in labels.items()}
    return field(default_factory=lambda: dict(names), compare=False, repr=repr)
