"""Real integer cycles: an exact, resumable scan of a range of starts by cycle minimum.

Inside
------
- :func:`scan` -- classify every start of ``[start, to]`` (positive starts,
  negative starts ``-to .. -start``, or both) and report the cycles whose
  minimum lies in the range, with counts per classification and the
  unresolved starts.
- :class:`ScanResult` -- the result (notebook-friendly repr, ``to_dict()``,
  ``minima`` per side for comparisons).
- :class:`IntegerCycle` -- one integer cycle: minimum, length, odd steps or
  content, itinerary, elements, primitivity (of the word; Lagarias').
- :func:`run_chunk` -- the unit of work (one chunk of one side), as run by
  the executors; :class:`ChunkTask` and :class:`ChunkOutcome` are its input
  and output.
- :func:`plan_chunks`, :func:`default_chunk_size` (the default step cap is
  :data:`cyclewright.cycles.limits.DEFAULT_MAX_STEPS`).

Classification (see :mod:`cyclewright.cycles.scan.kernel` for the exact definitions)
--------------------------------------------------------------------
Each start ``s`` is, within the step cap ``S`` (``max_steps``):

- ``drops``: its orbit reaches a value smaller in absolute value (on the
  positive side also ``-s``): ``s`` is not the minimum of a cycle;
- ``cycles``: it returns to ``s`` first: ``s`` is the minimum of a cycle
  (verified again in exact arithmetic and by :func:`cyclewright.cycles.solver.solve` on
  its itinerary before it is reported);
- ``other_cycle``: it enters a cycle that does not contain ``s``;
- ``unresolved``: none of these within ``S`` steps. Unresolved starts are
  followed in exact arithmetic up to ``S`` steps (past the int64 ceiling);
  all are stored, the first ones listed.

With ``max_cycle_length=K`` the cap is ``K`` and the fourth class is
``beyond_length``: a start that neither drops below itself nor returns to
itself within ``K`` steps cannot be the minimum of a cycle of length ``<= K``
(certified, not unresolved). This is what a census of all cycles up to length
``K`` needs.

The negative side is the positive side of the conjugate map
``n -> -T(-n)``, so one kernel serves both; negative cycles are reported with
their (negative) elements, and ``minimum`` is the element of least absolute
value, as everywhere in cyclewright.

Work is split into chunks on a fixed grid (so re-runs and longer ranges reuse
finished chunks), run by a local process pool or a Dask cluster
(:mod:`cyclewright.cycles.scan.executors`), and every finished chunk is written atomically to
the SQLite store (:mod:`cyclewright.cycles.scan.store`). Killing the process at any moment and
running the same scan again gives exactly the results of an uninterrupted run.

References
----------
.. [1] J. C. Lagarias, "The 3x+1 problem and its generalizations",
   American Mathematical Monthly 92 (1985) 3-23 (cycles of 3x+k, the
   negative cycles of 3x+1).
.. [2] J. C. Lagarias, "The set of rational cycles for the 3x+1 problem",
   Acta Arithmetica 56 (1990) 33-53 (primitive cycles).
.. [3] R. Terras, Acta Arithmetica 30 (1976) 241-252 (the residue sieve).
"""

from __future__ import annotations

from ..integer_cycle import IntegerCycle
from .chunks import (
    LISTED_UNRESOLVED,
    ChunkOutcome,
    ChunkTask,
    default_chunk_size,
    plan_chunks,
    run_chunk,
)
from .result import ScanResult, StoreUse
from .run import scan
from .store import ScanStore, default_store_path

__all__ = [
    "scan",
    "ScanResult",
    "StoreUse",
    "IntegerCycle",
    "ScanStore",
    "default_store_path",
    "ChunkTask",
    "ChunkOutcome",
    "run_chunk",
    "plan_chunks",
    "default_chunk_size",
    "LISTED_UNRESOLVED",
]
