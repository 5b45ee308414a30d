"""The functional graph of a map over a range of starts: cycles and their basins.

Inside
------
- :func:`functional_graph` -- follow every start in a range (positive,
  negative or both sides) exactly until its orbit joins a node already seen,
  closes a cycle, passes a ceiling or a step cap; return a
  :class:`FunctionalGraph` holding the :class:`networkx.DiGraph`.
- :class:`FunctionalGraph` -- the result: the cycles found (the attracting
  components of the graph, i.e. its terminal strongly connected components
  that contain an edge), each verified exactly by :func:`cyclewright.cycles.solver.solve`;
  the basins (how many starts fall into each cycle); how many starts passed
  the ceiling or were left unresolved; export to GraphML, GEXF and DOT; a
  matplotlib drawing for small graphs.
- cycles are :class:`~cyclewright.cycles.integer_cycle.IntegerCycle`
  records; ``FunctionalGraph.basins[i]`` is the basin of ``cycles[i]``.

Every node ``n`` has one out-edge ``n -> T(n)``, except the *frontier*
nodes: a value beyond the ceiling (``beyond_ceiling``) or the value where a
walk stopped at the step cap (``unresolved``). With no ceiling a walk stops
at the value cap shared with :func:`~cyclewright.cycles.orbit.orbit`
(:func:`~cyclewright.cycles.limits.value_cap`: the largest start times
``10^1000``), so every value held has a size known before the walk starts
and :func:`graph_bound` bounds the graph's nodes, memory and steps up front. So every node leads to
exactly one attracting component: a cycle or a frontier node.

Figures and their labels: cycles and basin counts are ``exact`` (Python
integers throughout, every cycle re-derived from its itinerary). The count
of starts that *escaped* is an exact count of starts whose orbit passed the
ceiling (or the value cap) -- it is not a proof that those orbits diverge. Unresolved starts
are open cases.

Node attributes (kept in every export): ``residue`` (``n mod d``),
``is_start`` (``n`` is one of the starts; GEXF reserves ``start``), ``on_cycle``, ``basin`` (the
index of the cycle the node leads to, ``-1`` for a value beyond the
ceiling, ``-2`` for unresolved), ``frontier`` (``""``,
``"beyond_ceiling"`` or ``"unresolved"``).

References
----------
.. [1] J. C. Lagarias, "The 3x+1 problem and its generalizations",
   American Mathematical Monthly 92 (1985) 3-23 (cycles of 3x+1 on both sides).
.. [2] A. Hagberg, D. Schult and P. Swart, "Exploring network structure,
   dynamics, and function using NetworkX", Proc. SciPy 2008 (attracting
   components).
"""

from __future__ import annotations

import itertools
import os
from collections.abc import Callable
from dataclasses import dataclass, field
from fractions import Fraction
from pathlib import Path

import networkx as nx

from cyclewright.maps import Map, as_map

from .errors import InputError
from .figures import DEFAULT_WIDTH
from .files import atomic_write
from .graph_figure import PLOT_NODE_LIMIT
from .integer_cycle import IntegerCycle, cycle_from_element
from .labels import EXACT, labels_field
from .limits import (
    DEFAULT_CEILING,
    DEFAULT_MAX_STEPS,
    GRAPH_BYTES_PER_NODE,
    MAX_GRAPH_NODES,
    MAX_GRAPH_STARTS,
    MEMORY_BUDGET,
    VALUE_CAP_DIGITS,
    check_ceiling,
    check_step_cap,
    int_bytes,
    limits_lifted,
    short_int,
    value_cap,
    value_text,
)
from .presentation import Presentable, Table
from .progress import ProgressCallback, report
from .sides import DEFAULT_SIDE, Side, parse_side
from .solver import cycle_representative

__all__ = [
    "FunctionalGraph",
    "functional_graph",
    "check_graph",
    "graph_bound",
    "GraphBound",
    "MAX_STARTS",
    "PLOT_NODE_LIMIT",
]

#: Most starts of one graph (the API's limit, :data:`~cyclewright.cycles.limits.MAX_GRAPH_STARTS`).
MAX_STARTS = MAX_GRAPH_STARTS

ESCAPED = -1
UNRESOLVED = -2


@dataclass(frozen=True, repr=False)
class FunctionalGraph(Presentable):
    """The functional graph of a map over a range of starts, with its cycles and basins.

    Attributes
    ----------
    map : Map
    side : str
        ``"positive"``, ``"negative"`` or ``"both"``.
    start, to : int
        The starts are ``start .. to`` on the positive side and
        ``-to .. -start`` on the negative side.
    max_steps : int
        New values one walk may add before it stops (unresolved).
    ceiling : int or None
        Walks stop once ``|value|`` exceeds it (escaped).
    graph : networkx.DiGraph
    cycles : tuple of IntegerCycle
        Every cycle reached, sorted by ``|minimum|`` (the negative first on a
        tie); its index is the node attribute ``basin``.
    basins : tuple of int
        ``basins[i]``: how many starts fall into ``cycles[i]`` (including the
        cycle's own elements that are starts).
    starts : int
        How many starts.
    escaped, unresolved : int
        Starts whose orbit passed the ceiling (or the value cap) / stopped
        at the step cap.
    value_cap : int or None
        Where a walk stopped as escaped: ``ceiling`` when given, else the
        value cap :func:`~cyclewright.cycles.limits.value_cap` of ``to``
        (``to * 10^1000``). Passing it is not a proof of divergence.
    """

    map: Map
    side: str
    start: int
    to: int
    max_steps: int
    ceiling: int | None
    graph: nx.DiGraph = field(compare=False)
    cycles: tuple[IntegerCycle, ...]
    basins: tuple[int, ...]
    starts: int
    escaped: int
    unresolved: int
    labels: dict = labels_field(cycles=EXACT, basin=EXACT, escaped=EXACT, unresolved=EXACT)
    value_cap: int | None = None

    @property
    def escape_text(self) -> str:
        """What an escape passed: ``"the ceiling"`` or ``"the value cap to * 10^1000"``."""
        if self.ceiling is not None or self.value_cap is None:
            return "the ceiling"
        return f"the value cap {short_int(max(self.to, 1))} * 10^{VALUE_CAP_DIGITS}"

    # ------------------------------------------------------------ summaries
    @property
    def escaped_share(self) -> Fraction:
        """Share of starts whose orbit passed the ceiling (not a proof of divergence)."""
        return Fraction(self.escaped, self.starts)

    @property
    def unresolved_share(self) -> Fraction:
        return Fraction(self.unresolved, self.starts)

    def basin(self, cycle: IntegerCycle) -> int:
        """How many starts fall into ``cycle`` (one of :attr:`cycles`)."""
        return self.basins[self.cycles.index(cycle)]

    def basin_share(self, cycle: IntegerCycle) -> Fraction:
        """The share of the starts that fall into ``cycle`` (exact)."""
        return Fraction(self.basin(cycle), self.starts)

    def table(self) -> Table:
        """The cycles reached with their basins, then the escaped and unresolved starts."""
        rows = [
            (
                c.minimum,
                c.length,
                c.odd_steps if self.map.divisor == 2 else c.content,
                c.lagarias_primitive,
                self._is_start(c.minimum),
                b,
                Fraction(b, self.starts),
            )
            for c, b in zip(self.cycles, self.basins)
        ]
        rows.append(
            (
                f"escaped (passed {self.escape_text})",
                None,
                None,
                None,
                None,
                self.escaped,
                self.escaped_share,
            )
        )
        rows.append(
            (
                "unresolved (step cap)",
                None,
                None,
                None,
                None,
                self.unresolved,
                self.unresolved_share,
            )
        )
        steps = "odd steps"  # for divisors above 2: the content (steps through each residue)
        return Table(
            "Cycles reached and their basins",
            (
                "cycle minimum",
                "length",
                steps,
                "primitive (Lagarias)",
                "minimum in range",
                "starts in basin",
                "share",
            ),
            tuple(rows),
            {
                c: EXACT.value
                for c in (
                    "cycle minimum",
                    "length",
                    steps,
                    "primitive (Lagarias)",
                    "starts in basin",
                    "share",
                )
            },
            "each cycle verified by solving its itinerary; escaped means the orbit passed "
            f"{self.escape_text}: an exact count, not a proof of divergence",
        )

    def cycle_minima(self, *, in_range: bool = False) -> list[int]:
        """The cycles' minima; with ``in_range`` only those that are starts.

        ``in_range=True`` gives what a scan by cycle minimum over the same
        range and side must report.
        """
        out = []
        for c in self.cycles:
            if in_range and not self._is_start(c.minimum):
                continue
            out.append(c.minimum)
        return out

    def _is_start(self, n: int) -> bool:
        lo, hi = self.start, self.to
        if self.side in ("positive", "both") and lo <= n <= hi:
            return True
        return self.side in ("negative", "both") and lo <= -n <= hi

    def basin_of(self, n: int) -> IntegerCycle | str:
        """The cycle a node of the graph leads to, or ``"escaped"``/``"unresolved"``."""
        if n not in self.graph:
            raise InputError(f"{n} is not a node of this graph")
        b = self.graph.nodes[n]["basin"]
        if b == ESCAPED:
            return "escaped"
        if b == UNRESOLVED:
            return "unresolved"
        return self.cycles[b]

    def to_dict(self) -> dict:
        return {
            "map": self.map.label,
            "map_key": self.map.key,
            "side": self.side,
            "from": self.start,
            "to": self.to,
            "max_steps": self.max_steps,
            "ceiling": self.ceiling,
            "value_cap": self.value_cap,
            "starts": self.starts,
            "nodes": self.graph.number_of_nodes(),
            "edges": self.graph.number_of_edges(),
            "cycles": [
                dict(
                    c.to_dict(),
                    index=i,
                    basin=b,
                    basin_share=Fraction(b, self.starts),
                    in_range=self._is_start(c.minimum),
                )
                for i, (c, b) in enumerate(zip(self.cycles, self.basins))
            ],
            "escaped": self.escaped,
            "escaped_share": self.escaped_share,
            "unresolved": self.unresolved,
            "unresolved_share": self.unresolved_share,
            "escaped_note": (
                f"escaped counts the starts whose orbit passed {self.escape_text}; "
                "it is not a proof that those orbits diverge"
            ),
            "labels": dict(self.labels),
        }

    def __repr__(self) -> str:
        rng = f"{self.start}..{self.to}"
        mins = ", ".join(str(c.minimum) for c in self.cycles[:10]) + (
            ", ..." if len(self.cycles) > 10 else ""
        )
        return (
            f"FunctionalGraph({self.map.label}, {self.side} {rng}: "
            f"{self.graph.number_of_nodes()} nodes, cycles with minima [{mins}], "
            f"escaped {self.escaped}, unresolved {self.unresolved})"
        )

    # -------------------------------------------------------------- exports
    def _export_graph(self) -> nx.DiGraph:
        """A copy with graph attributes as strings (portable across formats)."""
        g = self.graph.copy()
        g.graph.clear()
        g.graph.update(
            {
                "map": self.map.label,
                "map_key": self.map.key,
                "formula": self.map.formula(),
                "side": self.side,
                "range": f"{self.start}..{self.to}",
                "max_steps": str(self.max_steps),
                "ceiling": "none" if self.ceiling is None else str(self.ceiling),
            }
        )
        return g

    def write_graphml(self, path: str | os.PathLike) -> Path:
        """Write GraphML (read back with ``networkx.read_graphml(path, node_type=int)``)."""
        g = self._export_graph()
        return _atomic_write(path, lambda p: nx.write_graphml(g, p))

    def write_gexf(self, path: str | os.PathLike) -> Path:
        """Write GEXF (read back with ``networkx.read_gexf(path, node_type=int)``)."""
        g = self._export_graph()
        return _atomic_write(path, lambda p: nx.write_gexf(g, p))

    def dot_text(self) -> str:
        """The graph in the DOT language (Graphviz), written directly."""
        g = self._export_graph()
        lines = [f"digraph {_dot_id(self.map.label)} {{"]
        for key, value in g.graph.items():
            lines.append(f"  {_dot_id(key)}={_dot_id(value)};")
        for n, attrs in g.nodes(data=True):
            a = ", ".join(f"{_dot_id(k)}={_dot_id(_dot_value(v))}" for k, v in attrs.items())
            lines.append(f"  {_dot_id(str(n))} [{a}];")
        for u, v in g.edges():
            lines.append(f"  {_dot_id(str(u))} -> {_dot_id(str(v))};")
        lines.append("}")
        return "\n".join(lines) + "\n"

    def write_dot(self, path: str | os.PathLike, *, engine: str = "auto") -> Path:
        """Write DOT: through networkx's pydot bridge when pydot is installed
        (``engine="auto"`` or ``"pydot"``), otherwise (or with
        ``engine="builtin"``) with :meth:`dot_text`."""
        if engine not in ("auto", "pydot", "builtin"):
            raise InputError(f"engine must be 'auto', 'pydot' or 'builtin', got {engine!r}")
        if engine in ("auto", "pydot"):
            try:
                import pydot  # noqa: F401
            except ImportError:
                if engine == "pydot":
                    raise InputError("pydot is not installed; use engine='builtin'") from None
            else:  # pragma: no cover - pydot is optional and not a dependency
                g = self._export_graph()
                return _atomic_write(path, lambda p: nx.nx_pydot.write_dot(g, p))
        text = self.dot_text()
        return _atomic_write(path, lambda p: Path(p).write_text(text))

    def plot(self, path: str | os.PathLike, *, width: str | float = DEFAULT_WIDTH) -> Path:
        """Draw the graph to ``path`` (PNG, SVG or PDF by extension), ``width`` wide.

        Each value is placed by its steps to the cycle (x) and its size on a
        log scale (y); edges run one column to the left, a cycle's own edges
        form a closed loop left of step 0; colours are the basins, with the legend under
        the axes and the map and range in the title
        (:func:`cyclewright.cycles.graph_figure.draw_functional_graph`).

        Parameters
        ----------
        path : str or path
        width : str or float
            ``"single"`` (one column, 3.4 in; default), ``"double"`` (7.0 in)
            or inches (:func:`cyclewright.cycles.figures.figure_width`).

        Returns
        -------
        Path

        Raises
        ------
        InputError
            An unknown format, or a graph with more nodes than the width
            draws legibly (:func:`cyclewright.cycles.graph_figure.plot_node_limit`).
        """
        from .graph_figure import draw_functional_graph

        return draw_functional_graph(self, path, width=width)


def _dot_id(text: str) -> str:
    s = str(text).replace("\\", "\\\\").replace('"', '\\"').replace("\n", "\\n")
    return f'"{s}"'


def _dot_value(v) -> str:
    if isinstance(v, bool):
        return "true" if v else "false"
    return str(v)


def _atomic_write(path: str | os.PathLike, writer: Callable[[str], object]) -> Path:
    """:func:`cyclewright.cycles.files.atomic_write`, refusing a directory that does not exist with one line."""
    target = Path(path)
    directory = target.parent if str(target.parent) else Path(".")
    if not directory.is_dir():
        raise InputError(f"cannot write {target}: directory {directory} does not exist")
    return atomic_write(target, writer)


def _check_int(value, what: str) -> int:
    if isinstance(value, bool) or not isinstance(value, int):
        raise InputError(f"{what} must be an integer, got {value!r}")
    return int(value)


def check_graph(
    to: int,
    start: int = 1,
    side: Side = DEFAULT_SIDE,
    max_steps: int = DEFAULT_MAX_STEPS,
    ceiling: int | None = DEFAULT_CEILING,
) -> tuple[int, int, int, int | None]:
    """Refuse a :func:`functional_graph` beyond the limits before it is built (one line).

    The range is not empty and starts at 1 or above; it has at most
    :data:`~cyclewright.cycles.limits.MAX_GRAPH_STARTS` starts (on both
    sides together); ``max_steps`` is 1 ..
    :data:`~cyclewright.cycles.limits.MAX_STEP_CAP`; ``ceiling`` is at
    least ``to`` and at most ``10^1000``. Size limits are lifted inside
    :func:`~cyclewright.cycles.limits.lift_limits`. Returns
    ``(to, start, max_steps, ceiling)``.

    >>> check_graph(100)
    (100, 1, 1000, 1000000000000000)
    >>> check_graph(10**6, side="both")
    Traceback (most recent call last):
    ...
    cyclewright.cycles.errors.InputError: 2000000 starts: the graph holds at most 500000 starts (about 2300 bytes a node in memory); use a smaller range
    """
    to = _check_int(to, "to")
    start = _check_int(start, "start")
    parse_side(side)
    if start < 1:
        raise InputError(f"the range must start at 1 or above (0 is on neither side), got {start}")
    if to < start:
        raise InputError(f"empty range: from {short_int(start)} is above to {short_int(to)}")
    nstarts = (to - start + 1) * (2 if side == "both" else 1)
    if nstarts > MAX_GRAPH_STARTS and not limits_lifted():
        raise InputError(
            f"{value_text(nstarts)} starts: the graph holds at most {MAX_GRAPH_STARTS} starts "
            f"(about {GRAPH_BYTES_PER_NODE} bytes a node in memory); use a smaller range"
        )
    max_steps = check_step_cap(_check_int(max_steps, "max_steps"), liftable=True)
    if ceiling is not None:
        ceiling = _check_int(ceiling, "ceiling")
        check_ceiling(ceiling)
        if ceiling < to:
            raise InputError(
                f"ceiling {short_int(ceiling)} is below the largest start {short_int(to)}",
                param="ceiling",
            )
    return to, start, max_steps, ceiling


@dataclass(frozen=True)
class GraphBound:
    """What a functional graph may hold at most, known before its walk starts.

    Every value a walk keeps is at most the cap in absolute value (the
    ceiling, or with none the value cap of the largest start), and its image
    one step further (the frontier); so a node never takes more than
    ``node_bytes``. Every step of a walk adds a node or ends the walk, so
    the walk takes at most ``nodes + starts`` steps.

    Attributes
    ----------
    starts : int
    cap : int
        Where a walk stops as escaped.
    node_bytes : int
        Most bytes of one node: its measured size with a value of a machine
        word (:data:`~cyclewright.cycles.limits.GRAPH_BYTES_PER_NODE`) plus
        the further digits of a value of the frontier's size.
    nodes : int
        Most nodes: ``starts * (max_steps + 1)``, and (unless the limits are
        lifted) at most :data:`~cyclewright.cycles.limits.MAX_GRAPH_NODES`
        and the memory budget over ``node_bytes``: a walk that passes it is
        refused.
    steps : int
        Most steps of all walks together (``nodes + starts``).
    """

    starts: int
    cap: int
    node_bytes: int
    nodes: int
    steps: int

    @property
    def bytes(self) -> int:
        """Most memory of the graph (``nodes * node_bytes``)."""
        return self.nodes * self.node_bytes

    def text(self) -> str:
        """One phrase: the bound on nodes, memory and steps."""
        return (
            f"at most {self.nodes:,} nodes of at most {self.node_bytes:,} bytes "
            f"(about {self.bytes // 2**20:,} MiB) and {self.steps:,} steps"
        )


def graph_bound(
    m: Map | str,
    to: int,
    *,
    start: int = 1,
    side: Side = DEFAULT_SIDE,
    max_steps: int = DEFAULT_MAX_STEPS,
    ceiling: int | None = DEFAULT_CEILING,
) -> GraphBound:
    """Bound a :func:`functional_graph`'s nodes, memory and steps before it is walked.

    The arguments are checked as by :func:`check_graph`. Beyond the limits,
    refused at once with the bound (:class:`InputError`): the starts alone
    (every start is a node) take more than the memory budget at the node
    size the cap allows. Not checked inside
    :func:`~cyclewright.cycles.limits.lift_limits`.

    Parameters
    ----------
    m : Map or str
    to, start, side, max_steps, ceiling
        As for :func:`functional_graph`.

    Returns
    -------
    GraphBound

    Examples
    --------
    >>> b = graph_bound("3x+1", 100, max_steps=10**9)
    >>> b.nodes, b.node_bytes, b.steps
    (933688, 2300, 933788)
    >>> graph_bound("5x+1", 100, ceiling=None).cap == 100 * 10**1000
    True
    >>> graph_bound("3x+1", 10, max_steps=5).nodes     # 10 walks of at most 6 values
    60

    References
    ----------
    None: a count of the walk's own bookkeeping (see :class:`GraphBound`).
    """
    m = as_map(m)
    to, start, max_steps, ceiling = check_graph(to, start, side, max_steps, ceiling)
    starts = (to - start + 1) * (2 if side == "both" else 1)
    cap = ceiling if ceiling is not None else value_cap(to)
    grow = max(abs(a) for a in m.multipliers) * cap + max(abs(b) for b in m.offsets)
    # GRAPH_BYTES_PER_NODE was measured with values of a machine word or less
    node_bytes = GRAPH_BYTES_PER_NODE + max(0, int_bytes(grow) - int_bytes(2**62))
    nodes = starts * (max_steps + 1)
    if not limits_lifted():
        fit = min(MAX_GRAPH_NODES, MEMORY_BUDGET // node_bytes)
        if starts > fit:
            raise InputError(
                f"{starts:,} starts with values up to {short_int(cap)} could need about "
                f"{starts * node_bytes // 2**20:,} MiB ({node_bytes:,} bytes a node); one graph "
                f"holds at most {fit:,} such nodes in {MEMORY_BUDGET // 2**20:,} MiB; lower the "
                "ceiling or use a smaller range"
            )
        nodes = min(nodes, fit)
    return GraphBound(starts, cap, node_bytes, nodes, nodes + starts)


def _too_many_nodes(
    nodes: int, value_bytes: int, done: int, total: int, ceiling, bound: GraphBound
) -> str:
    where = (
        f"towards the value cap {short_int(bound.cap)}"
        if ceiling is None
        else f"towards the ceiling {short_int(ceiling)}"
    )
    size = (nodes * GRAPH_BYTES_PER_NODE + value_bytes) // 2**20
    return (
        f"the graph reached {nodes} nodes (about {size} MiB once built) after {done} of {total} "
        "starts; "
        f"one graph holds at most {bound.nodes} nodes and {MEMORY_BUDGET // 2**20} MiB: "
        f"orbits climbing {where} add nodes beyond the starts; lower the ceiling or the step "
        "cap, or use a smaller range; nothing was written"
    )


def functional_graph(
    m: Map | str,
    to: int,
    *,
    start: int = 1,
    side: Side = DEFAULT_SIDE,
    max_steps: int = DEFAULT_MAX_STEPS,
    ceiling: int | None = DEFAULT_CEILING,
    progress: ProgressCallback | None = None,
) -> FunctionalGraph:
    """Build the functional graph of ``m`` from every start in a range.

    Starts are taken in order of absolute value (positive before negative on
    a tie). From each start the orbit is followed exactly; the walk stops as
    soon as it reaches a node already in the graph (a known node, or a node
    of its own path: a new cycle), when a value exceeds ``ceiling`` in
    absolute value (the value is kept as a frontier node), or after
    ``max_steps`` new values (the last one is kept as an unresolved frontier
    node). Cycles are the attracting components of the graph
    (:func:`networkx.attracting_components`) that contain an edge.

    Parameters
    ----------
    m : Map
    to : int
        Largest start (in absolute value).
    start : int
        Smallest start (in absolute value), at least 1.
    side : {"positive", "negative", "both"}
    max_steps : int
        New values per walk before it stops (unresolved); default
        :data:`~cyclewright.cycles.limits.DEFAULT_MAX_STEPS`.
    ceiling : int or None
        Stop a walk once ``|value| > ceiling``; None for no ceiling: a walk
        then stops (escaped) at the value cap ``to * 10^1000`` shared with
        :func:`~cyclewright.cycles.orbit.orbit`
        (:func:`~cyclewright.cycles.limits.value_cap`); default
        :data:`~cyclewright.cycles.limits.DEFAULT_CEILING`.
    progress : ProgressCallback, optional
        Called with a :class:`~cyclewright.cycles.progress.ProgressEvent`
        (phase ``"graph"``, unit ``"starts"``) every few thousand starts.

    Returns
    -------
    FunctionalGraph

    Raises
    ------
    InputError
        Input beyond the limits of :func:`check_graph` or the bound of
        :func:`graph_bound`, refused before any walk; and a graph whose nodes pass
        :data:`~cyclewright.cycles.limits.MAX_GRAPH_NODES` (or whose values
        pass the memory budget) while it is walked: orbits that escape add
        nodes the starts do not bound, and the walk stops there, with the
        number of starts done, before memory grows further. Not checked
        inside :func:`~cyclewright.cycles.limits.lift_limits`.

    Examples
    --------
    >>> from cyclewright import maps
    >>> g = functional_graph(maps.get("3x+1"), 30, side="both")
    >>> [(c.minimum, c.length, b) for c, b in zip(g.cycles, g.basins)]
    [(-1, 1, 14), (1, 2, 30), (-5, 3, 12), (-17, 11, 4)]
    >>> g.escaped, g.unresolved
    (0, 0)
    >>> g5 = functional_graph(maps.get("5x+1"), 20, ceiling=10**6)
    >>> g5.cycle_minima(), g5.escaped
    ([1, 13, 17], 5)

    References
    ----------
    Lagarias 1985 (cycles of 3x+1 on both sides); see the module docstring.
    """
    m = as_map(m)
    bound = graph_bound(
        m, to, start=start, side=side, max_steps=max_steps, ceiling=ceiling
    )  # checks the arguments as check_graph does, and refuses beyond the budget at once
    to, start, max_steps, ceiling = check_graph(to, start, side, max_steps, ceiling)
    lifted = limits_lifted()
    node_limit = bound.nodes
    cap = bound.cap
    value_bytes = 0  # the digits of the values held, beyond the fixed size of a node

    step = m.step
    succ: dict[int, int] = {}
    frontier: dict[int, str] = {}
    starts: list[int] = []
    for s in range(start, to + 1):
        if side in ("positive", "both"):
            starts.append(s)
        if side in ("negative", "both"):
            starts.append(-s)
    total = len(starts)
    for i, s in enumerate(starts):
        if i % 4096 == 0:
            report(progress, "graph", i, total, "starts")
        v = s
        new = 0
        while v not in succ and v not in frontier:
            w = step(v)
            succ[v] = w
            new += 1
            if not lifted:
                value_bytes += w.bit_length() >> 3
                if (
                    len(succ) + len(frontier) > node_limit
                    or value_bytes + len(succ) * GRAPH_BYTES_PER_NODE > MEMORY_BUDGET
                ):
                    raise InputError(
                        _too_many_nodes(
                            len(succ) + len(frontier), value_bytes, i, total, ceiling, bound
                        )
                    )
            if abs(w) > cap:
                if w not in succ:
                    frontier.setdefault(w, "beyond_ceiling")
                break
            if new >= max_steps and w not in succ and w not in frontier:
                frontier[w] = "unresolved"
                break
            v = w
    report(progress, "graph", total, total, "starts")

    # Cycles and basins straight from the successor map, each node visited once:
    # a walk from an unlabelled node ends at a labelled node, at a frontier node
    # or at a node of its own path (a new cycle: the graph's attracting
    # components with an edge). Labels: a raw cycle's index, or ESCAPED/UNRESOLVED.
    d = m.divisor
    label: dict[int, int] = {
        n: (ESCAPED if kind == "beyond_ceiling" else UNRESOLVED) for n, kind in frontier.items()
    }
    raw_cycles: list[list[int]] = []
    for n0 in succ:
        if n0 in label:
            continue
        path: list[int] = []
        where: dict[int, int] = {}
        v = n0
        while v not in label:
            if v in where:  # the walk closed a new cycle
                for u in path[where[v] :]:
                    label[u] = len(raw_cycles)
                raw_cycles.append(path[where[v] :])
                break
            where[v] = len(path)
            path.append(v)
            v = succ[v]
        key = label[v]
        for u in path:
            label.setdefault(u, key)
    order = []
    for i, comp in enumerate(raw_cycles):
        least = cycle_representative(list(comp))
        elems = [least]
        v = succ[least]
        while v != least:
            elems.append(v)
            v = succ[v]
        order.append((abs(least), least, i, tuple(elems)))
    order.sort()
    cycles_sorted = [elems for *_, elems in order]
    new_index = {i: k for k, (_, _, i, _) in enumerate(order)}
    basin_of = {n: (b if b < 0 else new_index[b]) for n, b in label.items()}
    on_cycle = {u for elems in cycles_sorted for u in elems}

    start_set = set(starts)
    counts: dict[int, int] = {}
    for s in starts:
        b = basin_of[s]
        counts[b] = counts.get(b, 0) + 1

    g = nx.DiGraph()
    g.add_nodes_from(
        (
            n,
            {
                "residue": n % d,
                "is_start": n in start_set,
                "on_cycle": n in on_cycle,
                "basin": basin_of[n],
                "frontier": frontier.get(n, ""),
            },
        )
        for n in itertools.chain(succ, frontier)
    )
    g.add_edges_from(succ.items())

    # each cycle is rebuilt and proved in exact arithmetic (iteration, and
    # solve() on its itinerary): an internal error otherwise, never a report
    found = tuple(cycle_from_element(m, elems[0], len(elems)) for elems in cycles_sorted)
    return FunctionalGraph(
        map=m,
        side=side,
        start=start,
        to=to,
        max_steps=max_steps,
        ceiling=ceiling,
        graph=g,
        cycles=found,
        basins=tuple(counts.get(i, 0) for i in range(len(found))),
        starts=total,
        escaped=counts.get(ESCAPED, 0),
        unresolved=counts.get(UNRESOLVED, 0),
        value_cap=cap,
    )
