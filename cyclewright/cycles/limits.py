"""Defaults and input limits of the API: declared once, checked here, used by the CLI too.

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
- The input limits (``MAX_*``, :data:`MEMORY_BUDGET`): what an analysis
  accepts before it starts. Each analysis refuses input beyond them with
  :class:`~cyclewright.cycles.errors.InputError` and a one-line message
  (the command line prints that line as ``error: ...``, exit status 2).
  The table of every limit is docs/limits.md.
- :func:`check_range`, :func:`check_memory`, :func:`check_members` -- the
  refusals, one message each; :func:`check_step_cap`,
  :func:`check_type_length`, :func:`check_start`, :func:`check_workers` --
  the limits several analyses share, each worded once. A refusal of a
  parameter names it as the API does (``max_steps``) and records the name
  (``InputError.param``): the command line says the same sentence with the
  option's name (``--max-steps``). :func:`limit_text`, :func:`value_text`,
  :func:`short_int`, :func:`int_digits`, :func:`quote` -- how they quote
  figures and inputs (a long value shortened to its ends and digit count).
- :func:`lift_limits` -- a context in which the limits that only protect
  time and memory are lifted, for callers who know what they ask for
  (``with cw.lift_limits(): cw.census(m, 2 * 10**6)``); the limits that
  protect correctness (64-bit stores and kernels) stay.

A capped walk is never a proof of anything: the analyses report capped
starts as ``unresolved`` (or ``capped``), never as divergent.
"""

from __future__ import annotations

import contextlib
import contextvars
import math
import os
from collections.abc import Iterator

from cyclewright.maps.text import quote

from .errors import InputError, Name

__all__ = [
    "refuse_time",
    "DEFAULT_MAX_STEPS",
    "DEFAULT_CEILING",
    "wait_seconds",
    "MEMORY_BUDGET",
    "MAX_START_DIGITS",
    "MAX_CENSUS_LENGTH",
    "MAX_CF_CENSUS_LENGTH",
    "MAX_FAMILY_MEMBERS",
    "MAX_ITINERARY_WORK",
    "MAX_WORKERS",
    "MAX_STEP_CAP",
    "MAX_CHUNKS",
    "MAX_TYPE_LENGTH",
    "MAX_EXCURSION_START",
    "MAX_COMPARE_TO",
    "MAX_COMPARE_SCAN",
    "MAX_EXTRA_LENGTHS",
    "MAX_SWEEP_SECONDS",
    "MAX_ENUMERATION_SECONDS",
    "MAX_NEXT_TYPES",
    "MAX_GRAPH_STARTS",
    "MAX_GRAPH_NODES",
    "GRAPH_BYTES_PER_NODE",
    "lift_limits",
    "limits_lifted",
    "check_range",
    "check_step_cap",
    "check_ceiling",
    "CEILING_WHY",
    "STEP_CAP_WHY",
    "TYPE_LENGTH_WHY",
    "START_DIGITS_WHY",
    "EXCURSION_WHY",
    "check_type_length",
    "check_start",
    "check_memory",
    "check_members",
    "check_workers",
    "limit_text",
    "value_text",
    "short_int",
    "int_digits",
    "quote",
    "VALUE_CAP_DIGITS",
    "value_cap",
    "int_bytes",
    "MAX_RECORDS_MINUTES",
    "QUICK_WALK_WORK",
]

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


#: Work whose estimated peak memory exceeds this many bytes is refused before it starts.
MEMORY_BUDGET = 2 * 2**30

#: Single starting values (``orbit``), ceilings and verified ranges (``floor``)
#: have at most this many digits (|N| <= 10^1000).
MAX_START_DIGITS = 1000

#: Largest cycle length K a census (or compare's census) accepts; planning
#: alone takes seconds at this size, and the scan it asks for is refused
#: by ``max_scan`` long before.
MAX_CENSUS_LENGTH = 10**6

#: Largest K for a census whose largest bound comes from the continued
#: fraction of log_2 a (planning in constant time); the plan then refuses
#: any scan beyond ``max_scan`` with its estimate.
MAX_CF_CENSUS_LENGTH = 10**9

#: Largest estimated work (half-words joined) of the itinerary method.
MAX_ITINERARY_WORK = 3 * 10**8

#: Most members of a family (``3x+k`` with offsets A..B) one run takes.
MAX_FAMILY_MEMBERS = 10_000

#: Most worker processes a run starts (each holds its own interpreter and kernels).
MAX_WORKERS = 64

#: Largest step cap per start (scan, graph, orbit) and cycle-length cap; the store
#: and the kernels hold these as 64-bit integers, and a cap beyond this never
#: finishes anyway.
MAX_STEP_CAP = 10**9

#: Largest step cap per start of ``records``: its kernels keep per-start step
#: counts and its tables in 32-bit fields sized for this cap.
MAX_RECORDS_STEP_CAP = 10**6

#: Largest end of a ``records`` range (its compiled walk holds starts as int64).
MAX_RECORDS_TO = 2**63 - 1

#: Most chunks one scan is cut into (``chunk_size``): each chunk costs about a
#: millisecond of bookkeeping and one store row.
MAX_CHUNKS = 10_000

#: Largest start of the excursions and of compare's scan (the compiled walk's
#: int64 values get one bit of headroom).
MAX_EXCURSION_START = 2**62

#: Largest scan end of ``compare`` (it walks 1..to on both sides three times:
#: excursions, scan, records; about a minute per 10^8 starts and map).
MAX_COMPARE_TO = 10**9

#: Largest scan a census inside ``compare`` runs (a few seconds for a
#: contracting map); beyond it the census is refused and its row says so.
MAX_COMPARE_SCAN = 10**10

#: Largest type length k (count) and odd-step range end (sweep, compare's odd).
MAX_TYPE_LENGTH = 100_000

#: Most further lengths per x a sweep adds beyond the critical one.
MAX_EXTRA_LENGTHS = 1000

#: Longest necklace enumeration of one type (``count``'s ``limit``), estimated
#: before it starts (seconds; liftable).
MAX_ENUMERATION_SECONDS = 60.0

#: Longest sweep run (seconds), estimated before it starts from a few of its
#: rows timed at x spread over the range (the cost of a row grows with x, its
#: length and the necklaces it enumerates; rows timed alone cost up to a few
#: times what they cost inside a sweep, so the estimate leans high); liftable.
MAX_SWEEP_SECONDS = 600.0

#: Most further possible types a floor lists.
MAX_NEXT_TYPES = 1000

#: Most starts of one functional graph (every start is a node).
MAX_GRAPH_STARTS = 500_000

#: Size of one node of the functional graph with its attributes and edge at
#: the peak (networkx; tracemalloc's peak over the nodes of 3x+1 from 1..30000
#: and 5x+1 from 1..2000: 2135 to 2313 bytes), plus its value's own digits.
GRAPH_BYTES_PER_NODE = 2300

#: Most nodes of one functional graph (the memory budget over the size of a
#: node): escaping orbits add nodes beyond the starts, and the walk is refused
#: once the graph passes this or its nodes' values the memory budget, before
#: memory grows further.
MAX_GRAPH_NODES = MEMORY_BUDGET // GRAPH_BYTES_PER_NODE


_LIFTED: contextvars.ContextVar[bool] = contextvars.ContextVar(
    "cyclewright_limits_lifted", default=False
)


@contextlib.contextmanager
def lift_limits() -> Iterator[None]:
    """Lift the time and memory limits of the API inside a ``with`` block.

    The limits that only guard time and memory (lengths, counts of starts,
    digits of a start, the memory budget, the number of workers) are not
    checked inside the block; the limits that guard correctness (the 64-bit
    stores and kernels of the scan) stay. Only for callers who know the
    work they ask for: nothing stops it once started but an interrupt.

    Parameters
    ----------
    None
        The block's extent is the lift's extent; nested blocks and threads
        (a context variable) keep their own state.

    Returns
    -------
    contextmanager
        Entered with ``with``; the limits are back when the block ends,
        normally or by an exception.

    Examples
    --------
    >>> from cyclewright.cycles.orbit import orbit
    >>> orbit("3x+1", 2**3330, max_steps=5000).status
    Traceback (most recent call last):
    ...
    cyclewright.cycles.errors.InputError: n must be at most 10^1000, got 2^3330 (a single start has at most 1000 digits)
    >>> with lift_limits():
    ...     orbit("3x+1", 2**3330, max_steps=5000).status
    'cycle'

    References
    ----------
    None: the limits are the project's own (docs/limits.md).
    """
    token = _LIFTED.set(True)
    try:
        yield
    finally:
        _LIFTED.reset(token)


def limits_lifted() -> bool:
    """True inside :func:`lift_limits`.

    >>> limits_lifted()
    False
    """
    return _LIFTED.get()


_LOG10_2 = math.log10(2)


def int_digits(n: int) -> int:
    """Decimal digits of ``|n|`` (1 for 0), without converting to text.

    >>> int_digits(0), int_digits(9), int_digits(10), int_digits(-(10**5000))
    (1, 1, 2, 5001)
    """
    n = abs(n)
    if n < 10:
        return 1
    d = int((n.bit_length() - 1) * _LOG10_2) + 1
    return d + 1 if n >= 10**d else d


def short_int(n: int, digits: int = 20) -> str:
    """An integer for a message: whole when short, else its ends and digit count.

    Never converts more than the kept digits (no limit on integer/text
    conversion is met).

    >>> short_int(12345), short_int(-(10**70))
    ('12345', '-10000000000000000000…00000000000000000000 (71 digits)')
    """
    d = int_digits(n)
    if d <= 2 * digits + 8:
        return str(n)
    a = abs(n)
    head = a // 10 ** (d - digits)
    tail = a % 10**digits
    return f"{'-' if n < 0 else ''}{head}…{tail:0{digits}d} ({d} digits)"


def limit_text(value: int) -> str:
    """A limit as people write it: ``10^9``, ``2^63-1``, ``2^20`` or plain digits.

    >>> limit_text(10**9), limit_text(2**63 - 1), limit_text(1 << 20), limit_text(4096), limit_text(500)
    ('10^9', '2^63-1', '2^20', '4096', '500')
    >>> limit_text(-(10**1000))
    '-10^1000'
    """
    if value < 0:
        return "-" + limit_text(-value)
    if value >= 10**6:
        for base in (10, 2):
            e = round(math.log(value, base))
            if base**e == value:
                return f"{base}^{e}"
            if base**e - 1 == value:
                return f"{base}^{e}-1"
    return short_int(value)


def value_text(value: int) -> str:
    """An input value quoted back in a refusal: as a power when it is one, else shortened.

    The same text whichever way the value came in (``10^30`` typed on the
    command line, ``10**30`` passed to the API), and never longer than about
    60 characters.

    >>> value_text(256), value_text(10**30), value_text(2**62), value_text(-(2**63))
    ('256', '10^30', '2^62', '-2^63')
    >>> value_text(3 * 10**1000)
    '30000000000000000000…00000000000000000000 (1001 digits)'
    """
    return limit_text(value)


def check_range(
    value: int,
    what: str,
    *,
    minimum: int | None = None,
    maximum: int | None = None,
    why: str = "",
    liftable: bool = False,
    lead: str = "",
) -> int:
    """``value`` if ``minimum <= value <= maximum``, else :class:`InputError` with one line.

    The one wording of every limit: ``{lead}{what} must be at most {limit},
    got {value} ({why})``. ``what`` is the parameter's name; the error
    records it (``InputError.param``) so the command line says the same
    sentence with its option's name (``--max-steps`` for ``max_steps``).
    The limit reads as ``10^x`` or ``2^x`` when that is how it reads best,
    the value the same way or shortened (:func:`value_text`); ``why`` adds
    the reason for a limit. A ``liftable`` maximum (one that only guards
    time or memory) is not checked inside :func:`lift_limits`.

    >>> check_range(5, "show", minimum=0)
    5
    >>> check_range(-1, "show", minimum=0)
    Traceback (most recent call last):
    ...
    cyclewright.cycles.errors.InputError: show must be at least 0, got -1
    >>> check_range(10**30, "max_steps", maximum=10**9)
    Traceback (most recent call last):
    ...
    cyclewright.cycles.errors.InputError: max_steps must be at most 10^9, got 10^30
    >>> try:
    ...     check_range(10**6, "odd", maximum=10**5, lead="the largest value of ")
    ... except InputError as exc:
    ...     print(exc.named("--odd"))
    the largest value of --odd must be at most 100000, got 10^6
    """
    at = len(lead)
    if isinstance(value, bool) or not isinstance(value, int):
        raise InputError(
            f"{lead}{what} must be an integer, got {quote(repr(value))}", param=what, at=at
        )
    if minimum is not None and value < minimum:
        raise InputError(
            f"{lead}{what} must be at least {limit_text(minimum)}, got {value_text(value)}",
            param=what,
            at=at,
        )
    if maximum is not None and value > maximum and not (liftable and limits_lifted()):
        tail = f" ({why})" if why else ""
        raise InputError(
            f"{lead}{what} must be at most {limit_text(maximum)}, got {value_text(value)}{tail}",
            param=what,
            at=at,
        )
    return value


#: Why each shared limit exists, said the same way by every analysis and option.
STEP_CAP_WHY = "the store and the kernels hold it as a 64-bit integer"
TYPE_LENGTH_WHY = "the figures of a type have about k digits each"
START_DIGITS_WHY = f"a single start has at most {MAX_START_DIGITS} digits"
EXCURSION_WHY = "the compiled walk holds values as int64 with one bit of headroom"
CEILING_WHY = "every node is a Python int kept in the graph"


def check_ceiling(ceiling: int, what: str = "ceiling") -> int:
    """``ceiling`` if at most 10^:data:`MAX_START_DIGITS` (liftable), else :class:`InputError`.

    >>> check_ceiling(10**15)
    1000000000000000
    >>> check_ceiling(10**2000)
    Traceback (most recent call last):
    ...
    cyclewright.cycles.errors.InputError: ceiling must be at most 10^1000, got 10^2000 (every node is a Python int kept in the graph)
    """
    if isinstance(ceiling, int) and not isinstance(ceiling, bool):
        if int_digits(ceiling) <= MAX_START_DIGITS:
            return ceiling  # decided without building 10^1000
    return check_range(ceiling, what, maximum=10**MAX_START_DIGITS, why=CEILING_WHY, liftable=True)


def check_step_cap(max_steps: int, what: str = "max_steps", *, liftable: bool = False) -> int:
    """``max_steps`` if 1 .. :data:`MAX_STEP_CAP`, else :class:`InputError` (one wording).

    >>> check_step_cap(1000)
    1000
    >>> check_step_cap(10**30)
    Traceback (most recent call last):
    ...
    cyclewright.cycles.errors.InputError: max_steps must be at most 10^9, got 10^30 (the store and the kernels hold it as a 64-bit integer)
    """
    return check_range(
        max_steps, what, minimum=1, maximum=MAX_STEP_CAP, why=STEP_CAP_WHY, liftable=liftable
    )


def check_type_length(k: int, what: str = "k", *, minimum: int = 1, lead: str = "") -> int:
    """``k`` if ``minimum`` .. :data:`MAX_TYPE_LENGTH` (liftable), else :class:`InputError`.

    The length of a type (``count``'s ``k``) and its odd steps (``x``, the
    sweep's and compare's ``odd``) obey the same limit.

    >>> check_type_length(12)
    12
    >>> check_type_length(10**7)
    Traceback (most recent call last):
    ...
    cyclewright.cycles.errors.InputError: k must be at most 100000, got 10^7 (the figures of a type have about k digits each)
    """
    return check_range(
        k,
        what,
        minimum=minimum,
        maximum=MAX_TYPE_LENGTH,
        why=TYPE_LENGTH_WHY,
        liftable=True,
        lead=lead,
    )


def check_start(n: int, what: str = "n") -> int:
    """``n`` if ``|n| <=`` 10^:data:`MAX_START_DIGITS` (liftable), else :class:`InputError`.

    >>> check_start(-27)
    -27
    >>> check_start(10**5000)
    Traceback (most recent call last):
    ...
    cyclewright.cycles.errors.InputError: n must be at most 10^1000, got 10^5000 (a single start has at most 1000 digits)
    """
    if isinstance(n, int) and not isinstance(n, bool) and int_digits(n) <= MAX_START_DIGITS:
        return n  # decided without building 10^1000
    limit = 10**MAX_START_DIGITS
    return check_range(n, what, minimum=-limit, maximum=limit, why=START_DIGITS_WHY, liftable=True)


def _bytes_text(n: int) -> str:
    for unit, size in (("GB", 10**9), ("MB", 10**6), ("kB", 10**3)):
        if n >= size:
            return f"{n / size:.1f} {unit}"
    return f"{n} bytes"


def check_memory(estimate: int, what: str, *, hint: str = "", param: str | None = None) -> int:
    """Refuse work whose estimated memory exceeds :data:`MEMORY_BUDGET` (:class:`InputError`).

    Not checked inside :func:`lift_limits`. ``param``, a parameter named in
    ``hint``, is recorded on the error (the command line names its option).

    >>> check_memory(10**6, "the orbit")
    1000000
    >>> check_memory(10**10, "the orbit", hint="lower the step cap")
    Traceback (most recent call last):
    ...
    cyclewright.cycles.errors.InputError: the orbit could need about 10.0 GB of memory, more than the 2.1 GB allowed; lower the step cap
    """
    if estimate > MEMORY_BUDGET and not limits_lifted():
        text = (
            f"{what} could need about {_bytes_text(estimate)} of memory, "
            f"more than the {_bytes_text(MEMORY_BUDGET)} allowed"
        )
        at = len(text) + 2 + hint.index(param) if param and param in hint else 0
        raise InputError(text + (f"; {hint}" if hint else ""), param=param if at else None, at=at)
    return estimate


def check_members(r: range, what: str, limit: int = MAX_FAMILY_MEMBERS) -> range:
    """``r`` if it has at most ``limit`` members, else :class:`InputError` (one line, no listing).

    Not checked inside :func:`lift_limits`.

    >>> check_members(range(1, 11), "ks")
    range(1, 11)
    >>> check_members(range(1, 10**30 + 1), "ks")
    Traceback (most recent call last):
    ...
    cyclewright.cycles.errors.InputError: ks has 10^30 members; at most 10000 are taken in one run
    """
    size = max(0, (r.stop - r.start + r.step - (1 if r.step > 0 else -1)) // r.step)
    if size > limit and not limits_lifted():
        raise InputError(
            f"{what} has {limit_text(size)} members; at most {limit} are taken in one run",
            param=what,
        )
    return r


def check_workers(workers: int | None, what: str = "workers") -> int | None:
    """``workers`` if None or 1 .. :data:`MAX_WORKERS` (the maximum liftable), else :class:`InputError`.

    >>> check_workers(4), check_workers(None)
    (4, None)
    """
    if workers is None:
        return None
    return check_range(
        workers,
        what,
        minimum=1,
        maximum=MAX_WORKERS,
        why="each worker holds its own interpreter and compiled kernels",
        liftable=True,
    )


#: Digits a walk may add to its largest start before it stops as ``escaped``
#: when no ceiling is given: the value cap shared by the orbit and the
#: functional graph (:func:`value_cap`). Like the step cap, passing it is
#: never a proof of divergence.
VALUE_CAP_DIGITS = 1000


def value_cap(n: int) -> int:
    """The value cap of a walk from starts up to ``|n|`` with no ceiling: ``max(|n|, 1) * 10^1000``.

    Shared by :func:`~cyclewright.cycles.orbit.orbit` (``n`` its start) and
    :func:`~cyclewright.cycles.graph.functional_graph` (``n`` its largest
    start): a value beyond it ends the walk as ``escaped``, so the size of
    every value held is known before the walk starts.

    >>> value_cap(7) == 7 * 10**1000, value_cap(0) == 10**1000
    (True, True)
    """
    return max(abs(n), 1) * 10**VALUE_CAP_DIGITS


def int_bytes(n: int) -> int:
    """Bytes CPython takes for an integer of ``|n|``'s size (28 plus 4 per 30 bits).

    >>> int_bytes(1), int_bytes(2**60), int_bytes(10**1000)
    (32, 40, 472)
    """
    return 28 + 4 * (abs(n).bit_length() // 30 + 1)


#: Longest estimated wall time, in minutes, of a ``records`` or ``excursions``
#: run accepted by default (``max_minutes``, ``--max-minutes``): the run is
#: timed on pieces of its own range first
#: (:mod:`~cyclewright.cycles.records_plan`, heuristic) and refused with the
#: estimate beyond it. Raised by the parameter; lifted inside :func:`lift_limits`.
MAX_RECORDS_MINUTES = 30.0

#: A ``records`` or ``excursions`` range with ``starts * max_steps^2`` at most
#: this is not timed before it runs (well under a second of work).
QUICK_WALK_WORK = 10**9


def refuse_time(
    head: str,
    seconds: float,
    source: str,
    max_minutes: float,
    *,
    at: str = "",
    option: str = "max_minutes",
    raise_it: str = "raise it",
    ways: tuple = (),
    last: str = "use a smaller range",
):
    """Raise the one refusal of a run estimated beyond its time limit (one wording everywhere).

    ``HEAD, about T AT (SOURCE; heuristic); beyond the limit of M min (OPTION):
    RAISE_IT, WAYS..., LAST`` -- records, excursions, scan
    (:func:`~cyclewright.cycles.records_plan.check_plan`), a family census
    and a comparison say their estimate in these words. ``option`` and any
    :class:`~cyclewright.cycles.errors.Name` in ``ways`` are parameters, so
    the command line says its options.

    Examples
    --------
    >>> refuse_time("census of 3 members", 5400, "2 members timed", 30)
    Traceback (most recent call last):
    ...
    cyclewright.cycles.errors.InputError: census of 3 members, about 90 min (2 members timed; heuristic); beyond the limit of 30 min (max_minutes): raise it, or use a smaller range
    """
    from .presentation import duration_text

    raise InputError.of(
        f"{head}, about {duration_text(seconds)}{at} ({source}; heuristic); "
        f"beyond the limit of {max_minutes:g} min (",
        Name(option),
        f"): {raise_it}, ",
        *ways,
        "or ",
        last,
    )
