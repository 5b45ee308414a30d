"""The step cap and the value ceiling: one name and one default each.

Inside
------
- :data:`DEFAULT_MAX_STEPS` -- ``max_steps``, the step cap of every walk:
  :func:`~cyclewright.cycles.scan.run.scan`,
  :func:`~cyclewright.cycles.orbit.orbit`,
  :func:`~cyclewright.cycles.graph.functional_graph`,
  :func:`~cyclewright.cycles.excursions.excursions` and
  :func:`~cyclewright.cycles.compare.compare` (and the CLI's ``--max-steps``).
- :data:`DEFAULT_CEILING` -- ``ceiling``, the bound on ``|value|`` past which
  a walk of the functional graph stops (``escaped``; the CLI's ``--ceiling``).
- :func:`wait_seconds` -- a bound on a wait read from the environment
  (``CYCLEWRIGHT_STORE_WAIT``, ``CYCLEWRIGHT_WORKER_WAIT``), one parser for all.

A capped walk is never a proof of anything: the analyses report capped
starts as ``unresolved`` (or ``capped``), never as divergent.
"""

from __future__ import annotations

import os

__all__ = ["DEFAULT_MAX_STEPS", "DEFAULT_CEILING", "wait_seconds"]

DEFAULT_MAX_STEPS = 1_000
"""Steps one walk may take before it stops undecided (every analysis, one default).

One default serves every walk: the scan, the excursions and the comparison
follow a start only until it first drops below itself (its stopping time),
and the orbit and the functional graph of the small starts they are meant
for close their cycle long before; a walk that needs more is reported as
capped or unresolved, and every function takes ``max_steps`` to raise it.
A larger default would cost where it buys nothing: the scan's exact
multi-limb continuation sizes its buffers by the cap, every start of a
divergent-looking map (5x+1) runs up to the cap, and scan stores key their
chunks on ``max_steps``, so changing the default orphans stored scans.
"""

DEFAULT_CEILING = 10**15
"""Walks of the functional graph stop once ``|value|`` passes this (``escaped``).

It bounds the graph's size and memory: every node is a Python int kept in a
networkx graph. A single orbit (:func:`~cyclewright.cycles.orbit.orbit`) has
no ceiling by default, since it keeps only the values of one walk.
"""


def wait_seconds(
    variable: str,
    default: float,
    error: type[Exception] = ValueError,
    given: float | None = None,
) -> float:
    """``given`` if not None, else seconds from the environment variable ``variable``
    (at least 0), else ``default``.

    Raises ``error`` with one line when the variable is set but is not a number.

    >>> wait_seconds("CYCLEWRIGHT_NO_SUCH_WAIT", 5.0)
    5.0
    >>> wait_seconds("CYCLEWRIGHT_NO_SUCH_WAIT", 5.0, given=2)
    2.0
    """
    if given is not None:
        return float(given)
    text = os.environ.get(variable)
    if not text:
        return default
    try:
        return max(0.0, float(text))
    except ValueError:
        raise error(f"{variable} must be a number of seconds, got {text!r}") from None
