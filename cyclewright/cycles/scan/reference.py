"""The scan's classification written plainly: exact Python integers, one start at a time.

Inside
------
- :func:`classify` -- the outcome of one start (``"drop"``, ``"cycle"``,
  ``"other_cycle"``, ``"open"``) with its step count.
- :func:`classify_range` -- every start of a range, as a list.
- :func:`cycle_minima` -- the starts of a range that are cycle minima.

This module is the definition the fast kernels are tested against (start by
start, see ``tests/test_scan_exact.py``) and the plain loop the benchmarks
compare with. It keeps every value of the orbit in a dictionary, so a repeat
is seen at the exact step ``mu + lam`` where it happens; nothing is skipped.

Definitions (``v_0 = s``, ``v_i = T^i(s)``, cap ``C``; for the negative side
the orbit of ``-s`` under ``T`` is read as the orbit of ``s`` under the
conjugate map ``n -> -T(-n)``):

- ``drop``: the first event is a ``v_i`` (``i <= C``) before ``s`` in the
  order of cycle representatives: ``|v_i| < |s|``, or ``v_i = -s`` when
  ``s > 0`` (the cycle through ``s`` and ``-s`` is represented by ``-s``).
- ``cycle``: the first event is ``v_L = s``: ``s`` is a cycle minimum, the
  cycle has length ``L``.
- ``other_cycle``: the first event is a repeat ``v_i = v_j`` (``j < i <= C``)
  other than ``s``: the orbit enters a cycle that does not contain ``s``.
- ``open``: no event within ``C`` steps.

References
----------
.. [1] J. C. Lagarias, "The 3x+1 problem and its generalizations",
   American Mathematical Monthly 92 (1985) 3-23.
"""

from __future__ import annotations

from cyclewright.maps import Map, as_map

from ..sides import DEFAULT_SIDE, Side, parse_side

__all__ = ["classify", "classify_range", "cycle_minima", "OUTCOMES"]

OUTCOMES = ("drop", "cycle", "other_cycle", "open")


def classify(m: Map | str, s: int, max_steps: int) -> tuple[str, int]:
    """Outcome of the start ``s != 0`` under ``m`` with step cap ``max_steps``.

    Returns ``(outcome, steps)``: the step of the first event (the cycle's
    length for ``"cycle"``, ``mu + lam`` for ``"other_cycle"``), or
    ``("open", max_steps)``.

    Examples
    --------
    >>> from cyclewright import maps
    >>> m = maps.get("3x+1")
    >>> classify(m, 1, 100), classify(m, 27, 100), classify(m, -17, 100)
    (('cycle', 2), ('drop', 59), ('cycle', 11))
    >>> classify(maps.get("5x+1"), 7, 100)
    ('open', 100)
    >>> classify(maps.get("3x+5"), 2, 100)   # 2 -> 1 -> 4 -> 2: ...
    ('drop', 1)
    """
    m = as_map(m)
    if s == 0:
        raise ValueError("the start must not be 0")
    a = abs(s)
    seen = {s: 0}
    v = s
    step = m.step
    for i in range(1, max_steps + 1):
        v = step(v)
        av = abs(v)
        if av < a or (s > 0 and v == -s):
            return "drop", i
        if v == s:
            return "cycle", i
        if v in seen:
            return "other_cycle", i
        seen[v] = i
    return "open", max_steps


def classify_range(
    m: Map | str, lo: int, hi: int, max_steps: int, side: Side = DEFAULT_SIDE
) -> list:
    """``[(start, outcome, steps), ...]`` for ``|start|`` in ``[lo, hi]`` on one side.

    >>> from cyclewright import maps
    >>> [o for _, o, _ in classify_range(maps.get("3x+1"), 1, 4, 50)]
    ['cycle', 'drop', 'drop', 'drop']
    """
    m = as_map(m)
    sign = 1 if parse_side(side, allow_both=False) == "positive" else -1
    return [(sign * s, *classify(m, sign * s, max_steps)) for s in range(lo, hi + 1)]


def cycle_minima(
    m: Map | str, lo: int, hi: int, max_steps: int, side: Side = DEFAULT_SIDE
) -> list[int]:
    """The starts of ``[lo, hi]`` (signed by ``side``) that are cycle minima found within ``max_steps``.

    >>> from cyclewright import maps
    >>> cycle_minima(maps.get("3x+1"), 1, 100, 200, "negative")
    [-1, -5, -17]
    """
    m = as_map(m)
    return [s for s, o, _ in classify_range(m, lo, hi, max_steps, side) if o == "cycle"]
