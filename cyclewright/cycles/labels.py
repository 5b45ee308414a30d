"""What kind of figure a number is: every figure carries one of four labels.

- ``exact``: computed exactly (integers, rationals, closed formulas).
- ``certified``: the outcome of an exhaustive search, with its method and range.
- ``proved``: a theorem's bound, evaluated rigorously.
- ``heuristic``: a model's expectation; never a proof.

Results expose their labels through a ``labels`` mapping from field name to
label; JSON output carries it alongside the values.
"""

from __future__ import annotations

from enum import Enum

__all__ = ["Label", "EXACT", "CERTIFIED", "PROVED", "HEURISTIC", "HEURISTIC_CAUTION"]


class Label(str, Enum):
    """The four kinds of figure."""

    EXACT = "exact"
    CERTIFIED = "certified"
    PROVED = "proved"
    HEURISTIC = "heuristic"

    def __str__(self) -> str:
        return self.value


EXACT = Label.EXACT
CERTIFIED = Label.CERTIFIED
PROVED = Label.PROVED
HEURISTIC = Label.HEURISTIC

HEURISTIC_CAUTION = (
    "Figures labelled 'heuristic' are expectations of a probabilistic model, not proofs; "
    "unresolved starts are open cases, not evidence either way."
)
